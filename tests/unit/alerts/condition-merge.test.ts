// One alert per condition (lib/alerts/condition-merge.ts): the 12 kV and 20 kV rules on one
// point make one alert that escalates and eases in steps; the humidity forecast and the low-RH
// rule on one hall make one alert; a clearly worse peak is notified again.
import { describe, expect, it } from "vitest";
import { createConditionMerger } from "../../../lib/alerts/condition-merge";
import type { AlertTransition } from "../../../lib/rules/types";

const T0 = Date.UTC(2026, 0, 12, 8, 0);
const S = 1000;

function t(over: Partial<AlertTransition> & Pick<AlertTransition, "ruleId" | "type" | "ts">): AlertTransition {
  return {
    ruleVersion: 1,
    subjectKey: "point:3",
    kind: "charge_high",
    severity: "medium",
    raisedTs: over.ts,
    value: 13,
    peakValue: 13,
    unit: "kV",
    message: "m",
    chattering: false,
    ...over,
  };
}

describe("one alert per condition", () => {
  it("escalates medium → high on the same alert and notifies again, then eases and clears in steps", () => {
    const m = createConditionMerger();
    const raise = m.push(t({ ruleId: 1, type: "raise", ts: T0 }));
    expect(raise.map((e) => [e.type, e.severity, e.notify])).toEqual([["raise", "medium", true]]);
    const up = m.push(t({ ruleId: 2, type: "raise", ts: T0 + 40 * S, severity: "high", value: 21, peakValue: 21 }));
    expect(up).toHaveLength(1);
    expect(up[0]).toMatchObject({ type: "escalate", severity: "high", previousSeverity: "medium", notify: true, ruleId: 1, raisedTs: T0 });
    // the 20 kV rule clears first: the alert eases to medium, nobody is told
    const down = m.push(t({ ruleId: 2, type: "clear", ts: T0 + 200 * S, severity: "high", raisedTs: T0 + 40 * S }));
    expect(down.map((e) => [e.type, e.severity, e.previousSeverity, e.notify])).toEqual([["ease", "medium", "high", false]]);
    const end = m.push(t({ ruleId: 1, type: "clear", ts: T0 + 300 * S }));
    expect(end.map((e) => [e.type, e.ruleId, e.raisedTs])).toEqual([["clear", 1, T0]]);
    expect(m.openKeys()).toEqual([]);
  });

  it("keeps two points apart, and the forecast and low-RH rules of one hall together", () => {
    const m = createConditionMerger();
    expect(m.push(t({ ruleId: 1, type: "raise", ts: T0 }))[0].type).toBe("raise");
    expect(m.push(t({ ruleId: 1, type: "raise", ts: T0, subjectKey: "point:4" }))[0].type).toBe("raise");
    const forecast = m.push(t({ ruleId: 5, type: "raise", ts: T0, subjectKey: "area:1", kind: "rh_forecast", severity: "low", value: 33, peakValue: 33, unit: "%" }));
    const low = m.push(t({ ruleId: 4, type: "raise", ts: T0 + 3_600 * S, subjectKey: "area:1", kind: "rh_low", severity: "medium", value: 29, peakValue: 29, unit: "%" }));
    expect(forecast[0].type).toBe("raise");
    expect(low[0]).toMatchObject({ type: "escalate", kind: "rh_low", severity: "medium", ruleId: 5 });
    expect(m.openKeys()).toHaveLength(3);
  });

  it("notifies again when the peak is a quarter worse than the one last told, not on every update", () => {
    const m = createConditionMerger();
    m.push(t({ ruleId: 1, type: "raise", ts: T0, value: -12.5, peakValue: -12.5 }));
    const small = m.push(t({ ruleId: 1, type: "update", ts: T0 + 60 * S, raisedTs: T0, value: -14, peakValue: -14 }));
    expect(small.map((e) => [e.type, e.notify])).toEqual([["update", false]]);
    const big = m.push(t({ ruleId: 1, type: "update", ts: T0 + 120 * S, raisedTs: T0, value: -16, peakValue: -16 }));
    expect(big.map((e) => [e.type, e.notify, e.peakValue])).toEqual([["worse", true, -16]]);
    // the next "worse" needs a quarter more than −16
    expect(m.push(t({ ruleId: 1, type: "update", ts: T0 + 180 * S, raisedTs: T0, value: -19, peakValue: -19 }))[0].type).toBe("update");
    expect(m.push(t({ ruleId: 1, type: "update", ts: T0 + 240 * S, raisedTs: T0, value: -20.5, peakValue: -20.5 }))[0].type).toBe("worse");
  });

  it("keeps the clear's peak: a silence's length is known only when it ends", () => {
    const m = createConditionMerger();
    m.push(t({ ruleId: 6, type: "raise", ts: T0, subjectKey: "sensor:fm-a", kind: "sensor_silent", unit: "s", value: 120, peakValue: 120 }));
    const end = m.push(t({ ruleId: 6, type: "clear", ts: T0 + 7200 * S, raisedTs: T0, subjectKey: "sensor:fm-a", kind: "sensor_silent", unit: "s", value: 7320, peakValue: 7320 }));
    expect(end.map((e) => [e.type, e.peakValue])).toEqual([["clear", 7320]]);
  });

  it("continues from a snapshot", () => {
    const a = createConditionMerger();
    a.push(t({ ruleId: 1, type: "raise", ts: T0 }));
    const b = createConditionMerger(JSON.parse(JSON.stringify(a.snapshot())));
    expect(b.push(t({ ruleId: 2, type: "raise", ts: T0 + S, severity: "high" }))[0].type).toBe("escalate");
  });
});
