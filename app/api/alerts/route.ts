// GET /api/alerts?area=&line=&state=active_unacked&state=…&open=1&from=&to=&limit= — the alerts
// list (open first: high severity first, then the longest waiting; then closed, newest first).
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { countOpenAlerts, listAlerts } from "@/db/queries/alert-list";
import { ALERT_STATES, SEVERITIES } from "@/lib/vocabulary";

export const dynamic = "force-dynamic";

const many = <T extends z.ZodType>(s: T) => z.union([s, z.array(s)]).optional().transform((v) => (v === undefined ? undefined : Array.isArray(v) ? v : [v]));

const querySchema = z.object({
  area: z.coerce.number().int().positive().optional(),
  line: z.coerce.number().int().positive().optional(),
  state: many(z.enum(ALERT_STATES)),
  severity: many(z.enum(SEVERITIES)),
  open: z.enum(["1", "0", "true", "false"]).optional(),
  from: z.coerce.number().int().min(0).optional(),
  to: z.coerce.number().int().min(0).optional(),
  limit: z.coerce.number().int().min(1).max(1000).optional(),
});

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "alerts query");
  const db = getDb();
  const [alerts, counts] = await Promise.all([
    listAlerts(db, {
      areaId: q.area,
      lineId: q.line,
      states: q.state,
      severities: q.severity,
      openOnly: q.open === "1" || q.open === "true",
      fromTs: q.from,
      toTs: q.to,
      limit: q.limit,
    }),
    countOpenAlerts(db),
  ]);
  return NextResponse.json({ alerts, counts, serverTs: Date.now() });
});
