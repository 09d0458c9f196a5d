// Causes before symptoms (lib/alerts/dependency-hold.ts): a dead gateway is one alert, not one
// per sensor behind it; a broker outage is one alert for the whole feed; a lone silent sensor
// still alerts, with its own time.
import { describe, expect, it } from "vitest";
import type { ConditionEvent } from "../../../lib/alerts/condition-merge";
import { createDependencyHold, DEPENDENCY_GRACE_MS, neededSilent, type DependencyParent } from "../../../lib/alerts/dependency-hold";

const T0 = Date.UTC(2026, 0, 12, 8, 0);
const parents: DependencyParent[] = [
  { key: "edge-a", name: "Edge node A", kind: "edge_node", sensorKeys: ["fm-1", "fm-2", "fm-3", "sg-a"] },
  { key: "edge-b", name: "Edge node B", kind: "edge_node", sensorKeys: ["fm-4", "fm-5", "sg-b"] },
  { key: "feed", name: "Data feed", kind: "feed", sensorKeys: ["fm-1", "fm-2", "fm-3", "sg-a", "fm-4", "fm-5", "sg-b", "th-1"] },
];

function silent(sensor: string, type: ConditionEvent["type"], ts: number): ConditionEvent {
  return {
    type,
    conditionKey: `sensor|sensor:${sensor}`,
    family: "sensor",
    subjectKey: `sensor:${sensor}`,
    ruleId: 6,
    ruleVersion: 1,
    raisedTs: ts,
    ts,
    kind: "sensor_silent",
    severity: "medium",
    value: 120,
    peakValue: 120,
    unit: "s",
    message: `${sensor} silent`,
    chattering: false,
    notify: type === "raise",
  };
}

describe("dependency holding", () => {
  it("raises one gateway alert for the sensors behind it and holds theirs; clears it when the last is back", () => {
    const hold = createDependencyHold(parents);
    const out: ConditionEvent[] = [];
    ["fm-1", "fm-2", "fm-3", "sg-a"].forEach((s, i) => out.push(...hold.push(silent(s, "raise", T0 + i * 1000)), ...hold.advance(T0 + i * 1000)));
    out.push(...hold.advance(T0 + 5 * DEPENDENCY_GRACE_MS));
    expect(out.map((e) => [e.type, e.subjectKey])).toEqual([["raise", "gateway:edge-a"]]);
    expect(out[0].raisedTs).toBe(T0);
    expect(out[0].message).toContain("Edge node A silent: 4 of 4");
    expect(hold.held().get("edge-a")?.sort()).toEqual(["fm-1", "fm-2", "fm-3", "sg-a"]);
    const back: ConditionEvent[] = [];
    for (const s of ["fm-1", "fm-2", "fm-3"]) back.push(...hold.push(silent(s, "clear", T0 + 600_000)));
    expect(back).toEqual([]);
    const last = hold.push(silent("sg-a", "clear", T0 + 601_000));
    expect(last.map((e) => [e.type, e.subjectKey, e.ts])).toEqual([["clear", "gateway:edge-a", T0 + 601_000]]);
  });

  it("lets a lone silent sensor through after the grace, with its own raise time", () => {
    const hold = createDependencyHold(parents);
    expect(hold.push(silent("fm-4", "raise", T0))).toEqual([]);
    expect(hold.advance(T0 + DEPENDENCY_GRACE_MS - 1)).toEqual([]);
    const out = hold.advance(T0 + DEPENDENCY_GRACE_MS);
    expect(out.map((e) => [e.type, e.subjectKey, e.raisedTs])).toEqual([["raise", "sensor:fm-4", T0]]);
    expect(hold.push(silent("fm-4", "clear", T0 + 60_000)).map((e) => e.type)).toEqual(["clear"]);
  });

  it("makes a broker outage one alert for the whole feed, not one per gateway", () => {
    const hold = createDependencyHold(parents);
    const out: ConditionEvent[] = [];
    for (const s of parents[2].sensorKeys) out.push(...hold.push(silent(s, "raise", T0 + 500)));
    out.push(...hold.advance(T0 + 2 * DEPENDENCY_GRACE_MS));
    expect(neededSilent(parents[2])).toBe(7); // 80 % of 8, rounded up
    expect(out.map((e) => e.subjectKey)).toEqual(["gateway:feed"]);
  });

  it("passes other alerts of the same sensors through untouched", () => {
    const hold = createDependencyHold(parents);
    const flat: ConditionEvent = { ...silent("fm-1", "raise", T0), kind: "sensor_flat", conditionKey: "sensor|sensor:fm-1" };
    expect(hold.push(flat)).toEqual([flat]);
  });
});
