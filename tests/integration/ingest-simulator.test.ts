// The plant simulator's scenario is visible in what is stored: a week
// of backfilled history shows the cold snap drying the Press Hall over hours, the Gravure
// Press 1 unwind neutralizer fouling, the power-unit fault and the silent sensor; raw rows and
// rollups agree. Then the live simulator plays through the real broker and worker, and its odd
// malformed messages are rejected while its readings are stored.
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { ROOT, spawnTs, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";

const H = 3_600_000;
const DAY = 24 * H;
let tdb: TestDatabase;
let stack: IngestStack | null = null;
// the scenario is anchored at the latest 05:00 UTC: the hall's climate follows the time of day, and
// anchored late in the evening the cold snap's first hours fall in the night's dip of the
// "before" days, so "part of the way down a few hours in" would depend on when the test runs
const anchor = Math.floor((Date.now() - 5 * H) / DAY) * DAY + 5 * H;

beforeAll(async () => {
  tdb = await createTestDatabase("ingest_sim", { seed: true });
  // a week at one sample every two minutes per field meter (--thin 120)
  const plant = spawnTs(
    "plant",
    "simulators/plant.ts",
    ["--no-live", "--backfill-days", "7", "--thin", "120", "--full-rate-hours", "0", "--anchor", String(anchor)],
    { ...tdb.env, DATA_DIR: path.join(ROOT, ".data") },
  );
  const code = await plant.exit(170_000);
  if (code !== 0) throw new Error(`backfill failed (${code}):\n${plant.output()}`);
});

afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
});

async function mean(code: string, channel: string, fromH: number, toH: number, fn = "AVG(value)"): Promise<number> {
  const [rows] = await tdb.pool.query(
    `SELECT ${fn} AS v FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.code = ? AND r.channel = ? AND r.ts >= ? AND r.ts < ?`,
    [code, channel, anchor + fromH * H, anchor + toH * H],
  );
  return Number((rows as Array<{ v: number | string | null }>)[0].v);
}

async function count(code: string, fromH: number, toH: number): Promise<number> {
  const [rows] = await tdb.pool.query(
    "SELECT COUNT(*) AS n FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.code = ? AND r.ts >= ? AND r.ts < ?",
    [code, anchor + fromH * H, anchor + toH * H],
  );
  return Number((rows as Array<{ n: number }>)[0].n);
}

describe("backfilled week", () => {
  it("shows the cold snap drying the Press Hall over a few hours", async () => {
    const before = await mean("th-press-hall", "rh_pct", -60, -36);
    const justBefore = await mean("th-press-hall", "rh_pct", -32, -30);
    const firstHours = await mean("th-press-hall", "rh_pct", -29, -27);
    const during = await mean("th-press-hall", "rh_pct", -18, -6);
    expect(before).toBeGreaterThan(38);
    expect(during).toBeLessThan(26);
    // not a step: part of the way down a few hours in. Compared with the two hours before the
    // snap, not with the day before: the weather's day-to-day swings and the night's dip move the
    // hall more than the snap's first hours do (the model at 3,001 daily anchors: the first hours
    // are at least 2.3 % RH under the two hours before, and at least 10.9 over the depth)
    expect(firstHours).toBeLessThan(justBefore - 1);
    expect(firstHours).toBeGreaterThan(during + 3);
    // the same from the hourly rollups the charts read
    const [rows] = await tdb.pool.query(
      `SELECT MIN(sum / count) AS lo, MAX(sum / count) AS hi FROM rollup_1h r JOIN devices d ON d.id = r.device_id
        WHERE d.code = 'th-press-hall' AND r.channel = 'rh_pct' AND r.bucket_ts >= ?`,
      [anchor - 7 * DAY],
    );
    const { lo, hi } = (rows as Array<{ lo: number; hi: number }>)[0];
    expect(hi - lo).toBeGreaterThan(15);
  });

  it("shows the Gravure Press 1 infeed neutralizer fouling while the hall's humidity stays the same", async () => {
    // two stretches before the cold snap, soon after its last cleaning and days later; the
    // meters before (unwind) and after (infeed) the fouling bar show its real reduction
    // falling (simulators/plant-model.ts: after = before × (1 − η) + pickup, η about 0.89 → 0.34)
    const reduction = async (fromH: number, toH: number) =>
      1 - (await mean("fm-gravure-1-infeed", "charge_kv", fromH, toH, "AVG(ABS(value))")) / (await mean("fm-gravure-1-unwind", "charge_kv", fromH, toH, "AVG(ABS(value))"));
    const early = await reduction(-6.4 * 24, -5.9 * 24);
    const late = await reduction(-3 * 24, -2.5 * 24);
    const rhEarly = await mean("th-press-hall", "rh_pct", -6.4 * 24, -5.9 * 24);
    const rhLate = await mean("th-press-hall", "rh_pct", -3 * 24, -2.5 * 24);
    // the weather's slow swings move the hall by up to 5.1 % RH between these two half-days,
    // depending on the date the scenario is anchored at (the model evaluated at 3,001 daily
    // anchors: median 1.4, 90th percentile 3.3, largest 5.1); a change the fouling could hide
    // behind would be far larger (the cold snap takes the hall down by more than 12 %)
    expect(Math.abs(rhEarly - rhLate)).toBeLessThan(6);
    expect(early).toBeGreaterThan(0.7);
    expect(late).toBeLessThan(0.45);
  });

  it("shows the power-unit fault on Flexo Press 2 and the silent sensor", async () => {
    // what the print-exit bar takes off the charge the unwind meter reads before it: most of it
    // normally, next to nothing while its power unit is down. Not the print exit's charge alone:
    // the cold snap deepening, a line stop in either stretch and the bars' cleaning week move
    // that by more than the fault does on some dates (the model at 3,001 daily anchors: fault ÷
    // normal from 1.0 up; this reduction at least 0.73 before and at most 0.11 during)
    const reduction = async (fromH: number, toH: number) =>
      1 - (await mean("fm-flexo-2-print-exit", "charge_kv", fromH, toH, "AVG(ABS(value))")) / (await mean("fm-flexo-2-unwind", "charge_kv", fromH, toH, "AVG(ABS(value))"));
    expect(await reduction(-9, -7.5)).toBeGreaterThan(0.5);
    expect(await reduction(-5.9, -4.6)).toBeLessThan(0.2);
    expect(await count("fm-slitter-1-knife-exit", -9.9, -8.1)).toBe(0);
    expect(await count("fm-slitter-1-knife-exit", -12, -10.1)).toBeGreaterThan(20);
  });

  it("keeps raw rows and rollups consistent", async () => {
    const [[raw], [hour], [minute]] = await Promise.all([
      tdb.pool.query("SELECT COUNT(*) AS n FROM readings"),
      tdb.pool.query("SELECT SUM(count) AS n FROM rollup_1h"),
      tdb.pool.query("SELECT SUM(count) AS n FROM rollup_1m"),
    ]);
    const n = Number((raw as Array<{ n: number }>)[0].n);
    expect(n).toBeGreaterThan(60_000);
    expect(Number((hour as Array<{ n: string }>)[0].n)).toBe(n);
    expect(Number((minute as Array<{ n: string }>)[0].n)).toBe(n);
  });
});

describe("live simulator", () => {
  it("streams through the broker and worker; its malformed messages are rejected and the rest stored", async () => {
    stack = await startIngestStack("sim", tdb.env);
    // the live part plays the last ten minutes before now, which the backfill (anchored earlier)
    // also covered at one sample every two minutes
    const nowH = (Date.now() - anchor) / H;
    const before = await count("fm-gravure-1-unwind", nowH - 0.25, nowH + 1);
    const plant = spawnTs(
      "plant",
      "simulators/plant.ts",
      ["--backfill-days", "0", "--from=-10m", "--speed", "60", "--until", "now", "--malformed-every-s", "20", "--anchor", String(anchor)],
      { ...stack.env, DATA_DIR: path.join(ROOT, ".data") },
    );
    expect(await plant.exit(60_000), plant.output()).toBe(0);
    const s = await waitFor("the worker to store the stream", async () => {
      const st = await stack!.workerStats();
      return st.buffered.readings === 0 && st.accepted.readings > 10_000 ? st : null;
    }, 60_000);
    expect(s.rejected.total).toBeGreaterThanOrEqual(20);
    expect(Object.keys(s.rejected.byReason).length).toBeGreaterThanOrEqual(4);
    // ten minutes at 1 Hz where the backfill had one sample every two minutes
    expect(await count("fm-gravure-1-unwind", nowH - 0.25, nowH + 1)).toBeGreaterThan(before + 500);
    // the backfill's samples in that span were sent again and stored once
    expect(s.committed.duplicates).toBeGreaterThan(0);
  });
});
