// Which limit rules apply at a place in the editor's tree (plant, hall, line, point): per kind and
// severity, the most specific level wins. The rule rows the editor gets, and the place words.
import { RULE_KIND_WORDS, type RuleKind, type Severity } from "@/lib/vocabulary";

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

const LEVEL_RANK: Record<Level, number> = { plant: 0, area: 1, line: 2, point: 3 };
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
export function rulesInForce(rules: RuleInfo[], p: Place, kind: RuleKind): RuleInfo[] {
  const candidates = rules.filter((r) => r.kind === kind && matches(r, p));
  const best = new Map<Severity, number>();
  for (const r of candidates) best.set(r.severity, Math.max(best.get(r.severity) ?? -1, LEVEL_RANK[levelOf(r)]));
  return candidates
    .filter((r) => LEVEL_RANK[levelOf(r)] === best.get(r.severity))
    .sort((a, b) => ["high", "medium", "low"].indexOf(a.severity) - ["high", "medium", "low"].indexOf(b.severity) || a.id - b.id);
}
