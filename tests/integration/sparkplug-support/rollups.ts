// Rollups recomputed from the raw readings, for comparing with what the writer kept (the check
// that late and historical readings corrected the 1-minute and 1-hour rollups exactly).
import type mysql from "mysql2/promise";

export type RollupRow = { bucketTs: number; min: number; max: number; count: number; sum: number; sumSq: number };

export async function storedRollups(pool: mysql.Pool, table: "rollup_1m" | "rollup_1h", deviceId: number, channel: string, fromTs: number, toTs: number): Promise<RollupRow[]> {
  const [rows] = await pool.query(
    `SELECT bucket_ts AS bucketTs, min, max, count, sum, sum_sq AS sumSq FROM ${table} WHERE device_id = ? AND channel = ? AND bucket_ts BETWEEN ? AND ? ORDER BY bucket_ts`,
    [deviceId, channel, fromTs, toTs],
  );
  return (rows as RollupRow[]).map((r) => ({ ...r, bucketTs: Number(r.bucketTs), count: Number(r.count) }));
}

export async function recomputedRollups(pool: mysql.Pool, bucketMs: number, deviceId: number, channel: string, fromTs: number, toTs: number): Promise<RollupRow[]> {
  const [rows] = await pool.query(
    `SELECT (ts DIV ?) * ? AS bucketTs, MIN(value) AS min, MAX(value) AS max, COUNT(*) AS count, SUM(value) AS sum, SUM(value * value) AS sumSq
       FROM readings WHERE device_id = ? AND channel = ? AND ts >= ? AND ts < ? GROUP BY bucketTs ORDER BY bucketTs`,
    [bucketMs, bucketMs, deviceId, channel, fromTs, toTs],
  );
  return (rows as RollupRow[]).map((r) => ({ ...r, bucketTs: Number(r.bucketTs), count: Number(r.count) }));
}

/** Compares stored with recomputed: same buckets, counts, min and max exactly, sums to 1e-9 relative. */
export function rollupDifferences(stored: RollupRow[], recomputed: RollupRow[]): string[] {
  const out: string[] = [];
  const byTs = new Map(stored.map((r) => [r.bucketTs, r]));
  if (stored.length !== recomputed.length) out.push(`bucket count ${stored.length} vs ${recomputed.length}`);
  for (const r of recomputed) {
    const s = byTs.get(r.bucketTs);
    if (!s) {
      out.push(`bucket ${r.bucketTs} missing`);
      continue;
    }
    if (s.count !== r.count || s.min !== r.min || s.max !== r.max) out.push(`bucket ${r.bucketTs}: ${JSON.stringify(s)} vs ${JSON.stringify(r)}`);
    for (const k of ["sum", "sumSq"] as const) {
      if (Math.abs(s[k] - r[k]) > 1e-9 * Math.max(1, Math.abs(r[k]))) out.push(`bucket ${r.bucketTs} ${k}: ${s[k]} vs ${r[k]}`);
    }
  }
  return out;
}
