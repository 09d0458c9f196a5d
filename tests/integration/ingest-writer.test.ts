// The idempotent writer on its own against the real MariaDB (db/queries/readings-write.ts):
// repeats inside one batch, batches re-sent, and several writers racing over overlapping
// readings all leave one row per (device, channel, ts) and rollups equal to the raw aggregate.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { writeReadings, type ReadingRow } from "../../db/queries/readings-write";

let tdb: TestDatabase;
const T0 = Math.floor((Date.now() - 2 * 3_600_000) / 3_600_000) * 3_600_000;

beforeAll(async () => {
  tdb = await createTestDatabase("ingest_writer");
});
afterAll(async () => {
  await tdb?.close();
});

async function rollupMismatches(deviceIds: number[]): Promise<number> {
  let bad = 0;
  for (const [table, bucket] of [["rollup_1m", 60_000], ["rollup_1h", 3_600_000]] as const) {
    const [rows] = await tdb.pool.query(
      `SELECT COUNT(*) AS n FROM (
         SELECT device_id, channel, (ts DIV ${bucket}) * ${bucket} AS b, COUNT(*) AS c, MIN(value) AS mn, MAX(value) AS mx, SUM(value) AS s
           FROM readings WHERE device_id IN (?) GROUP BY device_id, channel, b) raw
       LEFT JOIN ${table} r ON r.device_id = raw.device_id AND r.channel = raw.channel AND r.bucket_ts = raw.b
       WHERE r.count IS NULL OR r.count <> raw.c OR r.min <> raw.mn OR r.max <> raw.mx OR ABS(r.sum - raw.s) > 1e-6`,
      [deviceIds],
    );
    bad += Number((rows as Array<{ n: number }>)[0].n);
    const [extra] = await tdb.pool.query(`SELECT COALESCE(SUM(count), 0) AS n FROM ${table} WHERE device_id IN (?)`, [deviceIds]);
    const [raw] = await tdb.pool.query("SELECT COUNT(*) AS n FROM readings WHERE device_id IN (?)", [deviceIds]);
    if (Number((extra as Array<{ n: string }>)[0].n) !== Number((raw as Array<{ n: number }>)[0].n)) bad++;
  }
  return bad;
}

describe("writeReadings", () => {
  it("stores a reading repeated within one batch once (the first value wins)", async () => {
    const rows: ReadingRow[] = [
      { deviceId: 901, channel: "temp_c", ts: T0 + 1000, value: 20 },
      { deviceId: 901, channel: "temp_c", ts: T0 + 1000, value: 99 },
      { deviceId: 901, channel: "rh_pct", ts: T0 + 1000, value: 40 },
    ];
    const res = await writeReadings(tdb.pool, rows);
    expect(res.inserted).toHaveLength(2);
    expect(res.duplicates).toBe(1);
    const [stored] = await tdb.pool.query("SELECT channel, value FROM readings WHERE device_id = 901 ORDER BY channel");
    expect(stored).toEqual([
      { channel: "rh_pct", value: 40 },
      { channel: "temp_c", value: 20 },
    ]);
    expect(await rollupMismatches([901])).toBe(0);
  });

  it("keeps rows and rollups exact when writers race over overlapping batches", async () => {
    const devices = [911, 912];
    // 4 writers, each writing overlapping windows of the same readings several times
    const make = (from: number, n: number): ReadingRow[] =>
      devices.flatMap((d) => Array.from({ length: n }, (_, i) => ({ deviceId: d, channel: "charge_kv" as const, ts: T0 + (from + i) * 1000, value: Math.sin(from + i) * 10 })));
    const batches = [make(0, 3000), make(1000, 3000), make(2000, 3000), make(0, 5000), make(2500, 1000)];
    const results = await Promise.all([...batches, ...batches].map((b) => writeReadings(tdb.pool, b)));
    const inserted = results.reduce((a, r) => a + r.inserted.length, 0);
    const [count] = await tdb.pool.query("SELECT COUNT(*) AS n FROM readings WHERE device_id IN (?)", [devices]);
    expect(Number((count as Array<{ n: number }>)[0].n)).toBe(2 * 5000);
    // every stored row was reported inserted by exactly one writer
    expect(inserted).toBe(2 * 5000);
    expect(await rollupMismatches(devices)).toBe(0);
  });
});
