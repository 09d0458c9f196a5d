// The late-span re-check (lib/rules/late-span.ts): which sensors a late span pulls in, how much
// stored context it replays, and which excursions it reports as found late, quiet, already known
// or still present. Expected times follow from the rule definitions in the test (on-delay 10 s,
// clear below 8 kV; the engine contract in lib/rules/engine.ts) and the readings given.
import { describe, expect, it } from "vitest";
import { lateLookbackMs, lateSpanScope, recheckLateSpan, LATE_LOOKBACK_MIN_MS } from "../../../lib/rules/late-span";
import { ruleListSchema, type Reading, type RuleDefinitionInput } from "../../../lib/rules/types";
import { baseRule, chargeHighRule, mergeByTs, MIN, PLANT, repeat, S, series, T0 } from "./fixtures";

const rules = ruleListSchema.parse([chargeHighRule(1, { limitKv: 10, clearKv: 8 }, { onDelayS: 10 })]);

/** fm-gp-unwind every 5 s for 40 min from T0: 3 kV, with 12 kV from minute 10 to minute 15 (exclusive). */
function unwindWithExcursion(): Reading[] {
  const values = Array.from({ length: 480 }, (_, i) => (i >= 120 && i < 180 ? 12 : 3));
  return series("fm-gp-unwind", "charge_kv", T0, 5 * S, values);
}

describe("late span scope", () => {
  it("takes the whole line of a late field meter, and nothing of other lines or halls", () => {
    const scope = lateSpanScope(PLANT, new Set(["fm-gp-deck1"]));
    const codes = scope.sensors.map((s) => s.code).sort();
    expect(codes).toEqual(["fm-gp-deck1", "fm-gp-rewind", "fm-gp-unwind", "gw-gravure"]);
    expect(scope.sensors.find((s) => s.code === "gw-gravure")?.channels.sort()).toEqual(["running", "speed_mpm"]);
    expect(scope.topology.areas.every((a) => a.climateSensorKey === null)).toBe(true);
    expect(scope.topology.points.find((p) => p.pointId === 201)?.fieldMeterSensorKey).toBeNull();
  });

  it("takes a hall's logger alone when only the logger is late", () => {
    const scope = lateSpanScope(PLANT, new Set(["th-conv"]));
    expect(scope.sensors).toEqual([{ code: "th-conv", channels: ["rh_pct", "temp_c"] }]);
  });
});

describe("late span look-back", () => {
  it("covers the longest on-delay plus window, a minute more, at least five minutes", () => {
    expect(lateLookbackMs(rules)).toBe(LATE_LOOKBACK_MIN_MS);
    const withRate = ruleListSchema.parse([
      { ...baseRule(2, { onDelayS: 60 }), kind: "charge_rate", onlyWhileRunning: false, params: { rateKvPerMin: 2, clearRateKvPerMin: 1, windowS: 600 } } satisfies RuleDefinitionInput,
    ]);
    // (60 s + 600 s) + 60 s = 720 s
    expect(lateLookbackMs(withRate)).toBe(720 * S);
  });
});

describe("re-checking a late span", () => {
  const span = { fromTs: T0 + 5 * MIN, toTs: T0 + 25 * MIN };
  const base = { rules, topology: PLANT, span, known: [], quietAfterMs: 15 * MIN };

  it("finds an excursion inside the span, raised after its on-delay and ended when it cleared; quiet when it ended long ago", () => {
    const out = recheckLateSpan({ ...base, readings: unwindWithExcursion(), nowMs: T0 + 2 * 60 * MIN });
    expect(out.findings).toHaveLength(1);
    const f = out.findings[0];
    expect(f.raise.subjectKey).toBe("point:101");
    expect(f.raise.kind).toBe("charge_high");
    // 12 kV from T0+10 min; on-delay 10 s with readings every 5 s → raised at T0+10 min 10 s
    expect(f.raise.raisedTs).toBe(T0 + 10 * MIN + 10 * S);
    // back to 3 kV at T0+15 min (below the 8 kV clear level, no off-delay)
    expect(f.endedTs).toBe(T0 + 15 * MIN);
    expect(f.clear.peakValue).toBe(12);
    expect(f.quiet).toBe(true);
    expect(out.stillPresent).toEqual([]);
  });

  it("pages (is not quiet) when the excursion ended within the quiet time", () => {
    const out = recheckLateSpan({ ...base, readings: unwindWithExcursion(), nowMs: T0 + 25 * MIN });
    expect(out.findings.map((f) => f.quiet)).toEqual([false]);
  });

  it("leaves an excursion the history already holds alone", () => {
    const known = [{ ruleId: 1, subjectKey: "point:101", startTs: T0 + 11 * MIN, endTs: T0 + 14 * MIN }];
    const out = recheckLateSpan({ ...base, known, readings: unwindWithExcursion(), nowMs: T0 + 2 * 60 * MIN });
    expect(out.findings).toEqual([]);
    expect(out.alreadyKnown).toBe(1);
    // the same rule on another point is another excursion
    const other = recheckLateSpan({ ...base, known: [{ ...known[0], subjectKey: "point:102" }], readings: unwindWithExcursion(), nowMs: T0 + 2 * 60 * MIN });
    expect(other.findings).toHaveLength(1);
  });

  it("ignores excursions outside the late span", () => {
    const out = recheckLateSpan({ ...base, span: { fromTs: T0 + 20 * MIN, toTs: T0 + 30 * MIN }, readings: unwindWithExcursion(), nowMs: T0 + 2 * 60 * MIN });
    expect(out.findings).toEqual([]);
  });

  it("reports a condition still present at the end of the readings instead of a finding", () => {
    const readings = series("fm-gp-unwind", "charge_kv", T0, 5 * S, [...repeat(3, 120), ...repeat(12, 120)]);
    const out = recheckLateSpan({ ...base, readings, nowMs: T0 + 21 * MIN });
    expect(out.findings).toEqual([]);
    expect(out.stillPresent).toEqual([{ ruleId: 1, subjectKey: "point:101", raisedTs: T0 + 10 * MIN + 10 * S }]);
  });

  it("does not judge silence from a late upload", () => {
    const silent = ruleListSchema.parse([{ ...baseRule(3), kind: "sensor_silent", onlyWhileRunning: false, params: { silentS: 60 } } satisfies RuleDefinitionInput]);
    // a 10-minute hole in the uploaded data
    const readings = mergeByTs(series("fm-gp-unwind", "charge_kv", T0, 5 * S, repeat(3, 120)), series("fm-gp-unwind", "charge_kv", T0 + 20 * MIN, 5 * S, repeat(3, 60)));
    const out = recheckLateSpan({ ...base, rules: silent, readings, nowMs: T0 + 2 * 60 * MIN });
    expect(out.findings).toEqual([]);
    expect(out.stillPresent).toEqual([]);
  });
});
