// Rollup aggregation (min, max, count, sum, sum of squares per minute and hour) and in-batch
// de-duplication, checked against values worked out by hand.
import { describe, expect, it } from "vitest";
import { aggregateRollups, dedupeRows, HOUR_MS, MINUTE_MS, type ReadingRow } from "@/db/queries/readings-write";

const T0 = Date.UTC(2026, 0, 15, 10, 0, 0);

describe("aggregateRollups", () => {
  const rows: ReadingRow[] = [
    { deviceId: 2, channel: "charge_kv", ts: T0 + 1000, value: -2 },
    { deviceId: 2, channel: "charge_kv", ts: T0 + 59_999, value: 4 },
    { deviceId: 2, channel: "charge_kv", ts: T0 + 60_000, value: 1 },
    { deviceId: 1, channel: "rh_pct", ts: T0 + 5000, value: 40 },
  ];
  it("buckets by minute with exact statistics", () => {
    const m = aggregateRollups(rows, MINUTE_MS);
    // sorted by device, channel, bucket
    expect(m.map((a) => [a.deviceId, a.channel, a.bucketTs])).toEqual([
      [1, "rh_pct", T0],
      [2, "charge_kv", T0],
      [2, "charge_kv", T0 + MINUTE_MS],
    ]);
    // -2 and 4: min -2, max 4, count 2, sum 2, sum of squares 4 + 16 = 20
    expect(m[1]).toMatchObject({ min: -2, max: 4, count: 2, sum: 2, sumSq: 20 });
  });
  it("buckets by hour", () => {
    const h = aggregateRollups(rows, HOUR_MS).find((a) => a.deviceId === 2)!;
    // -2, 4, 1: sum 3, sum of squares 21; mean 1, population variance 21/3 - 1 = 6
    expect(h).toMatchObject({ bucketTs: T0, min: -2, max: 4, count: 3, sum: 3, sumSq: 21 });
  });
});

describe("dedupeRows", () => {
  it("keeps the first of repeated (device, channel, ts) keys", () => {
    const out = dedupeRows([
      { deviceId: 1, channel: "temp_c", ts: T0, value: 20 },
      { deviceId: 1, channel: "temp_c", ts: T0, value: 99 },
      { deviceId: 1, channel: "rh_pct", ts: T0, value: 40 },
    ]);
    expect(out).toEqual([
      { deviceId: 1, channel: "temp_c", ts: T0, value: 20 },
      { deviceId: 1, channel: "rh_pct", ts: T0, value: 40 },
    ]);
  });
});
