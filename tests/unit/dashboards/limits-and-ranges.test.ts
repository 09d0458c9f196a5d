// Which limit a chart draws (lib/rules/limits-in-force.ts, the one resolver) and the line page's ranges.
import { describe, expect, it } from "vitest";
import { chartChargeLimit as resolveChargeLimit, chartRhLimit as resolveRhLimit, type StoredRule } from "@/lib/rules/limits-in-force";
import { resolveRulesForLocation } from "@/lib/rules/scope";
import { ruleDefinitionSchema } from "@/lib/rules";
import { parseRangeParams, rangeToQuery, resolveRange } from "@/components/charts/ranges";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";

const rule = (ruleId: number, kind: "charge_high" | "rh_low", scope: Partial<StoredRule>, params: unknown): StoredRule => ({
  ruleId,
  kind,
  name: `rule ${ruleId}`,
  enabled: true,
  severity: "medium",
  pointId: null,
  lineId: null,
  areaId: null,
  ...scope,
  params,
});

const at = { pointId: 11, lineId: 2, areaId: 1 };

describe("charge limit", () => {
  const plant = rule(1, "charge_high", {}, { limitKv: 12, clearKv: 10 });
  it("takes the most specific rule: point, else line, else area, else plant-wide", () => {
    const area = rule(2, "charge_high", { areaId: 1 }, { limitKv: 15, clearKv: 12 });
    const line = rule(3, "charge_high", { lineId: 2 }, { limitKv: 9, clearKv: 7 });
    const point = rule(4, "charge_high", { pointId: 11, lineId: 2, areaId: 1 }, { limitKv: 20, clearKv: 17 });
    expect(resolveChargeLimit(at, [plant])).toMatchObject({ limitKv: 12, level: "plant" });
    expect(resolveChargeLimit(at, [plant, area])).toMatchObject({ limitKv: 15, level: "area" });
    expect(resolveChargeLimit(at, [plant, area, line])).toMatchObject({ limitKv: 9, level: "line" });
    expect(resolveChargeLimit(at, [plant, area, line, point])).toMatchObject({ limitKv: 20, level: "point", ruleId: 4 });
  });
  it("ignores other points', lines' and halls' rules and unreadable params", () => {
    const others = [
      rule(5, "charge_high", { pointId: 99 }, { limitKv: 1, clearKv: 0.5 }),
      rule(6, "charge_high", { lineId: 7 }, { limitKv: 1, clearKv: 0.5 }),
      rule(7, "charge_high", { areaId: 3 }, { limitKv: 1, clearKv: 0.5 }),
      rule(8, "charge_high", { lineId: 2 }, { limitKv: "high" }),
    ];
    expect(resolveChargeLimit(at, [plant, ...others])).toMatchObject({ limitKv: 12, level: "plant" });
    expect(resolveChargeLimit(at, [])).toBeNull();
  });
  it("draws the lower of two limits at the same level (the first a rising value meets)", () => {
    const high = rule(9, "charge_high", { lineId: 2, severity: "high" }, { limitKv: 20, clearKv: 18 });
    const medium = rule(10, "charge_high", { lineId: 2 }, { limitKv: 12, clearKv: 10 });
    expect(resolveChargeLimit(at, [high, medium])).toMatchObject({ limitKv: 12, ruleId: 10 });
  });
});

describe("a disabled point rule", () => {
  // The chart and the engine must agree: a disabled rule at a point takes the point's level and
  // applies nothing, so the line default neither alerts there nor is drawn there.
  const lineRule = rule(1, "charge_high", { lineId: 2 }, { limitKv: 12, clearKv: 10 });
  const exemption = rule(2, "charge_high", { pointId: 11, lineId: 2, areaId: 1 }, { limitKv: 30, clearKv: 25 });
  exemption.enabled = false;
  const asDefinition = (r: StoredRule) =>
    ruleDefinitionSchema.parse({
      id: r.ruleId,
      version: 1,
      kind: r.kind,
      severity: r.severity,
      scope: { ...(r.pointId !== null ? { pointId: r.pointId } : {}), ...(r.lineId !== null ? { lineId: r.lineId } : {}), ...(r.areaId !== null ? { areaId: r.areaId } : {}) },
      onDelayS: 10,
      offDelayS: 10,
      onlyWhileRunning: true,
      enabled: r.enabled,
      params: r.params,
    });
  it("is an exemption: no limit drawn and no rule for the engine to alert on", () => {
    expect(resolveChargeLimit(at, [lineRule, exemption])).toBeNull();
    expect(resolveRulesForLocation("charge_high", at, [lineRule, exemption].map(asDefinition))).toEqual([]);
  });
  it("leaves the other points of the line on the line's limit, for both", () => {
    const other = { pointId: 12, lineId: 2, areaId: 1 };
    expect(resolveChargeLimit(other, [lineRule, exemption])).toMatchObject({ limitKv: 12, ruleId: 1, level: "line" });
    expect(resolveRulesForLocation("charge_high", other, [lineRule, exemption].map(asDefinition)).map((r) => r.rule.id)).toEqual([1]);
  });
  it("exempts only its own severity", () => {
    const highLine = rule(3, "charge_high", { lineId: 2, severity: "high" }, { limitKv: 20, clearKv: 18 });
    expect(resolveChargeLimit(at, [lineRule, exemption, highLine])).toMatchObject({ limitKv: 20, ruleId: 3 });
    expect(resolveRulesForLocation("charge_high", at, [lineRule, exemption, highLine].map(asDefinition)).map((r) => r.rule.id)).toEqual([3]);
  });
});

describe("humidity limit", () => {
  it("takes the hall's rh_low rule, else the plant-wide one, else the hall's own minimum", () => {
    const plant = rule(1, "rh_low", {}, { limitPct: 30, clearPct: 33 });
    const hall = rule(2, "rh_low", { areaId: 1 }, { limitPct: 35, clearPct: 38 });
    expect(resolveRhLimit({ areaId: 1, rhMinPct: 40 }, [plant, hall])).toMatchObject({ limitPct: 35, level: "area" });
    expect(resolveRhLimit({ areaId: 2, rhMinPct: 40 }, [plant, hall])).toMatchObject({ limitPct: 30, level: "plant" });
    expect(resolveRhLimit({ areaId: 2, rhMinPct: 40 }, [])).toEqual({ limitPct: 40, clearPct: null, ruleId: null, level: "hall band" });
  });
});

describe("time ranges", () => {
  const now = Date.UTC(2026, 0, 14, 15, 30);
  const spec = { timeZone: "Europe/London", shifts: DEFAULT_PLANT_SETTINGS.shifts };
  it("resolves each range against now and the plant's shifts", () => {
    expect(resolveRange({ kind: "live" }, now, spec)).toEqual([now - 15 * 60_000, now]);
    expect(resolveRange({ kind: "shift" }, now, spec)).toEqual([Date.UTC(2026, 0, 14, 14, 0), now]);
    expect(resolveRange({ kind: "7d" }, now, spec)).toEqual([now - 7 * 86_400_000, now]);
    expect(resolveRange({ kind: "custom", from: 1000, to: 5000 }, now, spec)).toEqual([1000, 5000]);
  });
  it("reads and writes the URL form, refusing nonsense", () => {
    const q = (s: string) => parseRangeParams((k) => new URLSearchParams(s).get(k));
    expect(q("range=7d")).toEqual({ kind: "7d" });
    expect(q("range=custom&from=10&to=20")).toEqual({ kind: "custom", from: 10, to: 20 });
    expect(q("range=custom&from=20&to=10")).toEqual({ kind: "24h" });
    expect(q("range=forever")).toEqual({ kind: "live" });
    expect(rangeToQuery({ kind: "30d" })).toBe("?range=30d");
    expect(rangeToQuery({ kind: "live" })).toBe("");
  });
});
