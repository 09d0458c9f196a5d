// The limits editor's backtest plumbing (lib/rules/replay-scope.ts): which sensors a replay of one
// kind within a scope needs, and the time-ordered merge of their series.
import { describe, expect, it } from "vitest";
import { mergeSeries, scopeTopologyForReplay } from "../../../lib/rules/replay-scope";
import type { Topology } from "../../../lib/rules";

const PLANT: Topology = {
  areas: [
    { areaId: 1, name: "Press Hall", climateSensorKey: "th-press" },
    { areaId: 2, name: "Converting Hall", climateSensorKey: "th-conv" },
  ],
  lines: [
    { lineId: 10, areaId: 1, name: "Gravure Press 1", pointIds: [101, 102], runningSensorKey: "sg-gravure", speedSensorKey: "sg-gravure" },
    { lineId: 20, areaId: 2, name: "Slitter S1", pointIds: [201], runningSensorKey: "sg-slitter", speedSensorKey: "sg-slitter" },
  ],
  points: [
    { pointId: 101, name: "Unwind", fieldMeterSensorKey: "fm-unwind" },
    { pointId: 102, name: "Infeed", fieldMeterSensorKey: "fm-infeed" },
    { pointId: 201, name: "Unwind", fieldMeterSensorKey: "fm-s-unwind" },
  ],
  neutralizers: [{ neutralizerId: 7, name: "N-INFEED", beforePointId: 101, afterPointId: 102 }],
};

const keys = (t: Topology) => ({
  meters: t.points.filter((p) => p.fieldMeterSensorKey).map((p) => p.fieldMeterSensorKey),
  gateways: t.lines.filter((l) => l.runningSensorKey).map((l) => l.runningSensorKey),
  loggers: t.areas.filter((a) => a.climateSensorKey).map((a) => a.climateSensorKey),
});

describe("scopeTopologyForReplay", () => {
  it("a point's charge rule needs that point's meter and its line's running signal only", () => {
    expect(keys(scopeTopologyForReplay(PLANT, "charge_high", { pointId: 102, lineId: null, areaId: null }, null))).toEqual({ meters: ["fm-infeed"], gateways: ["sg-gravure"], loggers: [] });
  });
  it("a neutralizer's effect rule at the point after it also needs the meter before it", () => {
    expect(keys(scopeTopologyForReplay(PLANT, "effect_loss", { pointId: 102, lineId: null, areaId: null }, null)).meters).toEqual(["fm-unwind", "fm-infeed"]);
  });
  it("a hall's humidity rule needs only that hall's logger", () => {
    expect(keys(scopeTopologyForReplay(PLANT, "rh_forecast", { pointId: null, lineId: null, areaId: 2 }, null))).toEqual({ meters: [], gateways: [], loggers: ["th-conv"] });
  });
  it("a plant-wide charge rule needs every meter and gateway", () => {
    expect(keys(scopeTopologyForReplay(PLANT, "charge_rate", { pointId: null, lineId: null, areaId: null }, null))).toEqual({ meters: ["fm-unwind", "fm-infeed", "fm-s-unwind"], gateways: ["sg-gravure", "sg-slitter"], loggers: [] });
  });
  it("a line's silent rule needs the line's meters and gateway, not the hall logger", () => {
    expect(keys(scopeTopologyForReplay(PLANT, "sensor_silent", { pointId: null, lineId: 20, areaId: 2 }, null))).toEqual({ meters: ["fm-s-unwind"], gateways: ["sg-slitter"], loggers: [] });
  });
});

describe("mergeSeries", () => {
  it("merges per-sensor series into time order, ties in series order", () => {
    const merged = mergeSeries([
      { code: "a", channel: "charge_kv", ts: [1, 3, 5], values: [10, 30, 50] },
      { code: "b", channel: "running", ts: [2, 3, 6], values: [1, 1, 0] },
    ]);
    expect(merged.map((r) => `${r.sensorKey}@${r.ts}=${r.value}`)).toEqual(["a@1=10", "b@2=1", "a@3=30", "b@3=1", "a@5=50", "b@6=0"]);
  });
  it("handles empty series", () => {
    expect(mergeSeries([{ code: "a", channel: "rh_pct", ts: [], values: [] }])).toEqual([]);
  });
});
