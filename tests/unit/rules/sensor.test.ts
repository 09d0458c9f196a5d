/**
 * sensor_silent (needs tick() to see an ongoing silence) and sensor_flat (stuck or
 * disconnected sensor). Expected times are counted from the hand-built series.
 */
import { describe, expect, it } from "vitest";
import { createRuleEngine } from "../../../lib/rules/engine";
import type { AlertTransition, RuleDefinitionInput } from "../../../lib/rules/types";
import { PLANT, S, T0, baseRule, brief, mergeByTs, pushAll, repeat, runRules, series } from "./fixtures";

const UNWIND = "fm-gp-unwind";

function silentRule(silentS: number, over: Partial<ReturnType<typeof baseRule>> = {}): RuleDefinitionInput {
  return { ...baseRule(6, { scope: { pointId: 101 }, ...over }), kind: "sensor_silent", onlyWhileRunning: false, params: { silentS } };
}

function flatRule(
  params: { channel?: "charge_kv" | "temp_c" | "rh_pct" | "speed_mpm"; windowS: number; tolerance: number; clearTolerance?: number },
  over: Partial<ReturnType<typeof baseRule>> & { onlyWhileRunning?: boolean } = {},
): RuleDefinitionInput {
  const { onlyWhileRunning = false, ...rest } = over;
  return { ...baseRule(7, { severity: "low", scope: { pointId: 101 }, ...rest }), kind: "sensor_flat", onlyWhileRunning, params };
}

/** 1 Hz charge from 0 to 59 s. */
const FIRST_MINUTE = series(UNWIND, "charge_kv", T0, S, Array.from({ length: 60 }, (_, i) => 3 + 0.5 * Math.sin(i)));

describe("sensor_silent", () => {
  it("is noticed by tick(): raised at last reading + silentS, not before", () => {
    const engine = createRuleEngine({ rules: [silentRule(120)], topology: PLANT });
    expect(pushAll(engine, FIRST_MINUTE)).toEqual([]);
    expect(engine.tick(T0 + 100 * S)).toEqual([]);
    // Last reading at 59 s: silent from 59 + 120 = 179 s. A tick at exactly 179 s does not see it yet.
    expect(engine.tick(T0 + 179 * S)).toEqual([]);
    const raised = engine.tick(T0 + 180 * S);
    expect(brief(raised)).toEqual([["raise", "sensor:fm-gp-unwind", 179]]);
    expect(raised[0].value).toBe(120);
    expect(raised[0].unit).toBe("s");
    expect(raised[0].message).toBe("No data from fm-gp-unwind (Unwind on Gravure press) for 2 min");
    expect(engine.tick(T0 + 600 * S)).toEqual([]);
    expect(engine.activeAlerts().map((a) => a.subjectKey)).toEqual(["sensor:fm-gp-unwind"]);
  });

  it("raises at the same time whatever the tick cadence", () => {
    const run = (tickEveryS: number) => {
      const engine = createRuleEngine({ rules: [silentRule(120, { onDelayS: 30 })], topology: PLANT });
      pushAll(engine, FIRST_MINUTE);
      const out: AlertTransition[] = [];
      for (let s = 60; s <= 600; s += tickEveryS) out.push(...engine.tick(T0 + s * S));
      return out;
    };
    const everySecond = run(1);
    // Silent from 179 s, on-delay 30 s: raise at 209 s.
    expect(brief(everySecond)).toEqual([["raise", "sensor:fm-gp-unwind", 209]]);
    expect(run(60)).toEqual(everySecond);
    expect(run(7)).toEqual(everySecond);
  });

  it("sees a silence that has ended even without ticks, and clears after the off-delay", () => {
    const resumed = series(UNWIND, "charge_kv", T0 + 400 * S, S, repeat(3, 120)); // 400..519 s
    const { transitions } = runRules([silentRule(120, { offDelayS: 60 })], [...FIRST_MINUTE, ...resumed]);
    // Silent 179 s; data again at 400 s; clear at 400 + 60 = 460 s.
    expect(brief(transitions)).toEqual([
      ["raise", "sensor:fm-gp-unwind", 179],
      ["clear", "sensor:fm-gp-unwind", 460],
    ]);
    expect(transitions[1].value).toBe(341); // 59 s -> 400 s
    expect(transitions[1].peakValue).toBe(341);
    expect(transitions[1].message).toBe("Data from fm-gp-unwind (Unwind on Gravure press) again after 5 min 41 s of silence");
  });

  it("stays raised when the sensor falls silent again before the off-delay runs out", () => {
    const engine = createRuleEngine({ rules: [silentRule(120, { offDelayS: 300 })], topology: PLANT });
    const out: AlertTransition[] = [];
    out.push(...pushAll(engine, FIRST_MINUTE));
    out.push(...engine.tick(T0 + 300 * S)); // raise at 179 s
    out.push(...pushAll(engine, series(UNWIND, "charge_kv", T0 + 400 * S, S, [3]))); // one reading at 400 s
    out.push(...engine.tick(T0 + 650 * S)); // silent again from 520 s, before 400 + 300 = 700 s
    out.push(...engine.tick(T0 + 800 * S));
    out.push(...pushAll(engine, series(UNWIND, "charge_kv", T0 + 900 * S, S, repeat(3, 400)))); // 900..1299 s
    // Back from 900 s with no gap of 120 s: clear at 900 + 300 = 1200 s.
    expect(brief(out)).toEqual([
      ["raise", "sensor:fm-gp-unwind", 179],
      ["clear", "sensor:fm-gp-unwind", 1200],
    ]);
    // The longest silence was 400 s -> 900 s.
    expect(out[1].peakValue).toBe(500);
  });

  it("flags a sensor never heard from, counting from the first reading the engine saw", () => {
    const rule = silentRule(120, { scope: {} });
    const engine = createRuleEngine({ rules: [rule], topology: PLANT });
    // Every sensor but the Press Hall logger reports every 10 s for 5 minutes.
    const meters = ["fm-gp-unwind", "fm-gp-deck1", "fm-gp-rewind", "fm-sr-unwind", "fm-sr-rewind"];
    const readings = mergeByTs(
      ...meters.map((key) => series(key, "charge_kv", T0, 10 * S, repeat(2, 31))),
      series("th-conv", "rh_pct", T0, 10 * S, repeat(40, 31)),
      series("gw-gravure", "running", T0, 10 * S, repeat(1, 31)),
      series("gw-slitter", "running", T0, 10 * S, repeat(1, 31)),
    );
    const out = pushAll(engine, readings);
    out.push(...engine.tick(T0 + 300 * S));
    expect(brief(out)).toEqual([["raise", "sensor:th-press", 120]]);
    expect(out[0].message).toBe("No data from th-press (Press Hall) since monitoring started 2 min ago");
  });

  it("counts any channel of the sensor as a sign of life", () => {
    const engine = createRuleEngine({ rules: [silentRule(120, { scope: { areaId: 1 } })], topology: PLANT });
    // The Press Hall logger sends temperature only (its humidity element has failed): not silent.
    pushAll(engine, series("th-press", "temp_c", T0, 30 * S, repeat(18, 20)));
    expect(engine.tick(T0 + 590 * S).filter((t) => t.subjectKey === "sensor:th-press")).toEqual([]);
  });
});

describe("sensor_flat", () => {
  it("raises when a full window varies by no more than the tolerance", () => {
    // Stuck at 3.21 kV, 1 Hz. Window 600 s; full once the oldest reading is 0.9 × 600 = 540 s back.
    const { transitions } = runRules(
      [flatRule({ windowS: 600, tolerance: 0.05 })],
      series(UNWIND, "charge_kv", T0, S, repeat(3.21, 700)),
    );
    expect(brief(transitions)).toEqual([["raise", "sensor:fm-gp-unwind", 540]]);
    expect(transitions[0].value).toBe(0);
    expect(transitions[0].unit).toBe("kV");
    expect(transitions[0].message).toBe(
      "fm-gp-unwind (Unwind on Gravure press) reads flat: charge varied only 0 kV over 10 min (tolerance 0.05 kV); stuck or disconnected?",
    );
  });

  it("does not raise for a live signal that varies by more than the tolerance", () => {
    // ±0.04 kV alternation: range 0.08 kV > 0.05 kV.
    const values = Array.from({ length: 1200 }, (_, i) => 3.2 + (i % 2 === 0 ? 0.04 : -0.04));
    const { transitions } = runRules([flatRule({ windowS: 600, tolerance: 0.05 })], series(UNWIND, "charge_kv", T0, S, values));
    expect(transitions).toEqual([]);
  });

  it("raises for variation within the tolerance and clears as soon as the sensor moves again", () => {
    // ±0.02 kV (range 0.04 ≤ 0.05) for 700 s, then a real signal.
    const stuck = Array.from({ length: 700 }, (_, i) => 3.2 + (i % 2 === 0 ? 0.02 : -0.02));
    const live = Array.from({ length: 60 }, (_, i) => 3.2 + Math.sin(i / 3));
    const { transitions } = runRules(
      [flatRule({ windowS: 600, tolerance: 0.05 })],
      series(UNWIND, "charge_kv", T0, S, [...stuck, ...live]),
    );
    expect(brief(transitions)).toEqual([
      ["raise", "sensor:fm-gp-unwind", 540],
      // First live reading at 700 s is 3.2 + sin(0) = 3.2, inside the old range; at 701 s sin(1/3) = 0.33 kV away.
      ["clear", "sensor:fm-gp-unwind", 701],
    ]);
    expect(transitions[0].value).toBeCloseTo(0.04, 12);
  });

  it("does not raise while the line is stopped when gated (a stopped web reads a steady zero)", () => {
    const readings = mergeByTs(
      [{ sensorKey: "gw-gravure", channel: "running" as const, ts: T0, value: 0 }],
      series(UNWIND, "charge_kv", T0, S, repeat(0.01, 900)),
    );
    expect(runRules([flatRule({ windowS: 600, tolerance: 0.05 }, { onlyWhileRunning: true })], readings).transitions).toEqual([]);
    expect(runRules([flatRule({ windowS: 600, tolerance: 0.05 }, { onlyWhileRunning: false })], readings).transitions).toHaveLength(1);
  });

  it("checks each channel with its own rules: a temperature rule does not hide a humidity rule", () => {
    const rules = [
      flatRule({ channel: "temp_c", windowS: 600, tolerance: 0.01 }, { scope: {} }),
      { ...flatRule({ channel: "rh_pct", windowS: 600, tolerance: 0.01 }, { scope: { areaId: 1 } }), id: 8 },
    ];
    const readings = mergeByTs(
      series("th-press", "temp_c", T0, 30 * S, repeat(19.5, 25)),
      series("th-press", "rh_pct", T0, 30 * S, repeat(41, 25)),
    );
    const { transitions } = runRules(rules, readings);
    expect(transitions.map((t) => [t.ruleId, t.subjectKey, t.unit])).toEqual([
      [7, "sensor:th-press", "°C"],
      [8, "sensor:th-press", "%"],
    ]);
  });
});
