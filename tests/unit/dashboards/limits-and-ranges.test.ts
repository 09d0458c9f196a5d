// Which limit a chart draws (db/queries/limits.ts, pure resolvers) and the line page's ranges.
import { describe, expect, it } from "vitest";
import { resolveChargeLimit, resolveRhLimit, type LimitRule } from "@/db/queries/limits";
import { parseRangeParams, rangeToQuery, resolveRange } from "@/components/charts/ranges";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";

const rule = (ruleId: number, kind: LimitRule["kind"], scope: Partial<LimitRule>, params: unknown): LimitRule => ({
  ruleId,
  kind,
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
    const high = rule(9, "charge_high", { lineId: 2 }, { limitKv: 20, clearKv: 18 });
    const medium = rule(10, "charge_high", { lineId: 2 }, { limitKv: 12, clearKv: 10 });
    expect(resolveChargeLimit(at, [high, medium])).toMatchObject({ limitKv: 12, ruleId: 10 });
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
