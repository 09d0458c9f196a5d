// The stored limit rules (charge_high and rh_low, enabled or not, with the params of their
// current version) for the charts, the Floor and the reports. Which of them is in force at a
// place is decided once, in lib/rules/limits-in-force.ts — the engine's precedence, so a chart
// never draws a limit that does not alert (a disabled point rule is an exemption).
import { and, asc, eq, inArray, isNull } from "drizzle-orm";
import type { Db } from "../client";
import { rules, ruleVersions } from "../schema";
import type { StoredRule } from "../../lib/rules/limits-in-force";
import type { RuleKind } from "../../lib/vocabulary";

/** charge_high and rh_low rules, disabled ones included (they exempt their place). */
export async function listLimitRules(db: Db): Promise<StoredRule[]> {
  return listStoredRules(db, { kinds: ["charge_high", "rh_low"] });
}

/** Stored rules scoped to the plant, a hall, a line or a point (all kinds unless given), each with its current version's severity and params. */
export async function listStoredRules(db: Db, opts: { kinds?: RuleKind[] } = {}): Promise<StoredRule[]> {
  return db
    .select({
      ruleId: rules.id,
      kind: rules.kind,
      name: rules.name,
      enabled: rules.enabled,
      severity: ruleVersions.severity,
      pointId: rules.pointId,
      lineId: rules.lineId,
      areaId: rules.areaId,
      params: ruleVersions.params,
    })
    .from(rules)
    .innerJoin(ruleVersions, and(eq(ruleVersions.ruleId, rules.id), eq(ruleVersions.version, rules.currentVersion)))
    // a rule scoped to a device or neutralizer is not one the engine runs (rule-rows.ts), so it limits nothing
    .where(and(isNull(rules.deviceId), isNull(rules.neutralizerId), opts.kinds ? inArray(rules.kind, opts.kinds.length ? opts.kinds : ["charge_high"]) : undefined))
    .orderBy(asc(rules.id));
}
