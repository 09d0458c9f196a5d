// The history read model against the real MariaDB: which table answers, and whether its
// buckets agree with aggregates computed here, independently, from the rows written.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { getHistory, getRecentReadings, findHistoryDevice } from "@/db/queries/history";

let tdb: TestDatabase;
let deviceId: number;
let otherDeviceId: number;
const MIN = 60_000;
const H = 60 * MIN;
const D = 24 * H;
// a fixed "now" on a whole hour, inside the partitions the helper created (40 days back)
const now = Math.floor(Date.now() / H) * H;
const rawFrom = now - 3 * H;
const rollupFrom = now - 10 * D;
/** rollups exist up to here; the last 10 minutes are raw only (the worker has not rolled them up) */
const rollupUntil = now - 10 * MIN;
const SPIKE_TS = now - 5 * D + 17 * MIN + 23_000;

const value = (ts: number) => Number((Math.sin(ts / 97_000) * 5 + ((ts / 1000) % 7) * 0.1).toFixed(3));

type Agg = { min: number; max: number; count: number; sum: number };
const aggregate = (vals: number[]): Agg => ({ min: Math.min(...vals), max: Math.max(...vals), count: vals.length, sum: vals.reduce((a, b) => a + b, 0) });

beforeAll(async () => {
  tdb = await createTestDatabase("dashboards_history", { seed: true });
  const fm = await findHistoryDevice(tdb.db, { pointId: 1 });
  deviceId = fm!.id;
  otherDeviceId = (await findHistoryDevice(tdb.db, { pointId: 2 }))!.id;
  // raw: 3 h at 1 Hz
  const raw: Array<[number, string, number, number]> = [];
  for (let t = rawFrom; t < now; t += 1000) raw.push([deviceId, "charge_kv", t, value(t)]);
  for (let t = now - 20 * MIN; t < now; t += 1000) raw.push([otherDeviceId, "charge_kv", t, -value(t)]);
  for (let i = 0; i < raw.length; i += 5000) await tdb.pool.query("INSERT INTO readings (device_id, channel, ts, value) VALUES ?", [raw.slice(i, i + 5000)]);
  // 1-minute rollups for 10 days, from a 1 Hz signal with one spike
  const m1: unknown[][] = [];
  for (let m = rollupFrom; m < rollupUntil; m += MIN) {
    const vals: number[] = [];
    for (let t = m; t < m + MIN; t += 1000) vals.push(t === SPIKE_TS ? 44 : value(t));
    const a = aggregate(vals);
    m1.push([deviceId, "charge_kv", m, a.min, a.max, a.count, a.sum, vals.reduce((s, v) => s + v * v, 0)]);
  }
  for (let i = 0; i < m1.length; i += 5000) {
    await tdb.pool.query("INSERT INTO rollup_1m (device_id, channel, bucket_ts, min, max, count, sum, sum_sq) VALUES ?", [m1.slice(i, i + 5000)]);
  }
  // 1-hour rollups summed from the minutes
  await tdb.pool.query(
    `INSERT INTO rollup_1h (device_id, channel, bucket_ts, min, max, count, sum, sum_sq)
     SELECT device_id, channel, bucket_ts DIV 3600000 * 3600000, MIN(min), MAX(max), SUM(count), SUM(sum), SUM(sum_sq)
       FROM rollup_1m GROUP BY device_id, channel, bucket_ts DIV 3600000`,
  );
});

afterAll(async () => {
  await tdb?.close();
});

describe("short ranges read raw readings", () => {
  it("buckets an hour into ≤ maxPoints buckets whose min/mean/max match the rows", async () => {
    const fromTs = now - H + 500;
    const r = await getHistory(tdb.db, { deviceId, channel: "charge_kv", fromTs, toTs: now, maxPoints: 200, nowMs: now });
    expect(r.source).toBe("raw");
    expect(r.bucketMs).toBe(30_000); // 3600 s / 200 = 18 s → the next nice step
    expect(r.points.length).toBeGreaterThan(100);
    expect(r.points.length).toBeLessThanOrEqual(200);
    const t0 = Math.floor(fromTs / r.bucketMs) * r.bucketMs;
    for (const [ts, mn, mean, mx] of r.points.slice(0, 20)) {
      const b = Math.floor((ts - t0) / r.bucketMs);
      const vals: number[] = [];
      for (let t = Math.ceil(fromTs / 1000) * 1000; t <= now && t < rawFrom + 3 * H; t += 1000) {
        if (t >= rawFrom && Math.floor((t - t0) / r.bucketMs) === b) vals.push(value(t));
      }
      const a = aggregate(vals);
      expect(mn).toBeCloseTo(a.min, 9);
      expect(mx).toBeCloseTo(a.max, 9);
      expect(mean).toBeCloseTo(a.sum / a.count, 9);
    }
  });

  it("returns single readings when the range is shorter than maxPoints seconds", async () => {
    const r = await getHistory(tdb.db, { deviceId, channel: "charge_kv", fromTs: now - 5 * MIN, toTs: now - 1000, maxPoints: 1000, nowMs: now });
    expect(r.source).toBe("raw");
    expect(r.points).toHaveLength(300);
    expect(r.points[0]).toEqual([now - 5 * MIN, value(now - 5 * MIN), value(now - 5 * MIN), value(now - 5 * MIN)]);
  });
});

describe("long ranges read rollups and keep the spikes", () => {
  it("answers 7 days from the 1-minute rollups; the one-second spike is the top of its bucket", async () => {
    const r = await getHistory(tdb.db, { deviceId, channel: "charge_kv", fromTs: now - 7 * D, toTs: now, maxPoints: 1000, nowMs: now });
    expect(r.source).toBe("1m");
    expect(r.bucketMs).toBe(15 * MIN);
    expect(r.points.length).toBeLessThanOrEqual(1000);
    const top = Math.max(...r.points.map((p) => p[3]));
    expect(top).toBe(44);
    const spikeBucket = r.points.find((p) => p[3] === 44)!;
    expect(spikeBucket[0]).toBeLessThanOrEqual(SPIKE_TS);
    expect(spikeBucket[0] + r.bucketMs).toBeGreaterThan(SPIKE_TS);
    expect(spikeBucket[2]).toBeLessThan(10); // the mean hides it; the band does not
  });

  it("fills the minutes not yet rolled up from raw readings, so a range ending now has no gap", async () => {
    const r = await getHistory(tdb.db, { deviceId, channel: "charge_kv", fromTs: now - 2 * D, toTs: now - 1000, maxPoints: 2000, nowMs: now, source: "1m" });
    const last = r.points[r.points.length - 1];
    expect(last[0]).toBeGreaterThanOrEqual(rollupUntil);
    // the raw tail's buckets agree with the raw rows
    const t0 = Math.floor((now - 2 * D) / r.bucketMs) * r.bucketMs;
    const tailVals: number[] = [];
    for (let t = last[0]; t < last[0] + r.bucketMs && t <= now - 1000; t += 1000) if (Math.floor((t - t0) / r.bucketMs) === Math.floor((last[0] - t0) / r.bucketMs)) tailVals.push(value(t));
    expect(last[3]).toBeCloseTo(Math.max(...tailVals), 9);
  });

  it("answers 30 days from the 1-hour rollups with the same extremes", async () => {
    const r = await getHistory(tdb.db, { deviceId, channel: "charge_kv", fromTs: now - 30 * D, toTs: now, maxPoints: 1000, nowMs: now });
    expect(r.source).toBe("1h");
    expect(Math.max(...r.points.map((p) => p[3]))).toBe(44);
    expect(r.points.length).toBeLessThanOrEqual(10 * 24 + 2);
  });
});

describe("empty ranges and the live stream's helpers", () => {
  it("says when the sensor last sent something when the range is empty", async () => {
    const r = await getHistory(tdb.db, { deviceId: otherDeviceId, channel: "charge_kv", fromTs: now - 2 * H, toTs: now - H, maxPoints: 500, nowMs: now });
    expect(r.points).toEqual([]);
    expect(r.lastTs).toBeNull(); // nothing before the range
    const later = await getHistory(tdb.db, { deviceId: otherDeviceId, channel: "charge_kv", fromTs: now + 1000, toTs: now + 60_000, maxPoints: 500, nowMs: now + 60_000 });
    expect(later.points).toEqual([]);
    expect(later.lastTs).toBe(now - 1000);
  });

  it("back-fills only readings after the given time, per series, oldest first", async () => {
    const since = now - 30_000;
    const series = await getRecentReadings(tdb.db, [deviceId, otherDeviceId], since, now);
    expect(series).toHaveLength(2);
    for (const s of series) {
      expect(s.samples).toHaveLength(29);
      expect(s.samples[0][0]).toBe(since + 1000);
      expect(s.samples.every((x, i) => i === 0 || x[0] > s.samples[i - 1][0])).toBe(true);
    }
  });
});
