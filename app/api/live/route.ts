// GET /api/live?scope=plant|area|line&id=N[&since=ts] — Server-Sent Events with the live readings
// of the whole plant (Floor), one hall and its lines (wallboard) or one line and its hall (line page).
//
// Events:  hello     {scope, id, serverTs, broker}          once, on connect
//          backfill  {series:[{deviceId, channel, samples}]}  readings missed since Last-Event-ID / since
//          reset     {reason}                                the gap was too long: refetch history
//          live      the worker's snapshot (lib/live.ts)     about once a second per line and hall
//          alert     {alertId, lineId, areaId, state, …}    an alert changed: refetch alerts
//          ping      {ts, broker}                            every 15 s (the client's liveness check)
// Each live event carries `id: <newest reading ts>`; EventSource sends it back as Last-Event-ID
// when it reconnects, and the stream first back-fills from the database what was missed.
// Streams end themselves after 30 minutes so the session is checked again on the reconnect;
// while open, the person is re-checked every minute (deactivated or demoted → the stream ends).
// A person may hold 20 streams at once (the 21st is answered 429), the process a few hundred; a
// client that reads too slowly gets the newest snapshot per line and a "reset", never a backlog.
import { z } from "zod";
import { route, parseOrThrow, queryObject } from "@/app/_server/route";
import { NextResponse } from "next/server";
import { getLiveHub, getStreamSlots, LIVE_STREAM_LIMITS, type HubEvent } from "@/app/_server/live-hub";
import { SseStream } from "@/app/_server/sse-stream";
import { getDb } from "@/db/client";
import { getPlantLayout } from "@/db/queries/plant";
import { getRecentReadings } from "@/db/queries/history";
import { getPerson } from "@/db/queries/people";
import { notFound } from "@/lib/errors";
import { can } from "@/lib/permissions";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

const querySchema = z
  .object({
    scope: z.enum(["plant", "area", "line"], { message: "scope must be plant, area or line" }),
    id: z.coerce.number().int().positive().optional(),
    since: z.coerce.number().int().min(0).optional(),
  })
  .refine((q) => q.scope === "plant" || q.id !== undefined, { message: "id is required for an area or line stream", path: ["id"] });

const HEARTBEAT_MS = 15_000;
const STREAM_LIFETIME_MS = 30 * 60_000;
const BACKFILL_MAX_MS = 15 * 60_000;
/** back-fill starts a little before the last id: series of one snapshot are not exactly aligned */
const BACKFILL_OVERLAP_MS = 5_000;
const RECHECK_MS = 60_000;

export const GET = route("view", async ({ request, session }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "live stream query");
  const db = getDb();
  const layout = await getPlantLayout(db);

  const lineIds = new Set<number>();
  const areaIds = new Set<number>();
  const deviceIds: number[] = [];
  for (const area of layout) {
    const wholeArea = q.scope === "plant" || (q.scope === "area" && area.id === q.id);
    const lines = wholeArea ? area.lines : area.lines.filter((l) => q.scope === "line" && l.id === q.id);
    if (!wholeArea && lines.length === 0) continue;
    areaIds.add(area.id);
    if (area.logger) deviceIds.push(area.logger.id);
    for (const l of lines) {
      lineIds.add(l.id);
      if (l.speedGateway) deviceIds.push(l.speedGateway.id);
      for (const p of l.points) if (p.fieldMeter) deviceIds.push(p.fieldMeter.id);
    }
  }
  if (q.scope !== "plant" && areaIds.size === 0) throw notFound(`No ${q.scope} with id ${q.id}.`);

  const lastEventId = Number(request.headers.get("last-event-id") ?? NaN);
  const since = Number.isFinite(lastEventId) && lastEventId > 0 ? lastEventId : q.since;

  const slot = getStreamSlots().acquire(session.personId);
  if (!slot.ok) {
    const why = slot.reason === "person" ? `You already have ${LIVE_STREAM_LIMITS.perPerson} live views open; close some tabs.` : "The server has too many live views open; try again shortly.";
    return NextResponse.json({ error: why, code: "rate_limited" }, { status: 429, headers: { "Retry-After": "30" } });
  }

  const hub = getLiveHub();
  let cleanup: () => void = () => slot.release();
  const sse = new SseStream({ onClose: () => cleanup() });
  let lastId = since ?? 0;

  const forward = (e: HubEvent) => {
    if (e.type === "live") {
      const s = e.snapshot;
      if (s.scope === "line" ? !lineIds.has(s.id) : !areaIds.has(s.id)) return;
      let newest = 0;
      for (const series of s.series) for (const [ts] of series.samples) if (ts > newest) newest = ts;
      lastId = Math.max(lastId, newest);
      // a client that is behind gets only the newest snapshot of each line or hall
      sse.event("live", s, { id: lastId > 0 ? lastId : undefined, coalesceKey: `${s.scope}:${s.id}` });
    } else if (e.type === "alert") {
      const a = e.alert;
      const mine = q.scope === "plant" || (a.lineId != null && lineIds.has(a.lineId)) || (a.lineId == null && a.areaId != null && areaIds.has(a.areaId));
      // each alert event only makes the page refetch alerts: one waiting is enough
      if (mine) sse.event("alert", a, { coalesceKey: "alert" });
    } else {
      sse.event("broker", { connected: e.connected }, { coalesceKey: "broker" });
    }
  };

  // hold live events while the back-fill is read, so the client receives them in time order;
  // the hold is bounded like the stream itself (one per key)
  const pending = new Map<string, HubEvent>();
  let backfilling = true;
  const unsubscribe = hub.subscribe((e) => {
    if (!backfilling) return forward(e);
    const key = e.type === "live" ? `live:${e.snapshot.scope}:${e.snapshot.id}` : e.type;
    pending.delete(key);
    pending.set(key, e);
  });

  const heartbeat = setInterval(() => sse.event("ping", { ts: Date.now(), broker: hub.isConnected() }, { coalesceKey: "ping" }), HEARTBEAT_MS);
  const lifetime = setTimeout(() => sse.close(), STREAM_LIFETIME_MS);
  const recheck = setInterval(() => {
    getPerson(db, session.personId)
      .then((p) => {
        if (!p || !p.active || !can(p.role, "view")) sse.close();
      })
      .catch(() => undefined);
  }, RECHECK_MS);

  cleanup = () => {
    slot.release();
    unsubscribe();
    clearInterval(heartbeat);
    clearInterval(recheck);
    clearTimeout(lifetime);
    pending.clear();
  };
  request.signal.addEventListener("abort", () => sse.close(false));

  sse.send(`retry: 3000\n\n`);
  sse.event("hello", { scope: q.scope, id: q.id ?? null, serverTs: Date.now(), broker: hub.isConnected() });
  void (async () => {
    try {
      const now = Date.now();
      if (since !== undefined) {
        if (now - since > BACKFILL_MAX_MS) sse.event("reset", { reason: "gap", since });
        else {
          const series = await getRecentReadings(db, deviceIds, since - BACKFILL_OVERLAP_MS, now);
          let newest = lastId;
          for (const s of series) for (const [ts] of s.samples) if (ts > newest) newest = ts;
          lastId = newest;
          sse.event("backfill", { series }, { id: lastId > 0 ? lastId : undefined });
        }
      }
    } catch (err) {
      console.error("live stream back-fill failed:", err);
      sse.event("reset", { reason: "backfill_failed" });
    }
    backfilling = false;
    const held = [...pending.values()];
    pending.clear();
    for (const e of held) forward(e);
  })();

  return new Response(sse.stream, {
    headers: {
      "Content-Type": "text/event-stream; charset=utf-8",
      // no-transform keeps the response out of compression, which would buffer the events
      "Cache-Control": "no-cache, no-transform",
      Connection: "keep-alive",
      "X-Accel-Buffering": "no",
    },
  });
});
