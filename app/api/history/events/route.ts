// GET /api/history/events?lineId=N&from=ms&to=ms — what belongs on a line's time axis besides
// the readings: its notes and its alerts (and its hall's humidity alerts) overlapping the range,
// and the planned work (maintenance windows) on the line, its hall, points and bars.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { listLineAlerts } from "@/db/queries/floor";
import { listLineNotes } from "@/db/queries/notes";
import { listLineWindows } from "@/db/queries/maintenance-windows";
import { getPlantLayout } from "@/db/queries/plant";
import { notFound } from "@/lib/errors";

export const dynamic = "force-dynamic";

const querySchema = z
  .object({
    lineId: z.coerce.number().int().positive(),
    from: z.coerce.number().int().min(0),
    to: z.coerce.number().int().min(0),
  })
  .refine((q) => q.from < q.to, { message: "from must be before to", path: ["from"] })
  .refine((q) => q.to - q.from <= 400 * 86_400_000, { message: "a range may span at most 400 days", path: ["to"] });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "events query");
  const db = getDb();
  const area = (await getPlantLayout(db)).find((a) => a.lines.some((l) => l.id === q.lineId));
  if (!area) throw notFound(`No line with id ${q.lineId}.`);
  const [notes, alerts, windows] = await Promise.all([
    listLineNotes(db, { lineId: q.lineId, fromTs: q.from, toTs: q.to }),
    listLineAlerts(db, { lineId: q.lineId, areaId: area.id, fromTs: q.from, toTs: q.to }),
    listLineWindows(db, { lineId: q.lineId, fromTs: q.from, toTs: q.to }),
  ]);
  return NextResponse.json({ notes, alerts, windows }, { headers: { "Cache-Control": "private, no-store" } });
});
