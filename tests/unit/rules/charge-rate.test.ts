/**
 * charge_rate: the least-squares slope of charge over the window, signed so that growth of
 * |charge| is positive. Expected slopes are worked by hand from the least-squares formula
 * m = Σ(x − x̄)(y − ȳ) / Σ(x − x̄)² (any statistics text, e.g. Montgomery & Runger, Applied
 * Statistics and Probability for Engineers, ch. 11, from memory).
 */
import { describe, expect, it } from "vitest";
import type { RuleDefinitionInput } from "../../../lib/rules/types";
import { S, T0, baseRule, brief, mergeByTs, runRules, series } from "./fixtures";

const UNWIND = "fm-gp-unwind";

function rateRule(
  rateKvPerMin: number,
  over: Partial<ReturnType<typeof baseRule>> & { onlyWhileRunning?: boolean } = {},
): RuleDefinitionInput {
  const { onlyWhileRunning = false, ...rest } = over;
  return {
    ...baseRule(3, rest),
    kind: "charge_rate",
    onlyWhileRunning,
    params: { rateKvPerMin, clearRateKvPerMin: Math.min(1, rateKvPerMin / 2), windowS: 60 },
  };
}

// Charge every 10 s over one 60 s window: x = 0, 10, …, 60 s.
// y = −2.0, −2.5, −3.2, −3.4, −4.1, −4.5, −5.0 kV.
// x̄ = 30 s; Σ(x − x̄)² = 900 + 400 + 100 + 0 + 100 + 400 + 900 = 2800 s².
// Σ(x − x̄)·y = (−30)(−2.0) + (−20)(−2.5) + (−10)(−3.2) + 0 + (10)(−4.1) + (20)(−4.5) + (30)(−5.0)
//            = 60 + 50 + 32 − 41 − 90 − 150 = −139 kV·s   (Σ(x − x̄)·ȳ = 0, so ȳ drops out).
// m = −139 / 2800 kV/s = −0.0496428… kV/s = −2.978571… kV/min.
// The fitted charge at 60 s is negative, so |charge| grows at +2.978571 kV/min.
const RISING_NEGATIVE = [-2.0, -2.5, -3.2, -3.4, -4.1, -4.5, -5.0];
const HAND_RATE_KV_PER_MIN = (139 / 2800) * 60;

describe("charge_rate", () => {
  it("raises with the hand-computed least-squares rate when it is over the limit", () => {
    const { transitions } = runRules([rateRule(2.5)], series(UNWIND, "charge_kv", T0, 10 * S, RISING_NEGATIVE));
    // The window is first full at 60 s (oldest reading 60 s back, 7 readings).
    expect(brief(transitions)).toEqual([["raise", "point:101", 60]]);
    expect(transitions[0].value).toBeCloseTo(HAND_RATE_KV_PER_MIN, 9);
    expect(HAND_RATE_KV_PER_MIN).toBeCloseTo(2.978571, 6);
    expect(transitions[0].unit).toBe("kV/min");
    expect(transitions[0].message).toBe(
      "Charge at Unwind on Gravure press rising 3.0 kV/min over 60 s (limit 2.5 kV/min), now \u22125.0 kV",
    );
  });

  it("does not raise when the same rate is under the limit (2.98 < 3 kV/min)", () => {
    const { transitions } = runRules([rateRule(3)], series(UNWIND, "charge_kv", T0, 10 * S, RISING_NEGATIVE));
    expect(transitions).toEqual([]);
  });

  it("treats positive charge growing the same way identically", () => {
    const mirrored = RISING_NEGATIVE.map((v) => -v);
    const { transitions } = runRules([rateRule(2.5)], series(UNWIND, "charge_kv", T0, 10 * S, mirrored));
    expect(transitions).toHaveLength(1);
    expect(transitions[0].value).toBeCloseTo(HAND_RATE_KV_PER_MIN, 9);
  });

  it("does not raise for charge falling toward zero (a neutralizer catching up)", () => {
    const falling = [...RISING_NEGATIVE].reverse();
    const { transitions } = runRules([rateRule(0.5)], series(UNWIND, "charge_kv", T0, 10 * S, falling));
    expect(transitions).toEqual([]);
  });

  it("does not raise for a steep drop whose fitted line ends below zero (15 kV falling to 0.5 kV)", () => {
    // y = 15, 15, 15, 15, 0.5, 0.5, 0.5 kV at x = 0…60 s: ȳ = 61.5/7 = 8.786 kV,
    // Σ(x − x̄)·y = (−30 − 20 − 10)·15 + (10 + 20 + 30)·0.5 = −870 kV·s, m = −870/2800 = −0.3107 kV/s;
    // the fitted value at 60 s is 8.786 − 0.3107·30 = −0.54 kV, below zero, though every reading is
    // positive. Judged by the end of the line this reads as a negative charge growing at
    // 18.6 kV/min; it is a fall toward zero, never a rise.
    const values = [15, 15, 15, 15, 0.5, 0.5, 0.5];
    const { transitions } = runRules([rateRule(1)], series(UNWIND, "charge_kv", T0, 10 * S, values));
    expect(transitions).toEqual([]);
  });

  it("judges nothing until the window is full", () => {
    // A steep rise over 40 s only: 4 readings, oldest 30 s back < 0.9 × 60 s.
    const { transitions } = runRules([rateRule(1)], series(UNWIND, "charge_kv", T0, 10 * S, [-1, -5, -9, -13]));
    expect(transitions).toEqual([]);
  });

  it("clears when the rise slows under the clear rate for the off-delay", () => {
    // Rise as above, then hold −5.0 kV; the slope over the last 60 s falls, under 1 kV/min once
    // the window is mostly flat.
    const values = [...RISING_NEGATIVE, ...Array.from({ length: 12 }, () => -5.0)];
    const { transitions } = runRules(
      [rateRule(2.5, { offDelayS: 20 })],
      series(UNWIND, "charge_kv", T0, 10 * S, values),
    );
    expect(transitions.map((t) => t.type)).toEqual(["raise", "clear"]);
    // Hand check of the first time the rate is under 1 kV/min: window 40..100 s holds
    // −4.1, −4.5, −5, −5, −5, −5, −5; Σ(x − x̄)·y = (−30)(−4.1) + (−20)(−4.5) + (−10)(−5) + 0 + 10(−5) + 20(−5) + 30(−5)
    // = 123 + 90 + 50 − 50 − 100 − 150 = −37; m = −37/2800 kV/s = −0.79 kV/min → under 1 at 100 s.
    // (At 90 s the window 30..90 s gives (−30)(−3.4) + (−20)(−4.1) + (−10)(−4.5) + 0 + 10(−5) + 20(−5) + 30(−5)
    // = 102 + 82 + 45 − 300 = −71 → 1.52 kV/min, not yet.) Off-delay 20 s: clear at 120 s.
    expect((transitions[1].ts - T0) / S).toBe(120);
    expect(transitions[1].peakValue).toBeCloseTo(HAND_RATE_KV_PER_MIN, 9);
  });

  it("is gated by the line running when asked", () => {
    const gated = rateRule(2.5, { onlyWhileRunning: true });
    const readings = mergeByTs(
      [{ sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 0 }],
      series(UNWIND, "charge_kv", T0, 10 * S, RISING_NEGATIVE),
    );
    expect(runRules([gated], readings).transitions).toEqual([]);
  });
});
