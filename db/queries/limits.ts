// Limits to draw on charts and to judge point states: a small read model over `rules` and
// their current `rule_versions`. Resolution (most specific enabled rule wins):
//   charge: the point's charge_high rule, else its line's, else its area's, else the plant-wide
//           one (pointId, lineId and areaId all null); params { limitKv, clearKv }.
//   humidity: the area's rh_low rule, else the plant-wide one; params { limitPct, clearPct };
//           else the hall's own rhMinPct (areas table) with no clear level.
// When one level holds several enabled rules (e.g. a medium and a high severity), the lowest
// charge limit / the highest humidity limit is used: the first one a drifting value meets.
// The alerts engine has its own, fuller resolution (lib/rules/scope.ts); this one only answers
// "which line do I draw".
import { and, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "../client";
import { rules, ruleVersions } from "../schema";

export type ScopeLevel = "point" | "line" | "area" | "plant";

export type LimitRule = {
  ruleId: number;
  kind: "charge_high" | "rh_low";
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  params: unknown;
};

export type ChargeLimit = { limitKv: number; clearKv: number; ruleId: number; level: ScopeLevel };
export type RhLimit = { limitPct: number; clearPct: number | null; ruleId: number | null; level: "area" | "plant" | "hall band" };

const chargeParams = z.object({ limitKv: z.number().positive(), clearKv: z.number().min(0) });
const rhParams = z.object({ limitPct: z.number().min(0).max(100), clearPct: z.number().min(0).max(100) });

/** Enabled charge_high and rh_low rules with the params of their current version. */
export async function listLimitRules(db: Db): Promise<LimitRule[]> {
  const rows = await db
    .select({
      ruleId: rules.id,
      kind: rules.kind,
      pointId: rules.pointId,
      lineId: rules.lineId,
      areaId: rules.areaId,
      params: ruleVersions.params,
    })
    .from(rules)
    .innerJoin(ruleVersions, and(eq(ruleVersions.ruleId, rules.id), eq(ruleVersions.version, rules.currentVersion)))
    .where(and(eq(rules.enabled, true), inArray(rules.kind, ["charge_high", "rh_low"])));
  return rows.flatMap((r) => (r.kind === "charge_high" || r.kind === "rh_low" ? [{ ...r, kind: r.kind }] : []));
}

function levelOf(r: LimitRule): ScopeLevel {
  if (r.pointId !== null) return "point";
  if (r.lineId !== null) return "line";
  if (r.areaId !== null) return "area";
  return "plant";
}

/** Pure: the charge limit at a point from a list of rules (see the header for the order). */
export function resolveChargeLimit(at: { pointId: number; lineId: number; areaId: number }, list: readonly LimitRule[]): ChargeLimit | null {
  const order: ScopeLevel[] = ["point", "line", "area", "plant"];
  for (const level of order) {
    const matches = list.filter((r) => {
      if (r.kind !== "charge_high" || levelOf(r) !== level) return false;
      if (level === "point") return r.pointId === at.pointId;
      if (level === "line") return r.lineId === at.lineId;
      if (level === "area") return r.areaId === at.areaId;
      return true;
    });
    let best: ChargeLimit | null = null;
    for (const r of matches) {
      const p = chargeParams.safeParse(r.params);
      if (!p.success) continue;
      if (!best || p.data.limitKv < best.limitKv) best = { limitKv: p.data.limitKv, clearKv: p.data.clearKv, ruleId: r.ruleId, level };
    }
    if (best) return best;
  }
  return null;
}

/** Pure: the low-humidity limit of a hall. */
export function resolveRhLimit(at: { areaId: number; rhMinPct: number }, list: readonly LimitRule[]): RhLimit {
  for (const level of ["area", "plant"] as const) {
    const matches = list.filter(
      (r) => r.kind === "rh_low" && r.pointId === null && r.lineId === null && (level === "area" ? r.areaId === at.areaId : r.areaId === null),
    );
    let best: RhLimit | null = null;
    for (const r of matches) {
      const p = rhParams.safeParse(r.params);
      if (!p.success) continue;
      if (!best || p.data.limitPct > best.limitPct) best = { limitPct: p.data.limitPct, clearPct: p.data.clearPct, ruleId: r.ruleId, level };
    }
    if (best) return best;
  }
  return { limitPct: at.rhMinPct, clearPct: null, ruleId: null, level: "hall band" };
}
