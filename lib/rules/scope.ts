/**
 * Which rules apply to which subject.
 *
 * A subject (a point, an area, a sensor, a neutralizer) has a location {pointId?, lineId?,
 * areaId?}. A rule's scope matches the location when every key the scope gives is equal to the
 * location's. Precedence: for each rule kind and severity separately, only the rules at the most
 * specific matching level apply — point (3) over line (2) over area (1) over plant-wide (0).
 * Several rules at that same level all apply. A disabled rule applies nothing but still takes
 * its level, which is how a point is exempted from a line or area default.
 *
 * Per severity, so that a point can tighten the medium 12 kV charge limit without losing the
 * high 20 kV one that the area sets.
 *
 * Locations: a point is {pointId, lineId, areaId}; an area {areaId}; a neutralizer the location
 * of the point after it; a sensor the location of what it measures (field meter: its point;
 * running or speed gateway: its line; climate logger: its area).
 */
import type { ChargeHighRule, RuleDefinition, RuleKind, RuleOfKind, RuleScope } from "./types";

export type SubjectLocation = { pointId?: number; lineId?: number; areaId?: number };

export type ScopeLevel = "point" | "line" | "area" | "plant";

export function getScopeLevel(scope: RuleScope): ScopeLevel {
  if (scope.pointId !== undefined) return "point";
  if (scope.lineId !== undefined) return "line";
  if (scope.areaId !== undefined) return "area";
  return "plant";
}

const LEVEL_RANK: Record<ScopeLevel, number> = { point: 3, line: 2, area: 1, plant: 0 };

export function matchesScope(scope: RuleScope, location: SubjectLocation): boolean {
  if (scope.pointId !== undefined && scope.pointId !== location.pointId) return false;
  if (scope.lineId !== undefined && scope.lineId !== location.lineId) return false;
  if (scope.areaId !== undefined && scope.areaId !== location.areaId) return false;
  return true;
}

export type ResolvedRule<R extends RuleDefinition = RuleDefinition> = { rule: R; level: ScopeLevel };

/** A stored rule's scope columns (null: not scoped at that level) as a rule scope. */
export function scopeOfColumns(r: { pointId: number | null; lineId: number | null; areaId: number | null }): RuleScope {
  const scope: RuleScope = {};
  if (r.pointId !== null) scope.pointId = r.pointId;
  if (r.lineId !== null) scope.lineId = r.lineId;
  if (r.areaId !== null) scope.areaId = r.areaId;
  return scope;
}

/**
 * The one precedence rule, for every shape of rule (the engine's definitions, stored rows, the
 * editor's rows): of the rules of `kind` matching `location`, per severity, those at the most
 * specific matching level — disabled ones included, because a disabled rule takes its level and
 * so exempts the place from the less specific ones. Callers that want what alerts (and what a
 * chart draws) keep only the enabled ones: see rulesInForce.
 */
export function rulesAtMostSpecificLevel<R extends { kind: string; severity: string }>(
  kind: string,
  location: SubjectLocation,
  rules: readonly R[],
  scopeOf: (rule: R) => RuleScope,
): { rule: R; level: ScopeLevel }[] {
  const bestRank = new Map<string, number>();
  const candidates: { rule: R; level: ScopeLevel }[] = [];
  for (const rule of rules) {
    if (rule.kind !== kind) continue;
    const scope = scopeOf(rule);
    if (!matchesScope(scope, location)) continue;
    const level = getScopeLevel(scope);
    candidates.push({ rule, level });
    if ((bestRank.get(rule.severity) ?? -1) < LEVEL_RANK[level]) bestRank.set(rule.severity, LEVEL_RANK[level]);
  }
  return candidates.filter((c) => LEVEL_RANK[c.level] === bestRank.get(c.rule.severity));
}

/** The enabled rules in force at `location`: rulesAtMostSpecificLevel without the exemptions. */
export function rulesInForce<R extends { kind: string; severity: string; enabled: boolean }>(
  kind: string,
  location: SubjectLocation,
  rules: readonly R[],
  scopeOf: (rule: R) => RuleScope,
): { rule: R; level: ScopeLevel }[] {
  return rulesAtMostSpecificLevel(kind, location, rules, scopeOf).filter((c) => c.rule.enabled);
}

/**
 * The enabled rules of `kind` that apply at `location`, most specific level per severity,
 * ordered by rule id.
 */
export function resolveRulesForLocation<K extends RuleKind>(
  kind: K,
  location: SubjectLocation,
  rules: readonly RuleDefinition[],
): ResolvedRule<RuleOfKind<K>>[] {
  const ofKind = rules.filter((r): r is RuleOfKind<K> => isKind(r, kind));
  return rulesInForce(kind, location, ofKind, (r) => r.scope).sort((a, b) => a.rule.id - b.rule.id);
}

function isKind<K extends RuleKind>(rule: RuleDefinition, kind: K): rule is RuleOfKind<K> {
  return rule.kind === kind;
}

/**
 * The charge limits in force at a point: per severity, the point's own charge_high rule, else
 * its line's default, else its area's, else a plant-wide one. `level` says where each came
 * from (for the limits editor: "12 kV, from the line default").
 */
export function resolveChargeLimit(
  pointId: number,
  lineId: number,
  areaId: number,
  rules: readonly RuleDefinition[],
): ResolvedRule<ChargeHighRule>[] {
  return resolveRulesForLocation("charge_high", { pointId, lineId, areaId }, rules);
}
