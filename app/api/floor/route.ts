// GET /api/floor[?areaId=N] — the Floor's current state: halls, lines and points with their
// limits, open alerts and neutralizers, plus the last 15 minutes of every sensor as 1-minute
// means and the newest reading; shared by every screen of this process for FLOOR_CACHE_MS
// (app/_server/floor-cache.ts). The live
// stream (/api/live) keeps it current afterwards; clients refetch this now and then for the
// slower-changing parts (limits, alert counts, neutralizer states).
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getCachedFloor } from "@/app/_server/floor-cache";
import { notFound } from "@/lib/errors";

export const dynamic = "force-dynamic";

const querySchema = z.object({ areaId: z.coerce.number().int().positive().optional() });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "floor query");
  const { snapshot, body } = await getCachedFloor(q.areaId);
  if (q.areaId !== undefined && snapshot.areas.length === 0) throw notFound(`No hall with id ${q.areaId}.`);
  return new Response(body, { headers: { "Content-Type": "application/json", "Cache-Control": "private, no-store" } });
});
