/**
 * effect_loss for neutralizer 7 (Bar U1) between Unwind (101, before) and Print deck 1 (102,
 * after) on the Gravure press. Reduction = 1 − mean|after| / mean|before| over the window;
 * the means below are counted by hand over 61 one-second readings (window [t − 60 s, t]).
 */
import { describe, expect, it } from "vitest";
import { createRuleEngine } from "../../../lib/rules/engine";
import { MAX_CROSS_SENSOR_LAG_MS } from "../../../lib/rules/evaluators";
import { effectWindowStateSchema } from "../../../lib/rules/engine-state";
import type { Reading, RuleDefinitionInput } from "../../../lib/rules/types";
import { PLANT, S, T0, baseRule, brief, mergeByTs, pushAll, repeat, runRules, series } from "./fixtures";

const BEFORE = "fm-gp-unwind";
const AFTER = "fm-gp-deck1";

function effectRule(over: Partial<ReturnType<typeof baseRule>> & { onlyWhileRunning?: boolean } = {}): RuleDefinitionInput {
  const { onlyWhileRunning = false, ...rest } = over;
  return {
    ...baseRule(8, rest),
    kind: "effect_loss",
    onlyWhileRunning,
    params: { minReductionFraction: 0.5, clearReductionFraction: 0.6, windowS: 60, minBeforeKv: 1 },
  };
}

// Before the bar: −10 kV throughout. After it: −2 kV (80 % taken off) until 119 s, −7 kV
// (fouled) from 120 s to 199 s, −2 kV again (cleaned) from 200 s; 300 s in all.
const beforeSeries = series(BEFORE, "charge_kv", T0, S, repeat(-10, 300));
const afterSeries = series(AFTER, "charge_kv", T0, S, [...repeat(-2, 120), ...repeat(-7, 80), ...repeat(-2, 100)]);

// Raise: with k readings of 7 kV in the window (k = t − 119), mean|after| = (2·(61 − k) + 7·k) / 61.
// Reduction < 0.5 ⇔ mean|after| > 5 kV ⇔ 122 + 5k > 305 ⇔ k ≥ 37 ⇔ t = 156 s.
// At 156 s: mean|after| = (48 + 259) / 61 = 307/61 = 5.0328 kV; reduction = 1 − 307/610 = 303/610 = 0.496721.
// (At 155 s: 302/61 = 4.9508 kV, reduction 0.5049: not yet.)
// Clear: with j readings of 7 kV left in the window (j = 260 − t), mean|after| = (122 + 5j) / 61;
// reduction ≥ 0.6 ⇔ mean|after| ≤ 4 kV ⇔ 5j ≤ 122 ⇔ j ≤ 24 ⇔ t = 236 s (242/61 = 3.967 kV, reduction 0.6033).
const RAISE_S = 156;
const RAISE_REDUCTION = 303 / 610;
const CLEAR_S = 236;

describe("effect_loss", () => {
  it("raises and clears at the hand-computed times", () => {
    const { transitions } = runRules([effectRule()], mergeByTs(beforeSeries, afterSeries));
    // The peak worsens after the raise (to 0.3 from 180 s): one update a minute after the raise.
    expect(brief(transitions)).toEqual([
      ["raise", "neutralizer:7", RAISE_S],
      ["update", "neutralizer:7", RAISE_S + 60],
      ["clear", "neutralizer:7", CLEAR_S],
    ]);
    expect(transitions[1].peakValue).toBeCloseTo(0.3, 12);
    expect(transitions[0].value).toBeCloseTo(RAISE_REDUCTION, 12);
    expect(transitions[0].unit).toBe("fraction");
    expect(transitions[0].message).toBe(
      "Bar U1 (between Unwind and Print deck 1 on Gravure press) reduces charge only 49.7 % (mean 10.0 kV before, 5.0 kV after over 60 s; needs 50 %)",
    );
    // Worst reduction: all 61 readings at 7 kV (t = 180..199 s): 1 − 7/10 = 0.3.
    expect(transitions[2].peakValue).toBeCloseTo(0.3, 12);
    expect(transitions[2].message).toBe(
      "Bar U1 (between Unwind and Print deck 1 on Gravure press) works again: reduces charge 60.3 % (mean 10.0 kV before, 4.0 kV after over 60 s; clear at 60 %)",
    );
  });

  it("gives the same result whichever meter's data arrives first", () => {
    const interleaved = runRules([effectRule()], mergeByTs(beforeSeries, afterSeries)).transitions;
    // The after-meter's batch first, then the before-meter's; and the before-meter 30 s ahead.
    const afterFirst = runRules([effectRule()], [...afterSeries, ...beforeSeries]).transitions;
    const arrival = (r: Reading) => (r.sensorKey === AFTER ? r.ts + 30 * S : r.ts);
    const beforeAhead = runRules(
      [effectRule()],
      [...beforeSeries, ...afterSeries].sort((a, b) => arrival(a) - arrival(b)),
    ).transitions;
    expect(interleaved.map((t) => t.type)).toEqual(["raise", "update", "clear"]);
    expect(afterFirst).toEqual(interleaved);
    expect(beforeAhead).toEqual(interleaved);
  });

  it("does not judge a neutralizer when there is next to no charge before it (floor 1 kV)", () => {
    // 0.6 kV before, 0.6 kV after: no reduction at all, but too little charge to say anything.
    const readings = mergeByTs(
      series(BEFORE, "charge_kv", T0, S, repeat(0.6, 300)),
      series(AFTER, "charge_kv", T0, S, repeat(0.6, 300)),
    );
    expect(runRules([effectRule()], readings).transitions).toEqual([]);
  });

  it("judges it again just above the floor (1.2 kV before, 1.0 kV after: 17 % reduction)", () => {
    const readings = mergeByTs(
      series(BEFORE, "charge_kv", T0, S, repeat(1.2, 120)),
      series(AFTER, "charge_kv", T0, S, repeat(1.0, 120)),
    );
    const { transitions } = runRules([effectRule()], readings);
    // Window full at 54 s (0.9 × 60 s): 1 − 1.0/1.2 = 0.1667.
    expect(brief(transitions)).toEqual([["raise", "neutralizer:7", 54]]);
    expect(transitions[0].value).toBeCloseTo(1 - 1.0 / 1.2, 12);
  });

  it("keeps an open alert while the charge before it falls under the floor (not judged, not cleared)", () => {
    const readings = mergeByTs(
      series(BEFORE, "charge_kv", T0, S, [...repeat(-10, 120), ...repeat(-0.3, 600)]),
      series(AFTER, "charge_kv", T0, S, [...repeat(-8, 120), ...repeat(-0.3, 600)]),
    );
    const { transitions, engine } = runRules([effectRule()], readings);
    expect(brief(transitions.filter((t) => t.type !== "update"))).toEqual([["raise", "neutralizer:7", 54]]);
    expect(engine.activeAlerts().map((a) => a.subjectKey)).toEqual(["neutralizer:7"]);
  });

  it("with the line gate: nothing while stopped, and an open alert clears after the line has stopped for the off-delay", () => {
    const gated = effectRule({ onlyWhileRunning: true, offDelayS: 30 });
    const stoppedAll = mergeByTs(
      [{ sensorKey: "gw-gravure", channel: "running", ts: T0, value: 0 }],
      beforeSeries,
      afterSeries,
    );
    expect(runRules([gated], stoppedAll).transitions).toEqual([]);

    const stopsAt170: Reading[] = [
      { sensorKey: "gw-gravure", channel: "running", ts: T0, value: 1 },
      { sensorKey: "gw-gravure", channel: "running", ts: T0 + 170 * S, value: 0 },
    ];
    const { transitions } = runRules([gated], mergeByTs(stopsAt170, beforeSeries, afterSeries));
    // Raise at 156 s as above; stopped from 170 s, off-delay 30 s: clear at 200 s.
    // While stopped the bar is not judged, so the worst reduction is the one at 169 s, the last
    // reading with the line running: k = 50 readings of 7 kV, mean|after| = (2·11 + 7·50)/61
    // = 372/61 kV, reduction = 1 − 37.2/61 = 0.390 (39 %).
    expect(brief(transitions.filter((t) => t.type !== "update"))).toEqual([
      ["raise", "neutralizer:7", RAISE_S],
      ["clear", "neutralizer:7", 200],
    ]);
    expect(transitions[1].message).toBe(
      "Gravure press stopped; effect alert for Bar U1 (between Unwind and Print deck 1 on Gravure press) cleared (worst reduction 39 %)",
    );
  });

  it("with the line gate, judges only readings taken since the line last started", () => {
    // Running 0–299 s (−10 kV before, −2 kV after), stopped 300–399 s (residual −1.5 kV on both
    // meters), running again from 400 s as before.
    const running: Reading[] = [
      { sensorKey: "gw-gravure", channel: "running", ts: T0, value: 1 },
      { sensorKey: "gw-gravure", channel: "running", ts: T0 + 300 * S, value: 0 },
      { sensorKey: "gw-gravure", channel: "running", ts: T0 + 400 * S, value: 1 },
    ];
    const readings = mergeByTs(
      running,
      series(BEFORE, "charge_kv", T0, S, [...repeat(-10, 300), ...repeat(-1.5, 100), ...repeat(-10, 200)]),
      series(AFTER, "charge_kv", T0, S, [...repeat(-2, 300), ...repeat(-1.5, 100), ...repeat(-2, 200)]),
    );
    // Were the stopped readings counted, the window at 410 s would hold 11 running and 50 stopped
    // readings: mean|before| = (110 + 75)/61 = 3.03 kV, mean|after| = (22 + 75)/61 = 1.59 kV,
    // reduction 0.476 < 0.5 and a false alert. Judged from 400 s only, it stays at 0.8.
    expect(runRules([effectRule({ onlyWhileRunning: true })], readings).transitions).toEqual([]);
    // Without the gate the stop itself looks like a failing bar: with k stopped readings in the
    // window (k = t − 299), reduction < 0.5 ⇔ 2(61 − k) + 1.5k > (10(61 − k) + 1.5k)/2 ⇔ 3.75k > 183
    // ⇔ k ≥ 49 ⇔ t = 348 s.
    expect(brief(runRules([effectRule({ onlyWhileRunning: false })], readings).transitions)[0]).toEqual(["raise", "neutralizer:7", 348]);
  });

  it("says so when the charge after the bar is higher than before it", () => {
    const readings = mergeByTs(
      series(BEFORE, "charge_kv", T0, S, repeat(4, 60)),
      series(AFTER, "charge_kv", T0, S, repeat(-5, 60)),
    );
    const { transitions } = runRules([effectRule()], readings);
    expect(transitions).toHaveLength(1);
    expect(transitions[0].value).toBeCloseTo(-0.25, 12);
    expect(transitions[0].message).toBe(
      "Bar U1 (between Unwind and Print deck 1 on Gravure press) is not reducing charge: charge after it is higher than before it (mean 4.0 kV before, 5.0 kV after over 60 s; needs 50 % less)",
    );
  });

  it("keeps its buffers bounded, also when one meter has gone quiet", () => {
    const engine = createRuleEngine({ rules: [effectRule()], topology: PLANT });
    pushAll(engine, mergeByTs(series(BEFORE, "charge_kv", T0, S, repeat(-10, 3600)), series(AFTER, "charge_kv", T0, S, repeat(-2, 3600))));
    const windowOf = () => {
      const state = engine.snapshot().evaluators.find((e) => e.subjectKey === "neutralizer:7");
      return effectWindowStateSchema.parse(state?.w);
    };
    expect(windowOf().before.ts.length).toBeLessThanOrEqual(62);
    expect(windowOf().after.ts.length).toBeLessThanOrEqual(62);
    // The after-meter stops; the before-meter carries on for another hour.
    pushAll(engine, series(BEFORE, "charge_kv", T0 + 3600 * S, S, repeat(-10, 3600)));
    expect(windowOf().before.ts.length).toBeLessThanOrEqual(60 + MAX_CROSS_SENSOR_LAG_MS / S + 2);
    // The before-meter stops; the after-meter carries on: held-back evaluation times stay bounded.
    pushAll(engine, series(AFTER, "charge_kv", T0 + 2 * 3600 * S, S, repeat(-2, 3600)));
    expect(windowOf().pending.length).toBeLessThanOrEqual(MAX_CROSS_SENSOR_LAG_MS / S + 1);
    expect(windowOf().after.ts.length).toBeLessThanOrEqual(60 + MAX_CROSS_SENSOR_LAG_MS / S + 2);
  });
});
