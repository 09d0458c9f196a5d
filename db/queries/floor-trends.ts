// The Floor's and the wallboard's small trends: the last 15 minutes of every sensor as 1-minute
// means from the rollups (`rollup_1m`, which gains every inserted reading in the same
// transaction, so the open minute is there too), plus the exact newest reading of each series.
// Reading the rollups costs ~15 rows per series instead of ~900 raw readings bucketed per call,
// and keeps the answer small however many sensors a plant adds; the live stream then appends
// the 1 Hz readings on the page.
import { sql } from "drizzle-orm";
import type { Db } from "../client";
import type { RecentSeries } from "../../lib/views/floor";
import { CHANNELS } from "../../lib/contract/readings-payload";

export const ROLLUP_MINUTE_MS = 60_000;

type Row = Record<string, unknown>;

function rowsOf(res: unknown): Row[] {
  const rows = (Array.isArray(res) ? res[0] : res) as unknown;
  return Array.isArray(rows) ? (rows as Row[]) : [];
}

/** A trend mean kept to 4 significant decimals: enough for a sparkline, a third of the bytes. */
export function roundTrendValue(v: number): number {
  return Math.round(v * 1000) / 1000;
}

/**
 * Minute means over [nowTs - trendMs, nowTs] (stamped at each minute's start), followed by the
 * exact newest reading when it is newer than the last minute's start.
 */
export async function getFloorTrends(db: Db, deviceIds: number[], nowTs: number, trendMs: number): Promise<RecentSeries[]> {
  if (deviceIds.length === 0) return [];
  const fromTs = Math.floor((nowTs - trendMs) / ROLLUP_MINUTE_MS) * ROLLUP_MINUTE_MS;
  const ids = sql.join(deviceIds.map((id) => sql`${id}`), sql`, `);
  // every channel named: the key is (device, channel, minute), and with the devices alone
  // MariaDB reads each device's whole kept history (1.5 M rows for the demo plant, 250 ms)
  // instead of 15 rows per series
  const channels = sql.join(CHANNELS.map((c) => sql`${c}`), sql`, `);
  const [minuteRes, latestRes] = await Promise.all([
    db.execute(sql`
      SELECT device_id AS d, channel AS c, bucket_ts AS t, sum / count AS v
        FROM rollup_1m WHERE device_id IN (${ids}) AND channel IN (${channels}) AND bucket_ts >= ${fromTs} AND bucket_ts <= ${nowTs} AND count > 0
       ORDER BY device_id, channel, bucket_ts`),
    // newest reading per series: MAX(ts) per (device, channel) over the whole plant is a loose
    // scan of the primary key (one dive per series); a device list there (turned into a table
    // past 1,000 ids) would make it read every row of the window instead — 10× slower at 1,000
    // points. The devices not asked for are dropped below.
    db.execute(sql`
      SELECT r.device_id AS d, r.channel AS c, r.ts AS t, r.value AS v FROM readings r
        JOIN (SELECT device_id, channel, MAX(ts) AS mt FROM readings
               WHERE ts >= ${fromTs} AND ts <= ${nowTs} GROUP BY device_id, channel) m
          ON r.device_id = m.device_id AND r.channel = m.channel AND r.ts = m.mt`),
  ]);
  const out = new Map<string, RecentSeries>();
  for (const r of rowsOf(minuteRes)) {
    const key = `${r.d}:${r.c}`;
    let s = out.get(key);
    if (!s) out.set(key, (s = { deviceId: Number(r.d), channel: String(r.c), samples: [] }));
    s.samples.push([Number(r.t), roundTrendValue(Number(r.v))]);
  }
  const wanted = new Set(deviceIds);
  for (const r of rowsOf(latestRes)) {
    if (!wanted.has(Number(r.d))) continue;
    const key = `${r.d}:${r.c}`;
    let s = out.get(key);
    if (!s) out.set(key, (s = { deviceId: Number(r.d), channel: String(r.c), samples: [] }));
    const ts = Number(r.t);
    const last = s.samples[s.samples.length - 1];
    // the exact newest reading ends the series (it replaces a minute mean stamped at the same time)
    if (last && last[0] === ts) last[1] = Number(r.v);
    else if (!last || last[0] < ts) s.samples.push([ts, Number(r.v)]);
  }
  return [...out.values()];
}
