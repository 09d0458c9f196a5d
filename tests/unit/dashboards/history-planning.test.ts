// How the history read model plans a query (db/queries/history.ts, the pure parts): which
// table answers a range and how wide the chart's buckets are.
import { describe, expect, it } from "vitest";
import { chooseBucketMs, chooseHistorySource, mergeBuckets, type BucketRow } from "@/db/queries/history";

const now = 1_767_225_600_000;
const H = 3_600_000;
const D = 24 * H;

describe("source", () => {
  it("reads raw for short ranges, 1-minute rollups for medium, 1-hour for long", () => {
    expect(chooseHistorySource(now - 15 * 60_000, now, { nowMs: now })).toBe("raw");
    expect(chooseHistorySource(now - 6 * H, now, { nowMs: now })).toBe("raw");
    expect(chooseHistorySource(now - 8 * H, now, { nowMs: now })).toBe("1m");
    expect(chooseHistorySource(now - 7 * D, now, { nowMs: now })).toBe("1m");
    expect(chooseHistorySource(now - 30 * D, now, { nowMs: now })).toBe("1h");
  });
  it("does not ask for raw readings older than the raw retention", () => {
    expect(chooseHistorySource(now - 20 * D, now - 20 * D + H, { nowMs: now, rawRetentionMs: 14 * D })).toBe("1m");
  });
});

describe("bucket size", () => {
  it("keeps within the point budget on nice steps that are whole rollup buckets", () => {
    expect(chooseBucketMs(15 * 60_000, 1000, "raw")).toBe(1000);
    expect(chooseBucketMs(7 * D, 1000, "1m")).toBe(15 * 60_000); // 604.8 s wanted → 15 min
    expect(chooseBucketMs(30 * D, 1000, "1h")).toBe(H);
    expect(chooseBucketMs(400 * D, 1000, "1h")).toBe(12 * H);
    for (const [span, src, res] of [[7 * D, "1m", 60_000], [30 * D, "1h", H]] as const) {
      const b = chooseBucketMs(span, 1000, src);
      expect(b % res).toBe(0);
      expect(span / b).toBeLessThanOrEqual(1000);
    }
  });
});

describe("joining rollup buckets with the raw tail", () => {
  it("combines a bucket present in both: min of mins, max of maxes, sums and counts added", () => {
    const a: BucketRow[] = [{ b: 0, t: 0, tl: 60_000, mn: 1, sm: 10, mx: 5, n: 4 }];
    const b: BucketRow[] = [
      { b: 0, t: 120_000, tl: 130_000, mn: -2, sm: 3, mx: 4, n: 2 },
      { b: 1, t: 900_000, tl: 900_000, mn: 7, sm: 7, mx: 7, n: 1 },
    ];
    expect(mergeBuckets(a, b)).toEqual([
      { b: 0, t: 0, tl: 130_000, mn: -2, sm: 13, mx: 5, n: 6 },
      { b: 1, t: 900_000, tl: 900_000, mn: 7, sm: 7, mx: 7, n: 1 },
    ]);
  });
});
