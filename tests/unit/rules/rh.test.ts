/**
 * rh_low and rh_forecast on the Press Hall logger. The forecast's crossing time is checked
 * against a least-squares line worked by hand (formula as in charge-rate.test.ts).
 */
import { describe, expect, it } from "vitest";
import type { RuleDefinitionInput } from "../../../lib/rules/types";
import { MIN, S, T0, baseRule, brief, repeat, runRules, series } from "./fixtures";

const LOGGER = "th-press";

function rhLowRule(over: Partial<ReturnType<typeof baseRule>> = {}): RuleDefinitionInput {
  return { ...baseRule(4, over), kind: "rh_low", onlyWhileRunning: false, params: { limitPct: 30, clearPct: 33 } };
}

function forecastRule(
  params: { limitPct: number; horizonMin: number; windowMin: number; clearMarginPct?: number },
  over: Partial<ReturnType<typeof baseRule>> = {},
): RuleDefinitionInput {
  return { ...baseRule(5, { severity: "low", ...over }), kind: "rh_forecast", onlyWhileRunning: false, params };
}

describe("rh_low", () => {
  it("raises after the on-delay below the limit and clears after the off-delay above the clear level", () => {
    // One reading a minute: 35, 31, 29 (t = 2 min) … 29 for 4 min, 31 (deadband), 34 … 34.
    const values = [35, 31, ...repeat(29, 4), 31, ...repeat(34, 10)];
    const { transitions } = runRules(
      [rhLowRule({ onDelayS: 120, offDelayS: 300 })],
      series(LOGGER, "rh_pct", T0, MIN, values),
    );
    // Under 30 % from 2 min: raise at 4 min (on-delay 120 s). 31 % at 6 min is deadband.
    // Over 33 % from 7 min: clear at 12 min (off-delay 300 s).
    expect(brief(transitions).map(([type, subject, s]) => [type, subject, s / 60])).toEqual([
      ["raise", "area:1", 4],
      ["clear", "area:1", 12],
    ]);
    expect(transitions[0].message).toBe("Relative humidity 29.0 % in Press Hall, under the 30 % limit");
    expect(transitions[1].peakValue).toBe(29);
    expect(transitions[1].message).toBe(
      "Relative humidity back to 34.0 % in Press Hall, above the 33 % clear level (lowest 29.0 %)",
    );
  });

  it("humidity hovering between limit and clear level raises nothing", () => {
    const values = Array.from({ length: 240 }, (_, i) => 30.2 + 2.6 * Math.abs(Math.sin(i / 7)));
    const { transitions } = runRules([rhLowRule()], series(LOGGER, "rh_pct", T0, 30 * S, values));
    expect(transitions).toEqual([]);
  });
});

// Hand-built cold-snap trend: one reading every 5 min, window 30 min, limit 30 %, horizon 60 min.
// x (min) = 0, 5, 10, 15, 20, 25, 30;  y (% RH) = 36.0, 35.2, 34.6, 33.5, 32.9, 32.1, 31.3.
// x̄ = 15; Σ(x − x̄)² = 225 + 100 + 25 + 0 + 25 + 100 + 225 = 700 min².
// Σ(x − x̄)·y = −15·36.0 − 10·35.2 − 5·34.6 + 0 + 5·32.9 + 10·32.1 + 15·31.3
//            = −540 − 352 − 173 + 164.5 + 321 + 469.5 = −110.
// m = −110 / 700 = −0.157142857 %/min.
// ȳ = 235.6 / 7 = 33.657142857; fitted at x = 30: ȳ + m·15 = 33.657142857 − 2.357142857 = 31.3 %.
// Reaches 30 % after (31.3 − 30) / 0.157142857 = 1.3 · 700 / 110 = 8.272727 min = 496 363.6 ms.
// Projection at the 60 min horizon: 31.3 − 0.157142857 · 60 = 21.87 % ≤ 30 %: raise.
const COLD_SNAP = [36.0, 35.2, 34.6, 33.5, 32.9, 32.1, 31.3];
const HAND_CROSSING_AFTER_LAST_MS = ((1.3 * 700) / 110) * MIN;

describe("rh_forecast", () => {
  it("raises with the crossing time of the hand-computed least-squares line", () => {
    const { transitions } = runRules(
      [forecastRule({ limitPct: 30, horizonMin: 60, windowMin: 30 })],
      series(LOGGER, "rh_pct", T0, 5 * MIN, COLD_SNAP),
    );
    expect(brief(transitions)).toEqual([["raise", "area:1", 30 * 60]]);
    const raise = transitions[0];
    expect(raise.value).toBe(31.3);
    expect(HAND_CROSSING_AFTER_LAST_MS).toBeCloseTo(496_363.6, 1);
    expect(raise.expectedCrossingTs).toBeDefined();
    expect(Math.abs((raise.expectedCrossingTs ?? 0) - (T0 + 30 * MIN + HAND_CROSSING_AFTER_LAST_MS))).toBeLessThanOrEqual(1);
    expect(raise.message).toBe(
      "Relative humidity in Press Hall is 31.3 % and falling 0.16 %/min: expected under the 30 % limit in about 8 min",
    );
  });

  it("raises nothing when the projected crossing is beyond the horizon", () => {
    // Same line, horizon 8 min < 8.27 min to the crossing.
    const { transitions } = runRules(
      [forecastRule({ limitPct: 30, horizonMin: 8, windowMin: 30 })],
      series(LOGGER, "rh_pct", T0, 5 * MIN, COLD_SNAP),
    );
    expect(transitions).toEqual([]);
  });

  it("raises when the horizon just covers the crossing (8.3 min > 8.27 min)", () => {
    const { transitions } = runRules(
      [forecastRule({ limitPct: 30, horizonMin: 8.3, windowMin: 30 })],
      series(LOGGER, "rh_pct", T0, 5 * MIN, COLD_SNAP),
    );
    expect(transitions).toHaveLength(1);
  });

  it("does not raise when RH is already under the limit (that is rh_low's job)", () => {
    const under = COLD_SNAP.map((v) => v - 6); // 30.0 … 25.3
    const { transitions } = runRules(
      [forecastRule({ limitPct: 30, horizonMin: 60, windowMin: 30 })],
      series(LOGGER, "rh_pct", T0, 5 * MIN, under),
    );
    expect(transitions).toEqual([]);
  });

  it("stays raised through the dip and clears once the trend has recovered for the off-delay", () => {
    // Cold snap, then humidifiers catch up: RH rises back to 36 % and holds.
    const recovery = [31.0, 31.2, 31.8, 32.6, 33.5, 34.4, 35.2, 36.0, ...repeat(36, 12)];
    const readings = series(LOGGER, "rh_pct", T0, 5 * MIN, [...COLD_SNAP, ...recovery]);
    const { transitions } = runRules(
      [forecastRule({ limitPct: 30, horizonMin: 60, windowMin: 30, clearMarginPct: 2 }, { offDelayS: 600 })],
      readings,
    );
    const types = transitions.map((t) => t.type);
    expect(types[0]).toBe("raise");
    expect(types[types.length - 1]).toBe("clear");
    expect(types.filter((t) => t === "raise")).toHaveLength(1);
    const clear = transitions[transitions.length - 1];
    // Hand check (x̄ = 15 min in each 30 min window, Σ(x − x̄)² = 700):
    // window 20..50 min: y = 32.9, 32.1, 31.3, 31.0, 31.2, 31.8, 32.6;
    //   Σ(x − x̄)·y = −493.5 − 321 − 156.5 + 0 + 156 + 318 + 489 = −8; m = −0.0114286 %/min;
    //   ȳ = 222.9 / 7 = 31.842857; fitted now = 31.842857 − 15·0.0114286 = 31.671429;
    //   at +60 min: 31.671429 − 0.685714 = 30.99 % ≤ 30 + 2 margin → not clear.
    // window 25..55 min: y = 32.1, 31.3, 31.0, 31.2, 31.8, 32.6, 33.5;
    //   Σ(x − x̄)·y = −481.5 − 313 − 155 + 0 + 159 + 326 + 502.5 = 38; m = 0.0542857 %/min;
    //   ȳ = 223.5 / 7 = 31.928571; fitted now = 32.742857; at +60 min: 36.0 % > 32 % → clear holds from 55 min.
    // Off-delay 600 s: clear at 65 min (RH 35.2 %).
    expect((clear.ts - T0) / MIN).toBe(65);
    expect(clear.peakValue).toBe(31.0);
    expect(clear.message).toBe("Relative humidity in Press Hall no longer forecast to fall under 30 % within 60 min (now 35.2 %)");
  });

  it("needs a full window before forecasting", () => {
    // A steep fall over 20 min only (window 30 min): not judged.
    const { transitions } = runRules(
      [forecastRule({ limitPct: 30, horizonMin: 60, windowMin: 30 })],
      series(LOGGER, "rh_pct", T0, 5 * MIN, [40, 37, 34, 31, 30.5]),
    );
    expect(transitions).toEqual([]);
  });
});
