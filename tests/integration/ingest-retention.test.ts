// Retention: raw readings older than RAW_RETENTION_DAYS are dropped by whole daily
// partitions while the rollups stay; the scheduled job also creates partitions ahead of time.
// The worker runs the job at start (and every INGEST_MAINTENANCE_INTERVAL_MS).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { writeReadings } from "../../db/queries/readings-write";
import { runRetention } from "../../ingest/retention";
import { startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";

const DAY = 86_400_000;
let tdb: TestDatabase;
let stack: IngestStack | null = null;
const now = Date.now();

beforeAll(async () => {
  tdb = await createTestDatabase("ingest_retention", { seed: true });
});
afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
});

async function partitions(): Promise<Array<{ name: string; bound: number | null }>> {
  const [rows] = await tdb.pool.query(
    `SELECT PARTITION_NAME AS name, PARTITION_DESCRIPTION AS bound FROM information_schema.PARTITIONS
      WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'readings' ORDER BY PARTITION_ORDINAL_POSITION`,
  );
  return (rows as Array<{ name: string; bound: string }>).map((r) => ({ name: r.name, bound: r.bound === "MAXVALUE" ? null : Number(r.bound) }));
}

async function n(sql: string, params: unknown[]): Promise<number> {
  const [rows] = await tdb.pool.query(sql, params);
  return Number((rows as Array<{ n: number | string | null }>)[0].n ?? 0);
}

describe("retention", () => {
  it("drops raw days past the retention by partition at worker start and keeps their rollups", async () => {
    const old = now - 20 * DAY;
    const kept = now - 13 * DAY;
    const rows = [old, old + 60_000, kept, kept + 60_000, now - 3_600_000].map((ts, i) => ({ deviceId: 1, channel: "charge_kv" as const, ts, value: i + 0.5 }));
    await writeReadings(tdb.pool, rows);
    const oldDay = Math.floor(old / DAY) * DAY;
    expect((await partitions()).some((p) => p.bound === oldDay + DAY)).toBe(true);

    stack = await startIngestStack("retention", tdb.env, { env: { RAW_RETENTION_DAYS: "14" } });
    await waitFor("the worker's retention job", async () => !(await partitions()).some((p) => p.bound === oldDay + DAY), 20_000);

    expect(await n("SELECT COUNT(*) AS n FROM readings WHERE ts < ?", [now - 14 * DAY])).toBe(0);
    expect(await n("SELECT COUNT(*) AS n FROM readings WHERE ts IN (?, ?)", [kept, kept + 60_000])).toBe(2);
    // rollups are never dropped: the old day's minute and hour buckets are still there
    expect(await n("SELECT SUM(count) AS n FROM rollup_1m WHERE bucket_ts < ?", [now - 14 * DAY])).toBe(2);
    expect(await n("SELECT SUM(count) AS n FROM rollup_1h WHERE bucket_ts < ?", [now - 14 * DAY])).toBe(2);
  });

  it("creates the coming days' partitions ahead of time when the job runs on a later day", async () => {
    const later = now + 10 * DAY;
    const report = await runRetention(tdb.pool, tdb.db, { retentionDays: 14, nowMs: later });
    const dayAfterAhead = Math.floor(later / DAY) * DAY + 3 * DAY;
    const parts = await partitions();
    expect(report.created.length).toBeGreaterThanOrEqual(10);
    expect(parts.some((p) => p.bound === dayAfterAhead + DAY)).toBe(true);
    expect(parts[parts.length - 1].name).toBe("p_future");
    // and everything older than 14 days before that later day has gone
    expect(parts.filter((p) => p.bound !== null && p.name !== "p_start").every((p) => p.bound! > Math.floor(later / DAY) * DAY - 14 * DAY)).toBe(true);
    expect(report.dropped.length).toBeGreaterThan(0);
  });
});
