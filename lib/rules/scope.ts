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
import type { ChargeHighRule, RuleDefinition, RuleKind, RuleOfKind, RuleScope, Severity } from "./types";

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

/**
 * The enabled rules of `kind` that apply at `location`, most specific level per severity,
 * ordered by rule id.
 */
export function resolveRulesForLocation<K extends RuleKind>(
  kind: K,
  location: SubjectLocation,
  rules: readonly RuleDefinition[],
): ResolvedRule<RuleOfKind<K>>[] {
  const bestRank = new Map<Severity, number>();
  const candidates: ResolvedRule<RuleOfKind<K>>[] = [];
  for (const rule of rules) {
    if (!isKind(rule, kind) || !matchesScope(rule.scope, location)) continue;
    const level = getScopeLevel(rule.scope);
    candidates.push({ rule, level });
    const rank = LEVEL_RANK[level];
    if ((bestRank.get(rule.severity) ?? -1) < rank) bestRank.set(rule.severity, rank);
  }
  return candidates
    .filter((c) => c.rule.enabled && LEVEL_RANK[c.level] === bestRank.get(c.rule.severity))
    .sort((a, b) => a.rule.id - b.rule.id);
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
