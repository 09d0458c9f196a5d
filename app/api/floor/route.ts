// GET /api/floor[?areaId=N] — the Floor's current state: halls, lines and points with their
// limits, open alerts and neutralizers, plus the last 15 minutes of every sensor. The live
// stream (/api/live) keeps it current afterwards; clients refetch this now and then for the
// slower-changing parts (limits, alert counts, neutralizer states).
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getFloorSnapshot } from "@/db/queries/floor";
import { notFound } from "@/lib/errors";

export const dynamic = "force-dynamic";

const querySchema = z.object({ areaId: z.coerce.number().int().positive().optional() });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "floor query");
  const snapshot = await getFloorSnapshot(getDb(), { areaId: q.areaId });
  if (q.areaId !== undefined && snapshot.areas.length === 0) throw notFound(`No hall with id ${q.areaId}.`);
  return NextResponse.json(snapshot, { headers: { "Cache-Control": "private, no-store" } });
});
