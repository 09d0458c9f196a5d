/**
 * The limits in force, the one resolver for the charts and the Floor (db/queries/limits.ts),
 * the reports, and the limits editor; the engine applies the same precedence through
 * resolveRulesForLocation (lib/rules/scope.ts):
 *   per severity, only the rules at the most specific matching level apply (point over line
 *   over area over plant-wide); a DISABLED rule still takes its level, so a disabled point rule
 *   is an exemption: no limit drawn there and none alerts.
 * Of the rules in force, the lowest charge limit (or the highest humidity minimum) is the one
 * shown, because it is the first line a drifting value crosses. Pure, no I/O.
 *
 * Reports use the rules' current versions; a limit changed during the period is applied to the
 * whole period (the report says which limit it used).
 */
import { z } from "zod";
import type { ChargeLimit, RhLimit } from "../views/limits";
import { rulesInForce, scopeOfColumns, type ScopeLevel, type SubjectLocation } from "./scope";

/** A rule as stored: scope columns, enabled flag, severity and its current version's params. */
export type StoredRule = {
  ruleId: number;
  kind: string;
  name: string;
  enabled: boolean;
  severity: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  /** The current version's params, as stored (JSON). */
  params: unknown;
};

export type ResolvedLimit = { value: number; clear: number | null; ruleId: number; ruleName: string; level: ScopeLevel; severity: string };

const chargeParams = z.object({ limitKv: z.number().positive(), clearKv: z.number().min(0).optional() });
const rhParams = z.object({ limitPct: z.number().min(0).max(100), clearPct: z.number().min(0).max(100).optional() });

/**
 * A rule whose params do not read is left out before precedence is applied, as the engine
 * leaves out a rule that does not parse (db/queries/rule-rows.ts toRuleDefinitions): it takes
 * no level and exempts nothing.
 */
function readable<P>(kind: string, rules: readonly StoredRule[], schema: z.ZodType<P>): { rule: StoredRule; params: P }[] {
  const out: { rule: StoredRule; params: P }[] = [];
  for (const rule of rules) {
    if (rule.kind !== kind) continue;
    const p = schema.safeParse(rule.params);
    if (p.success) out.push({ rule, params: p.data });
  }
  return out;
}

function inForce<P>(kind: string, location: SubjectLocation, rules: readonly StoredRule[], schema: z.ZodType<P>): { rule: StoredRule; params: P; level: ScopeLevel }[] {
  const list = readable(kind, rules, schema);
  const hits = rulesInForce(kind, location, list.map((x) => ({ ...x.rule, parsed: x.params })), scopeOfColumns);
  return hits.map((h) => ({ rule: h.rule, params: h.rule.parsed, level: h.level }));
}

/** Lowest charge_high limit (kV) in force at a point, or null when no rule applies. */
export function chargeLimitAt(location: { pointId: number; lineId: number; areaId: number }, rules: readonly StoredRule[]): ResolvedLimit | null {
  let out: ResolvedLimit | null = null;
  for (const { rule, params, level } of inForce("charge_high", location, rules, chargeParams)) {
    if (!out || params.limitKv < out.value) {
      out = { value: params.limitKv, clear: params.clearKv ?? null, ruleId: rule.ruleId, ruleName: rule.name, level, severity: rule.severity };
    }
  }
  return out;
}

/** Highest rh_low limit (%) in force in a hall, or null when no rule applies. */
export function rhLowLimitAt(location: { areaId: number }, rules: readonly StoredRule[]): ResolvedLimit | null {
  let out: ResolvedLimit | null = null;
  for (const { rule, params, level } of inForce("rh_low", location, rules, rhParams)) {
    if (!out || params.limitPct > out.value) {
      out = { value: params.limitPct, clear: params.clearPct ?? null, ruleId: rule.ruleId, ruleName: rule.name, level, severity: rule.severity };
    }
  }
  return out;
}

/** The charge limit a chart draws at a point (null: none in force, e.g. exempted). */
export function chartChargeLimit(at: { pointId: number; lineId: number; areaId: number }, rules: readonly StoredRule[]): ChargeLimit | null {
  const l = chargeLimitAt(at, rules);
  return l ? { limitKv: l.value, clearKv: l.clear ?? l.value, ruleId: l.ruleId, level: l.level } : null;
}

/** The humidity limit a hall's chart draws: the rh_low rule in force, else the hall's own minimum. */
export function chartRhLimit(at: { areaId: number; rhMinPct: number }, rules: readonly StoredRule[]): RhLimit {
  const l = rhLowLimitAt({ areaId: at.areaId }, rules);
  if (l && (l.level === "area" || l.level === "plant")) return { limitPct: l.value, clearPct: l.clear, ruleId: l.ruleId, level: l.level };
  return { limitPct: at.rhMinPct, clearPct: null, ruleId: null, level: "hall band" };
}
