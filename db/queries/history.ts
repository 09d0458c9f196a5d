// History read model for charts: one device channel over a time range, as at most `maxPoints`
// buckets of [ts, min, mean, max]. Short ranges read the raw readings, medium ranges the
// 1-minute rollups, long ranges the 1-hour rollups, so a 30-day chart reads ~720 rows instead
// of 2.6 million. The min/max of every bucket is kept, so a one-second spike still shows as
// the top of the band even when the mean hides it.
//
// Bucketing uses integer arithmetic on epoch-ms BIGINTs, `(ts - t0) DIV bucketMs`, which was
// measured much faster than FLOOR(/) or DATETIME columns on this stack. Bucket edges are aligned
// to multiples of the bucket size, so refetching a sliding range keeps the same edges.
import { and, eq, sql } from "drizzle-orm";
import type { Db } from "../client";
import { devices } from "../schema";

import type { HistoryPoint, HistoryResult, HistorySource } from "../../lib/views/history";
import type { RecentSeries } from "../../lib/views/floor";

/** Native spacing of each source (raw: devices send about 1 Hz). */
export const SOURCE_RESOLUTION_MS: Record<HistorySource, number> = { raw: 1_000, "1m": 60_000, "1h": 3_600_000 };

/** Ranges up to this span read raw readings (if still within the raw retention). */
export const RAW_MAX_SPAN_MS = 6 * 3_600_000;
/** Ranges up to this span read the 1-minute rollups; longer ones the 1-hour rollups. */
export const ROLLUP_1M_MAX_SPAN_MS = 8 * 86_400_000;

export const MAX_HISTORY_POINTS = 5_000;
/** How far back the right edge of a rollup answer may be filled from raw readings. */
export const RAW_TAIL_MAX_MS = 2 * 3_600_000;

export type HistoryRequest = {
  deviceId: number;
  channel: string;
  fromTs: number;
  toTs: number;
  maxPoints: number;
  /** force a source (benchmarks, tests); "auto" picks by span */
  source?: HistorySource | "auto";
  /** the raw retention; raw is not chosen for ranges reaching back past it */
  rawRetentionMs?: number;
  nowMs?: number;
};

/** Picks the source for a range: raw for short, 1-minute rollups for medium, 1-hour for long. */
export function chooseHistorySource(fromTs: number, toTs: number, opts: { nowMs?: number; rawRetentionMs?: number } = {}): HistorySource {
  const span = toTs - fromTs;
  const now = opts.nowMs ?? Date.now();
  const retention = opts.rawRetentionMs ?? 14 * 86_400_000;
  if (span <= RAW_MAX_SPAN_MS && fromTs >= now - retention) return "raw";
  if (span <= ROLLUP_1M_MAX_SPAN_MS) return "1m";
  return "1h";
}

const NICE_STEPS_MS = [
  1_000, 2_000, 5_000, 10_000, 15_000, 30_000, 60_000, 120_000, 300_000, 600_000, 900_000, 1_800_000, 3_600_000, 7_200_000,
  10_800_000, 21_600_000, 43_200_000, 86_400_000,
];

/**
 * Bucket size: the smallest "nice" step that keeps the range within maxPoints buckets and is
 * a whole multiple of the source's resolution (a rollup bucket never straddles two chart buckets).
 */
export function chooseBucketMs(spanMs: number, maxPoints: number, source: HistorySource): number {
  const res = SOURCE_RESOLUTION_MS[source];
  const wanted = Math.max(1, Math.ceil(spanMs / Math.max(1, maxPoints)));
  for (const step of NICE_STEPS_MS) if (step >= wanted && step >= res && step % res === 0) return step;
  const days = Math.ceil(wanted / 86_400_000);
  return days * 86_400_000;
}

export type BucketRow = { b: number; t: number; tl: number; mn: number; sm: number; mx: number; n: number };

function rowsOf(result: unknown): BucketRow[] {
  const rows = Array.isArray(result) ? (result[0] as unknown) : result;
  if (!Array.isArray(rows)) return [];
  return rows.map((r: Record<string, unknown>) => ({
    b: Number(r.b),
    t: Number(r.t),
    tl: Number(r.tl),
    mn: Number(r.mn),
    sm: Number(r.sm),
    mx: Number(r.mx),
    n: Number(r.n),
  }));
}

async function rawBuckets(db: Db, deviceId: number, channel: string, t0: number, toTs: number, fromTs: number, bucketMs: number) {
  const res = await db.execute(sql`
    SELECT (ts - ${t0}) DIV ${bucketMs} AS b, MIN(ts) AS t, MAX(ts) AS tl, MIN(value) AS mn, SUM(value) AS sm, MAX(value) AS mx, COUNT(*) AS n
      FROM readings
     WHERE device_id = ${deviceId} AND channel = ${channel} AND ts >= ${fromTs} AND ts <= ${toTs}
     GROUP BY b ORDER BY b`);
  return rowsOf(res);
}

async function rollupBuckets(db: Db, table: "rollup_1m" | "rollup_1h", deviceId: number, channel: string, t0: number, fromTs: number, toTs: number, bucketMs: number) {
  const res = await db.execute(sql`
    SELECT (bucket_ts - ${t0}) DIV ${bucketMs} AS b, MIN(bucket_ts) AS t, MAX(bucket_ts) AS tl, MIN(min) AS mn, SUM(sum) AS sm, MAX(max) AS mx, SUM(count) AS n
      FROM ${sql.raw(table)}
     WHERE device_id = ${deviceId} AND channel = ${channel} AND bucket_ts >= ${fromTs} AND bucket_ts <= ${toTs}
     GROUP BY b ORDER BY b`);
  return rowsOf(res);
}

async function lastReadingTs(db: Db, deviceId: number, channel: string, atOrBeforeTs: number): Promise<number | null> {
  const raw = rowsOfSingle(
    await db.execute(sql`SELECT MAX(ts) AS t FROM readings WHERE device_id = ${deviceId} AND channel = ${channel} AND ts <= ${atOrBeforeTs}`),
  );
  if (raw !== null) return raw;
  const hour = rowsOfSingle(
    await db.execute(sql`SELECT MAX(bucket_ts) AS t FROM rollup_1h WHERE device_id = ${deviceId} AND channel = ${channel} AND bucket_ts <= ${atOrBeforeTs}`),
  );
  return hour;
}

function rowsOfSingle(result: unknown): number | null {
  const rows = Array.isArray(result) ? (result[0] as unknown) : result;
  if (!Array.isArray(rows) || rows.length === 0) return null;
  const t = (rows[0] as Record<string, unknown>).t;
  return t === null || t === undefined ? null : Number(t);
}

/**
 * Reads one channel of one device over [fromTs, toTs] as ≤ maxPoints buckets.
 * From rollups, the minutes or hours the worker has not rolled up yet (the open bucket at the
 * right edge) are filled from the raw readings, so a range ending now has no gap at its end.
 */
export async function getHistory(db: Db, req: HistoryRequest): Promise<HistoryResult> {
  const nowMs = req.nowMs ?? Date.now();
  const maxPoints = Math.min(Math.max(10, Math.floor(req.maxPoints)), MAX_HISTORY_POINTS);
  const source =
    req.source && req.source !== "auto" ? req.source : chooseHistorySource(req.fromTs, req.toTs, { nowMs, rawRetentionMs: req.rawRetentionMs });
  const bucketMs = chooseBucketMs(req.toTs - req.fromTs, maxPoints, source);
  const t0 = Math.floor(req.fromTs / bucketMs) * bucketMs;

  let rows: BucketRow[];
  if (source === "raw") {
    rows = await rawBuckets(db, req.deviceId, req.channel, t0, req.toTs, req.fromTs, bucketMs);
  } else {
    const table = source === "1m" ? "rollup_1m" : "rollup_1h";
    const res = SOURCE_RESOLUTION_MS[source];
    const rollupFrom = Math.floor(req.fromTs / res) * res;
    rows = await rollupBuckets(db, table, req.deviceId, req.channel, t0, rollupFrom, req.toTs, bucketMs);
    // the right edge: buckets newer than the last rolled-up one, from raw readings
    const lastBucketStart = rows.length ? rows[rows.length - 1].tl : rollupFrom - res;
    const tailFrom = Math.max(lastBucketStart + res, req.fromTs);
    // bounded: a few thousand raw rows at most (a worker that fell hours behind shows a gap)
    if (tailFrom <= req.toTs && req.toTs - tailFrom <= Math.max(3 * res, RAW_TAIL_MAX_MS)) {
      const tail = await rawBuckets(db, req.deviceId, req.channel, t0, req.toTs, tailFrom, bucketMs);
      rows = mergeBuckets(rows, tail);
    }
  }

  const points: HistoryPoint[] = rows
    .filter((r) => r.n > 0)
    .map((r) => [source === "raw" ? r.t : t0 + r.b * bucketMs, r.mn, r.sm / r.n, r.mx]);
  const lastTs = points.length === 0 ? await lastReadingTs(db, req.deviceId, req.channel, req.toTs) : null;
  return { deviceId: req.deviceId, channel: req.channel, fromTs: req.fromTs, toTs: req.toTs, source, bucketMs, points, lastTs };
}

/** Joins two bucket lists on their bucket index (min of mins, max of maxes, sums and counts added). */
export function mergeBuckets(a: BucketRow[], b: BucketRow[]): BucketRow[] {
  if (b.length === 0) return a;
  const byIndex = new Map<number, BucketRow>();
  for (const r of a) byIndex.set(r.b, { ...r });
  for (const r of b) {
    const prev = byIndex.get(r.b);
    if (!prev) byIndex.set(r.b, { ...r });
    else byIndex.set(r.b, { b: r.b, t: Math.min(prev.t, r.t), tl: Math.max(prev.tl, r.tl), mn: Math.min(prev.mn, r.mn), mx: Math.max(prev.mx, r.mx), sm: prev.sm + r.sm, n: prev.n + r.n });
  }
  return [...byIndex.values()].sort((x, y) => x.b - y.b);
}

/**
 * Raw readings of several devices newer than `sinceTs` (oldest first), for the live stream's
 * back-fill after a reconnect. Capped per series to the newest `maxPerSeries`.
 */
export async function getRecentReadings(db: Db, deviceIds: number[], sinceTs: number, untilTs: number, maxPerSeries = 1200): Promise<RecentSeries[]> {
  if (deviceIds.length === 0) return [];
  const res = await db.execute(sql`
    SELECT device_id AS d, channel AS c, ts AS t, value AS v FROM readings
     WHERE device_id IN (${sql.join(deviceIds.map((id) => sql`${id}`), sql`, `)}) AND ts > ${sinceTs} AND ts <= ${untilTs}
     ORDER BY device_id, channel, ts`);
  const rows = (Array.isArray(res) ? res[0] : res) as unknown;
  const out = new Map<string, RecentSeries>();
  if (Array.isArray(rows)) {
    for (const r of rows as Array<Record<string, unknown>>) {
      const key = `${r.d}:${r.c}`;
      let s = out.get(key);
      if (!s) out.set(key, (s = { deviceId: Number(r.d), channel: String(r.c), samples: [] }));
      s.samples.push([Number(r.t), Number(r.v)]);
    }
  }
  for (const s of out.values()) if (s.samples.length > maxPerSeries) s.samples = s.samples.slice(-maxPerSeries);
  return [...out.values()];
}

export type HistoryDevice = { id: number; kind: "field_meter" | "th_logger" | "speed_gateway"; pointId: number | null; lineId: number | null; areaId: number | null };

/** The device behind a history request: by device id, or the field meter of a point. */
export async function findHistoryDevice(db: Db, by: { deviceId?: number; pointId?: number }): Promise<HistoryDevice | null> {
  const where = by.deviceId !== undefined ? eq(devices.id, by.deviceId) : by.pointId !== undefined ? and(eq(devices.pointId, by.pointId), eq(devices.kind, "field_meter")) : undefined;
  if (!where) return null;
  const rows = await db
    .select({ id: devices.id, kind: devices.kind, pointId: devices.pointId, lineId: devices.lineId, areaId: devices.areaId })
    .from(devices)
    .where(where)
    .limit(1);
  return rows[0] ?? null;
}
