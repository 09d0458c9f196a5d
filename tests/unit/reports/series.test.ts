// Time over limit (sample-and-hold), excursions, worst and lowest readings, least-squares fits.
import { describe, expect, it } from "vitest";
import { bucketExtreme, lowestReading, timeOverLimit, worstReading } from "@/lib/reports/series";
import { fitLeastSquares, thinPairs } from "@/lib/reports/regression";

const S = 1000;

describe("timeOverLimit", () => {
  const charge = [
    { ts: 0, value: 5 },
    { ts: 10 * S, value: 13 },
    { ts: 20 * S, value: -14 },
    { ts: 30 * S, value: 11 },
    { ts: 40 * S, value: 13 },
  ];

  it("holds each reading until the next and counts |charge| above 12 kV", () => {
    // worked by hand: over 10–30 s (20 s) and 40–50 s (10 s) = 30 s of a 50 s window
    const r = timeOverLimit(charge, { kind: "magnitude_above", limit: 12 }, { startTs: 0, endTs: 50 * S }, 60 * S);
    expect(r.overMs).toBe(30 * S);
    expect(r.coveredMs).toBe(50 * S);
    expect(r.excursions).toEqual([
      { startTs: 10 * S, endTs: 30 * S, peakValue: -14 },
      { startTs: 40 * S, endTs: 50 * S, peakValue: 13 },
    ]);
  });

  it("a value equal to the limit is not over it", () => {
    const r = timeOverLimit([{ ts: 0, value: 12 }], { kind: "magnitude_above", limit: 12 }, { startTs: 0, endTs: 10 * S }, 60 * S);
    expect(r.overMs).toBe(0);
    expect(r.coveredMs).toBe(10 * S);
  });

  it("stops holding after the hold time: a silent sensor is no data, not over", () => {
    const r = timeOverLimit(
      [{ ts: 0, value: 20 }, { ts: 600 * S, value: 20 }],
      { kind: "magnitude_above", limit: 12 },
      { startTs: 0, endTs: 700 * S },
      120 * S,
    );
    // 0–120 s and 600–700 s
    expect(r.overMs).toBe(220 * S);
    expect(r.coveredMs).toBe(220 * S);
    expect(r.excursions).toHaveLength(2);
  });

  it("a reading before the window counts for the part of its hold inside it; clips at the end", () => {
    const r = timeOverLimit(
      [{ ts: -30 * S, value: 15 }, { ts: 20 * S, value: 3 }, { ts: 90 * S, value: 30 }],
      { kind: "magnitude_above", limit: 12 },
      { startTs: 0, endTs: 60 * S },
      120 * S,
    );
    expect(r.overMs).toBe(20 * S);
    expect(r.coveredMs).toBe(60 * S);
  });

  it("works for humidity below a minimum and on unsorted input", () => {
    const rh = [
      { ts: 20 * S, value: 35 },
      { ts: 0, value: 28 },
      { ts: 10 * S, value: 29.5 },
    ];
    const r = timeOverLimit(rh, { kind: "below", limit: 30 }, { startTs: 0, endTs: 30 * S }, 60 * S);
    expect(r.overMs).toBe(20 * S);
    expect(r.excursions[0].peakValue).toBe(28);
  });

  it("1-minute rollups: the bucket's extreme stands for the minute", () => {
    expect(bucketExtreme(-14, 3)).toBe(-14);
    expect(bucketExtreme(-2, 9)).toBe(9);
    const minutes = [
      { ts: 0, value: bucketExtreme(4, 8) },
      { ts: 60 * S, value: bucketExtreme(9, 12.5) },
      { ts: 120 * S, value: bucketExtreme(-13, -2) },
    ];
    const r = timeOverLimit(minutes, { kind: "magnitude_above", limit: 12 }, { startTs: 0, endTs: 180 * S }, 60 * S);
    expect(r.overMs).toBe(120 * S);
    expect(r.excursions).toHaveLength(1);
  });

  it("refuses a reversed window or a zero hold time", () => {
    expect(() => timeOverLimit([], { kind: "below", limit: 30 }, { startTs: 10, endTs: 0 }, 1000)).toThrow(RangeError);
    expect(() => timeOverLimit([], { kind: "below", limit: 30 }, { startTs: 0, endTs: 10 }, 0)).toThrow(RangeError);
  });
});

describe("worst and lowest readings", () => {
  const s = [
    { ts: 1, value: -9 },
    { ts: 2, value: 9 },
    { ts: 3, value: -12 },
    { ts: 4, value: 20 },
  ];
  it("worst is the largest magnitude, earliest on a tie, inside the window", () => {
    expect(worstReading(s)).toEqual({ ts: 4, value: 20 });
    expect(worstReading(s, { startTs: 0, endTs: 3 })).toEqual({ ts: 1, value: -9 });
    expect(worstReading([])).toBeNull();
  });
  it("lowest is the smallest value", () => {
    expect(lowestReading(s)).toEqual({ ts: 3, value: -12 });
  });
});

describe("fitLeastSquares (simple-statistics linearRegression + rSquared)", () => {
  it("recovers an exact line with r² = 1", () => {
    const f = fitLeastSquares([[0, 1], [1, 3], [2, 5], [3, 7]])!;
    expect(f.slope).toBeCloseTo(2, 12);
    expect(f.intercept).toBeCloseTo(1, 12);
    expect(f.rSquared).toBeCloseTo(1, 12);
  });

  it("matches the closed-form least squares on a textbook example", () => {
    // x = 1..5, y = 2,4,5,4,5: slope = Sxy/Sxx = 6/10 = 0.6, intercept = 4 − 0.6·3 = 2.2,
    // r² = 1 − SSres/SStot = 1 − 2.4/6 = 0.6 (worked by hand)
    const f = fitLeastSquares([[1, 2], [2, 4], [3, 5], [4, 4], [5, 5]])!;
    expect(f.slope).toBeCloseTo(0.6, 12);
    expect(f.intercept).toBeCloseTo(2.2, 12);
    expect(f.rSquared).toBeCloseTo(0.6, 12);
    expect(f).toMatchObject({ n: 5, xMin: 1, xMax: 5 });
  });

  it("refuses fits that mean nothing", () => {
    expect(fitLeastSquares([[1, 2], [2, 3]])).toBeNull();
    expect(fitLeastSquares([[1, 2], [1, 3], [1, 4]])).toBeNull();
    expect(fitLeastSquares([[1, 2], [2, Number.NaN], [3, 4]])).toBeNull();
    // flat y: the line fits but there is nothing for r² to explain
    expect(fitLeastSquares([[1, 2], [2, 2], [3, 2]])?.rSquared).toBeNull();
  });

  it("thins pairs for plotting, keeping the first", () => {
    const pairs = Array.from({ length: 1000 }, (_, i) => [i, i] as const);
    const thin = thinPairs(pairs, 100);
    expect(thin).toHaveLength(100);
    expect(thin[0]).toEqual([0, 0]);
    expect(thinPairs(pairs.slice(0, 5), 100)).toHaveLength(5);
  });
});
