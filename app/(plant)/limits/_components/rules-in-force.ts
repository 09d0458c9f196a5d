// Which limit rules apply at a place in the editor's tree (plant, hall, line, point): per kind and
// severity, the most specific level wins. The rule rows the editor gets, and the place words.
import { RULE_KIND_WORDS, SEVERITY_RANK, type RuleKind, type Severity } from "@/lib/vocabulary";
import { rulesAtMostSpecificLevel, scopeOfColumns } from "@/lib/rules/scope";

export type RuleInfo = {
  id: number;
  kind: RuleKind;
  name: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  scopedElsewhere: boolean;
  enabled: boolean;
  currentVersion: number;
  severity: Severity;
  onDelayS: number;
  offDelayS: number;
  onlyWhileRunning: boolean;
  params: Record<string, unknown>;
  versionCreatedAt: number;
};

export type PlantTree = Array<{ id: number; name: string; lines: Array<{ id: number; name: string; points: Array<{ id: number; name: string }> }> }>;

export type Level = "plant" | "area" | "line" | "point";
export type Place = { level: Level; areaId: number | null; lineId: number | null; pointId: number | null; label: string };

export const LEVEL_WORDS: Record<Level, string> = { plant: "plant-wide", area: "hall", line: "line", point: "point" };
export const KINDS = Object.keys(RULE_KIND_WORDS).filter((k): k is RuleKind => k in RULE_KIND_WORDS);

export function levelOf(r: Pick<RuleInfo, "pointId" | "lineId" | "areaId">): Level {
  return r.pointId !== null ? "point" : r.lineId !== null ? "line" : r.areaId !== null ? "area" : "plant";
}

export function matches(r: RuleInfo, p: Place): boolean {
  if (r.scopedElsewhere) return false;
  if (r.pointId !== null && r.pointId !== p.pointId) return false;
  if (r.lineId !== null && r.lineId !== p.lineId) return false;
  if (r.areaId !== null && r.areaId !== p.areaId) return false;
  return true;
}

/** Per kind and severity, the rules at the most specific level matching the place (as the engine resolves them). */
// Disabled rules are kept: they take their level (an exemption), and the editor shows them.
export function rulesInForce(rules: RuleInfo[], p: Place, kind: RuleKind): RuleInfo[] {
  const location = { pointId: p.pointId ?? undefined, lineId: p.lineId ?? undefined, areaId: p.areaId ?? undefined };
  return rulesAtMostSpecificLevel(kind, location, rules.filter((r) => !r.scopedElsewhere), scopeOfColumns)
    .map((c) => c.rule)
    .sort((a, b) => SEVERITY_RANK[b.severity] - SEVERITY_RANK[a.severity] || a.id - b.id);
}
