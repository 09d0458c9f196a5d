// Daily partitions of the raw readings table: created ahead of time, dropped past retention.
// Splitting p_future (always empty once days ahead exist) is cheap; dropping a partition is
// instant compared with deleting millions of rows.
import type mysql from "mysql2/promise";
import { DAY_MS } from "../lib/vocabulary";


function partitionName(dayStartMs: number): string {
  const d = new Date(dayStartMs);
  const pad = (n: number) => String(n).padStart(2, "0");
  return `p${d.getUTCFullYear()}${pad(d.getUTCMonth() + 1)}${pad(d.getUTCDate())}`;
}

type PartitionRow = { name: string; bound: string | null };

async function listPartitions(pool: mysql.Pool): Promise<PartitionRow[]> {
  const [rows] = await pool.query(
    `SELECT PARTITION_NAME AS name, PARTITION_DESCRIPTION AS bound
       FROM information_schema.PARTITIONS
      WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'readings' AND PARTITION_NAME IS NOT NULL
      ORDER BY PARTITION_ORDINAL_POSITION`,
  );
  return rows as PartitionRow[];
}

export type PartitionReport = { created: string[]; dropped: string[] };

/**
 * Makes sure a daily partition exists for every day from `fromMs` (default: now minus the
 * retention) to `daysAhead` days past now, and drops partitions whose whole day is older than
 * the retention. Safe to run repeatedly and from several processes (errors from a concurrent
 * run are reported, not thrown, when the partition already exists).
 */
export async function maintainPartitions(
  pool: mysql.Pool,
  opts: { nowMs?: number; retentionDays: number; daysAhead?: number; fromMs?: number },
): Promise<PartitionReport> {
  const nowMs = opts.nowMs ?? Date.now();
  const daysAhead = opts.daysAhead ?? 3;
  const today = Math.floor(nowMs / DAY_MS) * DAY_MS;
  const oldestKept = today - opts.retentionDays * DAY_MS;
  const first = Math.min(opts.fromMs !== undefined ? Math.floor(opts.fromMs / DAY_MS) * DAY_MS : oldestKept, oldestKept);
  const report: PartitionReport = { created: [], dropped: [] };

  const existing = await listPartitions(pool);
  const bounds = new Set(existing.map((p) => Number(p.bound)).filter((b) => Number.isFinite(b)));
  const highestBound = Math.max(0, ...[...bounds]);

  // new partitions: each day's partition holds ts < next day's start
  const toCreate: number[] = [];
  for (let day = first; day <= today + daysAhead * DAY_MS; day += DAY_MS) {
    const upper = day + DAY_MS;
    if (upper > highestBound && !bounds.has(upper)) toCreate.push(day);
  }
  if (toCreate.length > 0) {
    const defs = toCreate.map((day) => `PARTITION ${partitionName(day)} VALUES LESS THAN (${day + DAY_MS})`);
    defs.push("PARTITION p_future VALUES LESS THAN MAXVALUE");
    await pool.query(`ALTER TABLE readings REORGANIZE PARTITION p_future INTO (${defs.join(", ")})`);
    report.created.push(...toCreate.map(partitionName));
  }

  // drop whole days older than the retention (never p_start or p_future)
  const toDrop = existing
    .filter((p) => p.name !== "p_start" && p.name !== "p_future")
    .filter((p) => Number(p.bound) <= oldestKept)
    .map((p) => p.name);
  if (toDrop.length > 0) {
    await pool.query(`ALTER TABLE readings DROP PARTITION ${toDrop.join(", ")}`);
    report.dropped.push(...toDrop);
  }
  return report;
}
