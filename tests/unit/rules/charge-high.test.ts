/**
 * charge_high: on-delay, off-delay and deadband behave as ISA-18.2 / IEC 62682 describe
 * (alarm on-delay, off-delay, deadband); running gating; chattering; ordering rules.
 * Series are hand-built at 1 Hz so each expected time is plain counting.
 */
import { describe, expect, it } from "vitest";
import { createRuleEngine } from "../../../lib/rules/engine";
import { MIN, PLANT, S, T0, brief, chargeHighRule, mergeByTs, repeat, runRules, series } from "./fixtures";

const UNWIND = "fm-gp-unwind";
// Limit 12 kV, clear 10 kV, on-delay 10 s, off-delay 30 s (the demo defaults, a plant setting).
const rule = chargeHighRule(1, { limitKv: 12, clearKv: 10 }, { onDelayS: 10, offDelayS: 30 });

describe("charge_high on-delay", () => {
  it("raises nothing for a spike shorter than the on-delay", () => {
    // 5 s at 5 kV, then 10 readings at 15 kV (t = 5..14 s: the condition holds 9 s), then 5 kV.
    const values = [...repeat(5, 5), ...repeat(15, 10), ...repeat(5, 60)];
    const { transitions, engine } = runRules([rule], series(UNWIND, "charge_kv", T0, S, values));
    expect(transitions).toEqual([]);
    expect(engine.activeAlerts()).toEqual([]);
  });

  it("raises at the first reading once the condition has held for the on-delay", () => {
    // Above the limit from t = 5 s: on-delay of 10 s is complete at t = 15 s.
    const values = [...repeat(5, 5), ...repeat(15, 20)];
    const { transitions } = runRules([rule], series(UNWIND, "charge_kv", T0, S, values));
    expect(brief(transitions)).toEqual([["raise", "point:101", 15]]);
    const raise = transitions[0];
    expect(raise.conditionSinceTs).toBe(T0 + 5 * S);
    expect(raise.raisedTs).toBe(raise.ts);
    expect(raise.value).toBe(15);
    expect(raise.ruleId).toBe(1);
    expect(raise.ruleVersion).toBe(1);
    expect(raise.kind).toBe("charge_high");
    expect(raise.severity).toBe("medium");
    expect(raise.unit).toBe("kV");
    expect(raise.chattering).toBe(false);
    expect(raise.message).toBe("Charge 15.0 kV at Unwind on Gravure press, over the 12 kV limit");
  });

  it("measures the on-delay in reading time, so sparse readings raise at the next reading", () => {
    // One reading every 30 s: above the limit at t = 30 s, still above at t = 60 s (>= 10 s later).
    const readings = series(UNWIND, "charge_kv", T0, 30 * S, [5, 15, 15]);
    const { transitions } = runRules([rule], readings);
    expect(brief(transitions)).toEqual([["raise", "point:101", 60]]);
  });

  it("words a negative charge with a minus sign and judges its magnitude", () => {
    const values = repeat(-18.4, 11);
    const { transitions } = runRules([rule], series(UNWIND, "charge_kv", T0, S, values));
    expect(transitions).toHaveLength(1);
    expect(transitions[0].message).toBe("Charge \u221218.4 kV at Unwind on Gravure press, over the 12 kV limit");
    expect(transitions[0].peakValue).toBe(-18.4);
  });

  it("needs the magnitude strictly above the limit (12.0 kV at a 12 kV limit is not over it)", () => {
    const { transitions } = runRules([rule], series(UNWIND, "charge_kv", T0, S, repeat(12, 60)));
    expect(transitions).toEqual([]);
  });
});

describe("charge_high off-delay", () => {
  // 20 s at 15 kV (raise at t = 10 s), then the values given from t = 20 s.
  const withTail = (tail: number[]) => series(UNWIND, "charge_kv", T0, S, [...repeat(15, 20), ...tail]);

  it("clears only after the value has stayed under the clear level for the off-delay", () => {
    // Under 10 kV from t = 20 s: off-delay complete at t = 50 s.
    const { transitions } = runRules([rule], withTail(repeat(8, 60)));
    expect(brief(transitions)).toEqual([
      ["raise", "point:101", 10],
      ["clear", "point:101", 50],
    ]);
    const clear = transitions[1];
    expect(clear.raisedTs).toBe(T0 + 10 * S);
    expect(clear.value).toBe(8);
    expect(clear.peakValue).toBe(15);
    expect(clear.message).toBe("Charge back to 8.0 kV at Unwind on Gravure press, under the 10 kV clear level (peak 15.0 kV)");
  });

  it("restarts the off-delay when the value comes back into the deadband", () => {
    // 8 kV for t = 20..39, 11 kV (deadband) at t = 40, 8 kV again from t = 41: clear at 41 + 30 = 71 s.
    const { transitions } = runRules([rule], withTail([...repeat(8, 20), 11, ...repeat(8, 60)]));
    expect(brief(transitions)).toEqual([
      ["raise", "point:101", 10],
      ["clear", "point:101", 71],
    ]);
  });

  it("a value exactly at the clear level does not count as cleared", () => {
    const { transitions } = runRules([rule], withTail(repeat(10, 120)));
    expect(brief(transitions)).toEqual([["raise", "point:101", 10]]);
  });
});

describe("charge_high deadband", () => {
  it("a value oscillating inside the deadband raises nothing", () => {
    // 10 minutes alternating 10.5 / 11.9 kV: between clear (10) and limit (12).
    const values = Array.from({ length: 600 }, (_, i) => (i % 2 === 0 ? 10.5 : 11.9));
    const { transitions } = runRules([rule], series(UNWIND, "charge_kv", T0, S, values));
    expect(transitions).toEqual([]);
  });

  it("once raised, oscillation through the deadband (and brief dips under clear) neither clears nor re-raises", () => {
    // Raise, then 10 min cycling 13 / 11 / 10.5 / 9.5 / 11.9: under clear for 1 s at a time only,
    // over the limit again every few seconds; then steady 9 kV until it clears.
    const cycle = [13, 11, 10.5, 9.5, 11.9];
    const oscillation = Array.from({ length: 600 }, (_, i) => cycle[i % cycle.length]);
    const values = [...repeat(15, 20), ...oscillation, ...repeat(9, 40)];
    const { transitions } = runRules([rule], series(UNWIND, "charge_kv", T0, S, values));
    const kinds = transitions.filter((t) => t.type !== "update").map((t) => t.type);
    expect(kinds).toEqual(["raise", "clear"]);
    // 9 kV from t = 620 s: clear at t = 650 s.
    expect((transitions[transitions.length - 1].ts - T0) / S).toBe(650);
  });
});

describe("charge_high peak and updates", () => {
  it("tracks the peak and sends at most one update per minute while it grows", () => {
    // Raise at 10 s, then a slow climb 15 -> 19 kV over 3 minutes, then a fall under clear.
    const climb = Array.from({ length: 180 }, (_, i) => 15 + (4 * i) / 179);
    const values = [...repeat(15, 11), ...climb, ...repeat(5, 40)];
    const { transitions } = runRules([rule], series(UNWIND, "charge_kv", T0, S, values));
    const updates = transitions.filter((t) => t.type === "update");
    expect(updates.length).toBeGreaterThanOrEqual(2);
    for (let i = 1; i < updates.length; i++) expect(updates[i].ts - updates[i - 1].ts).toBeGreaterThanOrEqual(60 * S);
    expect(updates[0].ts - transitions[0].ts).toBeGreaterThanOrEqual(60 * S);
    const clear = transitions[transitions.length - 1];
    expect(clear.type).toBe("clear");
    expect(clear.peakValue).toBeCloseTo(19, 9);
  });
});

describe("charge_high gated by the line running", () => {
  const gated = chargeHighRule(1, { limitKv: 12, clearKv: 10 }, { onDelayS: 10, offDelayS: 30, onlyWhileRunning: true });

  it("treats the condition as false while the line is stopped, and times the on-delay from the start", () => {
    const running = [
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 0 },
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0 + 60 * S, value: 1 },
    ];
    const charge = series(UNWIND, "charge_kv", T0, S, repeat(15, 120));
    const { transitions } = runRules([gated], mergeByTs(running, charge));
    // Running from t = 60 s: on-delay complete at t = 70 s.
    expect(brief(transitions)).toEqual([["raise", "point:101", 70]]);
  });

  it("the same rule without the gate raises while stopped", () => {
    const ungated = chargeHighRule(1, { limitKv: 12, clearKv: 10 }, { onDelayS: 10, offDelayS: 30 });
    const running = [{ sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 0 }];
    const charge = series(UNWIND, "charge_kv", T0, S, repeat(15, 30));
    const { transitions } = runRules([ungated], mergeByTs(running, charge));
    expect(brief(transitions)).toEqual([["raise", "point:101", 10]]);
  });

  it("an open alert clears once the line has been stopped for the off-delay, even if the charge stays high", () => {
    const running = [
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 1 },
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0 + 60 * S, value: 0 },
    ];
    const charge = series(UNWIND, "charge_kv", T0, S, repeat(15, 150));
    const { transitions } = runRules([gated], mergeByTs(running, charge));
    // Raise at 10 s; stopped from 60 s; clear at 60 + 30 = 90 s; no new raise while stopped.
    expect(brief(transitions.filter((t) => t.type !== "update"))).toEqual([
      ["raise", "point:101", 10],
      ["clear", "point:101", 90],
    ]);
    expect(transitions[transitions.length - 1].message).toBe(
      "Gravure press stopped; charge alert at Unwind on Gravure press cleared (now 15.0 kV, peak 15.0 kV)",
    );
  });

  it("looks the running state up at each reading's own time, whichever sensor's data arrives first", () => {
    // The gateway's data reaches the engine before the field meter's (the meter's batch is late):
    // running 0..99 s, stopped from 100 s. The meter's readings at 0..99 s must still count as running.
    const running = [
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 1 },
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0 + 100 * S, value: 0 },
    ];
    const charge = series(UNWIND, "charge_kv", T0, S, repeat(15, 100));
    const gatewayFirst = runRules([gated], [...running, ...charge]).transitions;
    const interleaved = runRules([gated], mergeByTs(running, charge)).transitions;
    expect(brief(gatewayFirst)).toEqual([["raise", "point:101", 10]]);
    expect(gatewayFirst).toEqual(interleaved);
  });

  it("a meter lagging far behind the gateway still sees the line stopped before its last start", () => {
    // Gateway: stopped at 0 min, started at 10 min, running readings to 40 min (older history is
    // dropped beyond the 15 min lag horizon). The meter's readings from 5 min arrive only afterwards.
    const running = [
      { sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 0 },
      ...series("gw-gravure", "running", T0 + 10 * MIN, MIN, repeat(1, 31)),
    ];
    const lateCharge = series(UNWIND, "charge_kv", T0 + 5 * MIN, S, repeat(15, 60));
    expect(runRules([gated], [...running, ...lateCharge]).transitions).toEqual([]);
    // The same readings interleaved in time order agree.
    expect(runRules([gated], mergeByTs(running, lateCharge)).transitions).toEqual([]);
  });

  it("counts a line as running before its running sensor has reported", () => {
    const charge = series(UNWIND, "charge_kv", T0, S, repeat(15, 20));
    const { transitions } = runRules([gated], charge);
    expect(brief(transitions)).toEqual([["raise", "point:101", 10]]);
  });
});

describe("charge_high chattering", () => {
  it("flags a raise within 60 s of the previous clear of the same rule and point", () => {
    const fast = chargeHighRule(1, { limitKv: 12, clearKv: 10 });
    // raise at 0, clear at 10, raise at 40 (30 s after the clear: chattering),
    // clear at 50, raise at 150 (100 s after: not chattering).
    const values = [...repeat(15, 10), ...repeat(5, 30), ...repeat(15, 10), ...repeat(5, 100), ...repeat(15, 5)];
    const { transitions } = runRules([fast], series(UNWIND, "charge_kv", T0, S, values));
    expect(brief(transitions)).toEqual([
      ["raise", "point:101", 0],
      ["clear", "point:101", 10],
      ["raise", "point:101", 40],
      ["clear", "point:101", 50],
      ["raise", "point:101", 150],
    ]);
    expect(transitions.map((t) => t.chattering)).toEqual([false, false, true, false, false]);
  });
});

describe("charge_high input handling", () => {
  it("ignores a reading older than or equal to the sensor channel's last one", () => {
    const fast = chargeHighRule(1, { limitKv: 12, clearKv: 10 });
    const engine = createRuleEngine({ rules: [fast], topology: PLANT });
    expect(engine.push({ sensorKey: UNWIND, channel: "charge_kv", ts: T0 + 30 * S, value: 5 })).toEqual([]);
    // Older: ignored even though it is over the limit.
    expect(engine.push({ sensorKey: UNWIND, channel: "charge_kv", ts: T0 + 20 * S, value: 15 })).toEqual([]);
    // Same time again (a re-sent batch): ignored.
    expect(engine.push({ sensorKey: UNWIND, channel: "charge_kv", ts: T0 + 30 * S, value: 15 })).toEqual([]);
    expect(engine.activeAlerts()).toEqual([]);
    expect(engine.push({ sensorKey: UNWIND, channel: "charge_kv", ts: T0 + 31 * S, value: 15 })).toHaveLength(1);
  });

  it("ignores unknown sensors and non-finite values", () => {
    const fast = chargeHighRule(1, { limitKv: 12, clearKv: 10 });
    const engine = createRuleEngine({ rules: [fast], topology: PLANT });
    expect(engine.push({ sensorKey: "fm-nowhere", channel: "charge_kv", ts: T0, value: 50 })).toEqual([]);
    expect(engine.push({ sensorKey: UNWIND, channel: "charge_kv", ts: T0, value: Number.NaN })).toEqual([]);
    expect(engine.push({ sensorKey: UNWIND, channel: "charge_kv", ts: T0 + S, value: Number.POSITIVE_INFINITY })).toEqual([]);
    expect(engine.snapshot().sensors.find((s) => s.sensorKey === "fm-nowhere")).toBeUndefined();
  });

  it("applies a plant-wide rule to every point separately", () => {
    const fast = chargeHighRule(1, { limitKv: 12, clearKv: 10 });
    const readings = mergeByTs(
      series("fm-gp-unwind", "charge_kv", T0, S, [15]),
      series("fm-sr-rewind", "charge_kv", T0 + 2 * S, S, [-13]),
    );
    const { transitions, engine } = runRules([fast], readings);
    expect(brief(transitions)).toEqual([
      ["raise", "point:101", 0],
      ["raise", "point:202", 2],
    ]);
    expect(engine.activeAlerts().map((a) => a.subjectKey)).toEqual(["point:101", "point:202"]);
    expect(transitions[1].message).toBe("Charge \u221213.0 kV at Rewind on Slitter-rewinder, over the 12 kV limit");
  });

  it("runs per-point overrides beside area defaults (most specific rule per severity)", () => {
    const rules = [
      chargeHighRule(1, { limitKv: 12, clearKv: 10 }, { scope: { areaId: 1 } }),
      chargeHighRule(2, { limitKv: 20, clearKv: 17 }, { scope: { areaId: 1 }, severity: "high" }),
      chargeHighRule(3, { limitKv: 15, clearKv: 13 }, { scope: { pointId: 101 } }),
    ];
    const readings = mergeByTs(
      series("fm-gp-unwind", "charge_kv", T0, S, [14, 21]),
      series("fm-gp-deck1", "charge_kv", T0, S, [14]),
    );
    const { transitions } = runRules(rules, readings);
    // Unwind (101): 14 kV is under its own 15 kV limit; 21 kV raises its 15 kV medium and the area's 20 kV high.
    // Print deck 1 (102): 14 kV raises the area's 12 kV medium.
    expect(transitions.map((t) => [t.ruleId, t.subjectKey, (t.ts - T0) / S])).toEqual([
      [1, "point:102", 0],
      [2, "point:101", 1],
      [3, "point:101", 1],
    ]);
  });
});

describe("charge_high with several subjects at once", () => {
  it("keeps each point's delays separate", () => {
    const readings = mergeByTs(
      series("fm-gp-unwind", "charge_kv", T0, S, repeat(15, 30)),
      // Print deck 1 goes over 5 s later.
      series("fm-gp-deck1", "charge_kv", T0, S, [...repeat(5, 5), ...repeat(15, 25)]),
    );
    const { transitions } = runRules([rule], readings);
    expect(brief(transitions)).toEqual([
      ["raise", "point:101", 10],
      ["raise", "point:102", 15],
    ]);
  });

  it("stays quiet for a whole shift of normal readings", () => {
    // 8 h at 1 Hz of 3–6 kV on every point: nothing to report.
    const engine = createRuleEngine({ rules: [rule], topology: PLANT });
    const keys = ["fm-gp-unwind", "fm-gp-deck1", "fm-gp-rewind", "fm-sr-unwind", "fm-sr-rewind"];
    let count = 0;
    for (let i = 0; i < 8 * 60 * MIN / S; i += 1) {
      for (const [k, key] of keys.entries()) {
        count += engine.push({ sensorKey: key, channel: "charge_kv", ts: T0 + i * S, value: 4.5 + 1.5 * Math.sin(i / 17 + k) }).length;
      }
    }
    expect(count).toBe(0);
  });
});
