// Retention: raw readings live in daily partitions (db/partitions.ts). The worker runs this at
// start and every INGEST_MAINTENANCE_INTERVAL_MS: partitions for the coming days are created
// ahead of time, and whole days older than RAW_RETENTION_DAYS are dropped (instant, unlike
// DELETE). Rollups are never touched: charts over a year read them. Rejections are trimmed too.
import type mysql from "mysql2/promise";
import type { Db } from "../db/client";
import { trimRejections } from "../db/queries/ingest-diagnostics";
import { maintainPartitions, type PartitionReport } from "../db/partitions";
import { DAY_MS } from "../lib/vocabulary";

export const PARTITION_DAYS_AHEAD = 3;

export async function runRetention(
  pool: mysql.Pool,
  db: Db,
  opts: { retentionDays: number; nowMs?: number; rejectionsKept?: number },
): Promise<PartitionReport> {
  const report = await maintainPartitions(pool, { retentionDays: opts.retentionDays, daysAhead: PARTITION_DAYS_AHEAD, nowMs: opts.nowMs });
  await trimRejections(db, opts.rejectionsKept);
  return report;
}

/** The oldest reading time the worker still accepts into the raw table. */
export function oldestAcceptedMs(nowMs: number, retentionDays: number): number {
  return nowMs - retentionDays * DAY_MS;
}
