/**
 * Rule definition schemas (what the limits editor validates), scope precedence and the
 * default rules.
 */
import { describe, expect, it } from "vitest";
import { DEFAULT_RULES } from "../../../lib/rules/defaults";
import { resolveChargeLimit, resolveRulesForLocation } from "../../../lib/rules/scope";
import { ruleDefinitionSchema, ruleListSchema, topologySchema, type RuleDefinition } from "../../../lib/rules/types";
import { PLANT, chargeHighRule } from "./fixtures";

function issuesOf(input: unknown): { path: string; message: string }[] {
  const result = ruleDefinitionSchema.safeParse(input);
  if (result.success) return [];
  return result.error.issues.map((i) => ({ path: i.path.join("."), message: i.message }));
}

const base = { id: 1, version: 1, severity: "medium", scope: {}, onDelayS: 10, offDelayS: 30 };

describe("rule definition schema", () => {
  it("accepts a valid charge limit and fills in defaults", () => {
    const parsed = ruleDefinitionSchema.parse({ ...base, kind: "charge_high", onlyWhileRunning: true, params: { limitKv: 12, clearKv: 10 } });
    expect(parsed.enabled).toBe(true);
  });

  it("requires the clear level on the safe side of the limit", () => {
    expect(issuesOf({ ...base, kind: "charge_high", onlyWhileRunning: true, params: { limitKv: 12, clearKv: 12 } })).toEqual([
      { path: "params.clearKv", message: "The clear level must be below the limit (on the safe side)" },
    ]);
    expect(issuesOf({ ...base, kind: "rh_low", onlyWhileRunning: false, params: { limitPct: 30, clearPct: 28 } })).toEqual([
      { path: "params.clearPct", message: "The clear level must be above the limit (on the safe side)" },
    ]);
    expect(issuesOf({ ...base, kind: "charge_rate", onlyWhileRunning: true, params: { rateKvPerMin: 3, clearRateKvPerMin: 4, windowS: 120 } })).toEqual([
      { path: "params.clearRateKvPerMin", message: "The clear rate must be below the rate limit (on the safe side)" },
    ]);
    expect(
      issuesOf({ ...base, kind: "effect_loss", onlyWhileRunning: true, params: { minReductionFraction: 0.5, clearReductionFraction: 0.4, windowS: 300 } }),
    ).toEqual([{ path: "params.clearReductionFraction", message: "The clear reduction must be at least the required reduction (on the safe side)" }]);
  });

  it("refuses negative delays and absurd windows", () => {
    expect(issuesOf({ ...base, onDelayS: -1, kind: "sensor_silent", onlyWhileRunning: false, params: { silentS: 120 } })).toEqual([
      { path: "onDelayS", message: "A delay cannot be negative" },
    ]);
    expect(issuesOf({ ...base, kind: "sensor_flat", onlyWhileRunning: true, params: { windowS: 5, tolerance: 0.05 } })).toEqual([
      { path: "params.windowS", message: "Window must be at least 10 s" },
    ]);
  });

  it("does not let area-wide humidity or silence rules depend on one line running", () => {
    const issues = issuesOf({ ...base, kind: "rh_low", onlyWhileRunning: true, params: { limitPct: 30, clearPct: 33 } });
    expect(issues).toEqual([
      { path: "onlyWhileRunning", message: "This kind of rule does not depend on a line running; set onlyWhileRunning to false" },
    ]);
  });

  it("refuses an unknown kind and an unknown flat channel", () => {
    expect(ruleDefinitionSchema.safeParse({ ...base, kind: "charge_low", onlyWhileRunning: false, params: {} }).success).toBe(false);
    expect(
      ruleDefinitionSchema.safeParse({ ...base, kind: "sensor_flat", onlyWhileRunning: false, params: { channel: "running", windowS: 60, tolerance: 0 } }).success,
    ).toBe(false);
  });
});

describe("scope precedence", () => {
  const rules: RuleDefinition[] = ruleListSchema.parse([
    chargeHighRule(1, { limitKv: 12, clearKv: 10 }, { scope: {} }),
    chargeHighRule(2, { limitKv: 20, clearKv: 17 }, { scope: {}, severity: "high" }),
    chargeHighRule(3, { limitKv: 8, clearKv: 6 }, { scope: { areaId: 1 } }),
    chargeHighRule(4, { limitKv: 10, clearKv: 8 }, { scope: { lineId: 10 } }),
    chargeHighRule(5, { limitKv: 15, clearKv: 13 }, { scope: { pointId: 101 } }),
    { ...chargeHighRule(6, { limitKv: 12, clearKv: 10 }, { scope: { pointId: 103 }, severity: "high" }), enabled: false },
  ]);
  const limitsAt = (pointId: number, lineId: number, areaId: number) =>
    resolveChargeLimit(pointId, lineId, areaId, rules).map((r) => [r.rule.id, r.level]);

  it("takes the point's own limit, else the line's, else the area's, else the plant's, per severity", () => {
    expect(limitsAt(101, 10, 1)).toEqual([
      [2, "plant"],
      [5, "point"],
    ]);
    expect(limitsAt(102, 10, 1)).toEqual([
      [2, "plant"],
      [4, "line"],
    ]);
    // A point on another line in the Press Hall (no line rule there): the area's.
    expect(limitsAt(999, 11, 1)).toEqual([
      [2, "plant"],
      [3, "area"],
    ]);
    expect(limitsAt(201, 20, 2)).toEqual([
      [1, "plant"],
      [2, "plant"],
    ]);
  });

  it("a disabled point rule exempts that point from the defaults of its severity", () => {
    expect(limitsAt(103, 10, 1)).toEqual([[4, "line"]]);
  });

  it("a sensor rule scoped to an area reaches every sensor there, and no other", () => {
    const silent = ruleListSchema.parse([
      { ...base, id: 9, kind: "sensor_silent", onlyWhileRunning: false, scope: { areaId: 2 }, params: { silentS: 60 } },
    ]);
    expect(resolveRulesForLocation("sensor_silent", { pointId: 201, lineId: 20, areaId: 2 }, silent)).toHaveLength(1);
    expect(resolveRulesForLocation("sensor_silent", { areaId: 2 }, silent)).toHaveLength(1);
    expect(resolveRulesForLocation("sensor_silent", { pointId: 101, lineId: 10, areaId: 1 }, silent)).toHaveLength(0);
  });
});

describe("default rules", () => {
  it("parse, have unique ids, and cover every rule kind", () => {
    expect(new Set(DEFAULT_RULES.map((r) => r.id)).size).toBe(DEFAULT_RULES.length);
    expect(new Set(DEFAULT_RULES.map((r) => r.kind))).toEqual(
      new Set(["charge_high", "charge_rate", "rh_low", "rh_forecast", "sensor_silent", "sensor_flat", "effect_loss"]),
    );
  });

  it("carry the plant's default settings (common practice, from memory)", () => {
    const byKindSeverity = (kind: string, severity: string) => DEFAULT_RULES.find((r) => r.kind === kind && r.severity === severity);
    expect(byKindSeverity("charge_high", "medium")).toMatchObject({ onDelayS: 10, offDelayS: 30, params: { limitKv: 12, clearKv: 10 } });
    expect(byKindSeverity("charge_high", "high")).toMatchObject({ params: { limitKv: 20 } });
    expect(DEFAULT_RULES.find((r) => r.kind === "rh_low")).toMatchObject({ onDelayS: 120, params: { limitPct: 30, clearPct: 33 } });
    expect(DEFAULT_RULES.find((r) => r.kind === "rh_forecast")).toMatchObject({ params: { limitPct: 30, horizonMin: 60, windowMin: 30 } });
    expect(DEFAULT_RULES.find((r) => r.kind === "sensor_silent")).toMatchObject({ params: { silentS: 120 } });
    expect(DEFAULT_RULES.find((r) => r.kind === "sensor_flat")).toMatchObject({ params: { windowS: 600, tolerance: 0.05 } });
    expect(DEFAULT_RULES.find((r) => r.kind === "effect_loss")).toMatchObject({ params: { minReductionFraction: 0.5, windowS: 300 } });
    expect(DEFAULT_RULES.find((r) => r.kind === "charge_rate")).toMatchObject({ params: { rateKvPerMin: 3, windowS: 120 } });
  });
});

describe("topology schema", () => {
  it("accepts the test plant", () => {
    expect(topologySchema.safeParse(PLANT).success).toBe(true);
  });

  it("refuses a point on no line, a line in an unknown area and a field meter used twice", () => {
    const broken = {
      ...PLANT,
      lines: [...PLANT.lines, { lineId: 30, areaId: 9, name: "Bag machine", pointIds: [], runningSensorKey: null, speedSensorKey: null }],
      points: [...PLANT.points, { pointId: 301, name: "Infeed", fieldMeterSensorKey: "fm-gp-unwind" }],
    };
    const result = topologySchema.safeParse(broken);
    expect(result.success).toBe(false);
    const messages = result.success ? [] : result.error.issues.map((i) => i.message);
    expect(messages).toEqual(
      expect.arrayContaining([
        "Line 30 refers to unknown area 9",
        "Point 301 is on no line",
        "Field meter fm-gp-unwind is assigned to points 101 and 301",
      ]),
    );
  });
});
