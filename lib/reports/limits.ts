/**
 * The limit a report measures a point or a hall against, from the stored rules: the same
 * precedence as the rules engine (lib/rules/scope.ts) — per severity, only the rules at the most
 * specific matching level apply (point over line over area over plant-wide, a disabled rule
 * still taking its level) — and of those the lowest charge limit (or the highest humidity
 * minimum), because that is the first line an excursion crosses. Pure, no I/O.
 *
 * Reports use the rules' current versions; a limit changed during the period is applied to the
 * whole period (the report says which limit it used).
 */
import { z } from "zod";
import { getScopeLevel, matchesScope, type ScopeLevel, type SubjectLocation } from "../rules/scope";

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

const LEVEL_RANK: Record<ScopeLevel, number> = { point: 3, line: 2, area: 1, plant: 0 };

function scopeOf(r: StoredRule) {
  return {
    pointId: r.pointId ?? undefined,
    lineId: r.lineId ?? undefined,
    areaId: r.areaId ?? undefined,
  };
}

/** Enabled rules of `kind` in force at `location`, most specific level per severity. */
export function rulesInForce(kind: string, location: SubjectLocation, rules: readonly StoredRule[]): { rule: StoredRule; level: ScopeLevel }[] {
  const best = new Map<string, number>();
  const hits: { rule: StoredRule; level: ScopeLevel }[] = [];
  for (const rule of rules) {
    if (rule.kind !== kind) continue;
    const scope = scopeOf(rule);
    if (!matchesScope(scope, location)) continue;
    const level = getScopeLevel(scope);
    hits.push({ rule, level });
    best.set(rule.severity, Math.max(best.get(rule.severity) ?? -1, LEVEL_RANK[level]));
  }
  return hits.filter((h) => h.rule.enabled && LEVEL_RANK[h.level] === best.get(h.rule.severity));
}

/** Lowest charge_high limit (kV) in force at a point, or null when no rule applies. */
export function chargeLimitAt(location: { pointId: number; lineId: number; areaId: number }, rules: readonly StoredRule[]): ResolvedLimit | null {
  let out: ResolvedLimit | null = null;
  for (const { rule, level } of rulesInForce("charge_high", location, rules)) {
    const p = chargeParams.safeParse(rule.params);
    if (!p.success) continue;
    if (!out || p.data.limitKv < out.value) {
      out = { value: p.data.limitKv, clear: p.data.clearKv ?? null, ruleId: rule.ruleId, ruleName: rule.name, level, severity: rule.severity };
    }
  }
  return out;
}

/** Highest rh_low limit (%) in force in a hall, or null when no rule applies. */
export function rhLowLimitAt(location: { areaId: number }, rules: readonly StoredRule[]): ResolvedLimit | null {
  let out: ResolvedLimit | null = null;
  for (const { rule, level } of rulesInForce("rh_low", location, rules)) {
    const p = rhParams.safeParse(rule.params);
    if (!p.success) continue;
    if (!out || p.data.limitPct > out.value) {
      out = { value: p.data.limitPct, clear: p.data.clearPct ?? null, ruleId: rule.ruleId, ruleName: rule.name, level, severity: rule.severity };
    }
  }
  return out;
}
