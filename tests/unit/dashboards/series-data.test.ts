// From history buckets and live samples to chart columns (components/charts/series-data.ts).
import { describe, expect, it } from "vitest";
import { alignMeans, gapThresholdMs, hasSpread, mergeHistoryAndLive, symmetricRange, toColumns, type Bucket } from "@/components/charts/series-data";

const t0 = 1_767_225_600_000;

describe("chart columns", () => {
  it("uses history up to the first live sample, then live samples, inside the window", () => {
    const history: Bucket[] = [
      [t0, 1, 2, 3],
      [t0 + 1000, 1, 2, 3],
      [t0 + 2000, 9, 9, 9],
    ];
    const merged = mergeHistoryAndLive(history, [[t0 + 2000, 5], [t0 + 3000, 6], [t0 + 99_000, 7]], t0 + 500, t0 + 10_000);
    expect(merged).toEqual([
      [t0 + 1000, 1, 2, 3],
      [t0 + 2000, 5, 5, 5],
      [t0 + 3000, 6, 6, 6],
    ]);
  });

  it("breaks the line where the sensor was silent", () => {
    const cols = toColumns(
      [
        [t0, 1, 1, 1],
        [t0 + 1000, 2, 2, 2],
        [t0 + 60_000, 3, 3, 3],
      ],
      gapThresholdMs(1000),
    );
    expect(cols.mean).toEqual([1, 2, null, 3]);
    expect(cols.xs).toHaveLength(4);
    expect(cols.xs[2]).toBeGreaterThan(t0 + 1000);
    expect(cols.xs[2]).toBeLessThan(t0 + 60_000);
  });

  it("aligns a second channel by the nearest bucket within a tolerance", () => {
    const other: Bucket[] = [
      [t0 + 10, 20, 20, 20],
      [t0 + 1000, 21, 21, 21],
    ];
    expect(alignMeans([t0, t0 + 1000, t0 + 50_000], other, 500)).toEqual([20, 21, null]);
  });

  it("knows when there is a band to draw", () => {
    expect(hasSpread([[t0, 1, 1, 1]])).toBe(false);
    expect(hasSpread([[t0, 1, 2, 4]])).toBe(true);
  });

  it("keeps charge charts symmetric around zero and the limit in view", () => {
    expect(symmetricRange(-2, 3, 12)).toEqual([-16, 16]);
    expect(symmetricRange(-30, 5, 12)).toEqual([-30, 30]);
    expect(symmetricRange(null, null, null)).toEqual([-1, 1]);
  });
});
