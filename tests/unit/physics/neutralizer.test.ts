import { describe, expect, it } from "vitest";
import {
  DECAY_TEST_FROM_V,
  DECAY_TEST_TO_V,
  DEFAULT_CHECK_LIMITS,
  effectFraction,
  fitDecayTrend,
  judgeCheck,
  projectDecayDueDate,
} from "../../../lib/physics/neutralizer";

const DAY_MS = 86_400_000;

describe("neutralizer effect from charge before and after", () => {
  // Synthetic series (invented). Before: 10, −12, 11, 9, −8 kV → mean |before| = 50 / 5 = 10 kV,
  // median |before| = median(8, 9, 10, 11, 12) = 10 kV.
  const beforeKv = [10, -12, 11, 9, -8];

  it("a clean neutralizer removing 90 % of the charge", () => {
    // After: 1, −1.5, 0.5, 1, −1 kV → mean |after| = 5 / 5 = 1 kV → 1 − 1/10 = 0.90;
    // median |after| = median(0.5, 1, 1, 1, 1.5) = 1 kV → 0.90.
    const afterKv = [1, -1.5, 0.5, 1, -1];
    expect(effectFraction(beforeKv, afterKv)).toBeCloseTo(0.9, 12);
    expect(effectFraction(beforeKv, afterKv, "median")).toBeCloseTo(0.9, 12);
  });

  it("the median form ignores a single spike that drags the mean down", () => {
    // After with one 20 kV spike: mean |after| = (1+1+1+1+20)/5 = 4.8 → 1 − 4.8/10 = 0.52;
    // median |after| = 1 → 0.90.
    const afterKv = [1, 1, -1, 1, 20];
    expect(effectFraction(beforeKv, afterKv, "mean")).toBeCloseTo(0.52, 12);
    expect(effectFraction(beforeKv, afterKv, "median")).toBeCloseTo(0.9, 12);
  });

  it("a fouled neutralizer barely helps, and one adding charge goes negative", () => {
    // mean |after| = 9 → 0.10;  mean |after| = 12 → −0.20.
    expect(effectFraction(beforeKv, [9, -9, 9, -9])).toBeCloseTo(0.1, 12);
    expect(effectFraction(beforeKv, [12, 12, -12])).toBeCloseTo(-0.2, 12);
  });

  it("no charge before means no defined effect", () => {
    expect(effectFraction([0, 0, 0], [0.1, 0])).toBeNull();
  });

  it("empty or non-finite series throw", () => {
    expect(() => effectFraction([], [1])).toThrow(RangeError);
    expect(() => effectFraction([1], [])).toThrow(RangeError);
    expect(() => effectFraction([1, Number.NaN], [1])).toThrow(RangeError);
  });
});

describe("charged-plate verification judgement", () => {
  it("uses the documented defaults: 1000 → 100 V test, 20 s plant limit, ±35 V offset", () => {
    // ANSI/ESD STM3.1 / IEC 61340-4-7 decay from ±1000 V to ±100 V (from memory); 20 s is a
    // plant setting; ±35 V offset is common practice in ESD programs.
    expect(DECAY_TEST_FROM_V).toBe(1000);
    expect(DECAY_TEST_TO_V).toBe(100);
    expect(DEFAULT_CHECK_LIMITS).toEqual({ maxDecayS: 20, maxOffsetAbsV: 35 });
  });

  it("passes when both decays and the offset are within limits", () => {
    const result = judgeCheck({ decayPosS: 4.2, decayNegS: 5.1, offsetV: -12 });
    expect(result.pass).toBe(true);
    expect(result.positive.pass).toBe(true);
    expect(result.negative.pass).toBe(true);
    expect(result.offset.pass).toBe(true);
    expect(result.failures).toEqual([]);
  });

  it("a value equal to the limit passes", () => {
    expect(judgeCheck({ decayPosS: 20, decayNegS: 20, offsetV: 35 }).pass).toBe(true);
    expect(judgeCheck({ decayPosS: 20, decayNegS: 20, offsetV: -35 }).pass).toBe(true);
  });

  it("fails the positive polarity only, with its reason", () => {
    const result = judgeCheck({ decayPosS: 25, decayNegS: 6, offsetV: 10 });
    expect(result.pass).toBe(false);
    expect(result.positive.pass).toBe(false);
    expect(result.negative.pass).toBe(true);
    expect(result.offset.pass).toBe(true);
    expect(result.failures).toEqual(["Positive decay 25 s is over the 20 s limit."]);
  });

  it("fails the negative polarity and the offset together", () => {
    const result = judgeCheck({ decayPosS: 3, decayNegS: 31.5, offsetV: -48 });
    expect(result.pass).toBe(false);
    expect(result.positive.pass).toBe(true);
    expect(result.negative.pass).toBe(false);
    expect(result.offset.pass).toBe(false);
    expect(result.failures).toEqual([
      "Negative decay 31.5 s is over the 20 s limit.",
      "Offset -48 V is outside ±35 V.",
    ]);
  });

  it("applies the neutralizer's own limits", () => {
    // A bar on a fast web might be held to 2 s and ±20 V (a plant setting).
    const limits = { maxDecayS: 2, maxOffsetAbsV: 20 };
    expect(judgeCheck({ decayPosS: 1.8, decayNegS: 1.9, offsetV: 15 }, limits).pass).toBe(true);
    const result = judgeCheck({ decayPosS: 2.4, decayNegS: 1.9, offsetV: 25 }, limits);
    expect(result.positive.pass).toBe(false);
    expect(result.offset.pass).toBe(false);
    expect(result.negative.pass).toBe(true);
  });

  it("a part not measured fails; a plate that never decayed (Infinity) fails", () => {
    const result = judgeCheck({ decayPosS: null, decayNegS: Number.POSITIVE_INFINITY, offsetV: null });
    expect(result.pass).toBe(false);
    expect(result.failures).toHaveLength(3);
    expect(result.positive.reason).toBe("Positive decay time not recorded.");
  });

  it("negative decay times and bad limits throw", () => {
    expect(() => judgeCheck({ decayPosS: -1, decayNegS: 2, offsetV: 0 })).toThrow(RangeError);
    expect(() => judgeCheck({ decayPosS: 1, decayNegS: 2, offsetV: 0 }, { maxDecayS: 0, maxOffsetAbsV: 35 })).toThrow(RangeError);
  });
});

describe("decay-time trend and cleaning due date", () => {
  // Hand-computed least squares. Checks on days x = 0, 7, 14, 21 with decay y = 4, 5, 7, 8 s.
  //   x̄ = 10.5, ȳ = 6
  //   Σ(x−x̄)(y−ȳ) = (−10.5)(−2) + (−3.5)(−1) + (3.5)(1) + (10.5)(2) = 21 + 3.5 + 3.5 + 21 = 49
  //   Σ(x−x̄)²     = 110.25 + 12.25 + 12.25 + 110.25 = 245
  //   slope m = 49 / 245 = 0.2 s/day; intercept b = 6 − 0.2 × 10.5 = 3.9 s
  //   reaches 20 s at x = (20 − 3.9) / 0.2 = 80.5 days after the first check
  //   first check 2025-01-06T00:00Z = 1 736 121 600 000 ms → 1 736 121 600 000 + 80.5 × 86 400 000
  //   = 1 743 076 800 000 ms = 2025-03-27T12:00Z.
  const t0 = Date.UTC(2025, 0, 6);
  const checks = [
    { ts: t0, decayS: 4 },
    { ts: t0 + 7 * DAY_MS, decayS: 5 },
    { ts: t0 + 14 * DAY_MS, decayS: 7 },
    { ts: t0 + 21 * DAY_MS, decayS: 8 },
  ];

  it("fits the least-squares line", () => {
    const trend = fitDecayTrend(checks);
    expect(trend).not.toBeNull();
    expect(trend?.slopeSPerDay).toBeCloseTo(0.2, 12);
    expect(trend?.interceptS).toBeCloseTo(3.9, 12);
    expect(trend?.originTs).toBe(t0);
  });

  it("projects the date the decay time reaches the limit", () => {
    expect(projectDecayDueDate(checks, 20)).toBe(1743076800000);
    expect(new Date(projectDecayDueDate(checks, 20) ?? 0).toISOString()).toBe("2025-03-27T12:00:00.000Z");
  });

  it("does not depend on the order of the checks", () => {
    expect(projectDecayDueDate([...checks].reverse(), 20)).toBe(1743076800000);
  });

  it("a limit already crossed by the line gives a date at or before the last check", () => {
    // Reaches 6 s at x = (6 − 3.9) / 0.2 = 10.5 days.
    expect(projectDecayDueDate(checks, 6)).toBe(t0 + 10.5 * DAY_MS);
  });

  it("returns null when the decay time is flat or falling, or there are too few checks", () => {
    const falling = checks.map((c, i) => ({ ts: c.ts, decayS: 8 - i }));
    const flat = checks.map((c) => ({ ts: c.ts, decayS: 5 }));
    expect(projectDecayDueDate(falling, 20)).toBeNull();
    expect(projectDecayDueDate(flat, 20)).toBeNull();
    expect(projectDecayDueDate([checks[0]], 20)).toBeNull();
    expect(projectDecayDueDate([checks[0], { ts: t0, decayS: 9 }], 20)).toBeNull();
    expect(projectDecayDueDate([], 20)).toBeNull();
  });

  it("bad inputs throw", () => {
    expect(() => projectDecayDueDate(checks, 0)).toThrow(RangeError);
    expect(() => projectDecayDueDate([{ ts: Number.NaN, decayS: 1 }, checks[1]], 20)).toThrow(RangeError);
    expect(() => projectDecayDueDate([{ ts: t0, decayS: -1 }, checks[1]], 20)).toThrow(RangeError);
  });
});
