// Rules (limits) and their current versions as stored: the read model the alerts runner, the
// limits page and the replay share, and their conversion to the engine's rule definitions
// (checked with lib/rules' zod schemas, so a rule the engine would refuse is reported, never
// silently "fixed").
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { rules, ruleVersions } from "../schema";
import { ruleDefinitionSchema, type RuleDefinition, type RuleKind, type RuleScope, type Severity } from "../../lib/rules";

export type RuleRow = {
  id: number;
  kind: RuleKind;
  name: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  deviceId: number | null;
  neutralizerId: number | null;
  enabled: boolean;
  currentVersion: number;
  severity: Severity;
  onDelayS: number;
  offDelayS: number;
  onlyWhileRunning: boolean;
  params: unknown;
  versionCreatedAt: number;
  versionCreatedBy: number | null;
  versionComment: string | null;
};

/** Every rule with the settings of its current version. */
export async function listRuleRows(db: Db, opts: { ids?: number[] } = {}): Promise<RuleRow[]> {
  const rows = await db
    .select({
      id: rules.id,
      kind: rules.kind,
      name: rules.name,
      pointId: rules.pointId,
      lineId: rules.lineId,
      areaId: rules.areaId,
      deviceId: rules.deviceId,
      neutralizerId: rules.neutralizerId,
      enabled: rules.enabled,
      currentVersion: rules.currentVersion,
      severity: ruleVersions.severity,
      onDelayS: ruleVersions.onDelayS,
      offDelayS: ruleVersions.offDelayS,
      onlyWhileRunning: ruleVersions.onlyWhileRunning,
      params: ruleVersions.params,
      versionCreatedAt: ruleVersions.createdAt,
      versionCreatedBy: ruleVersions.createdBy,
      versionComment: ruleVersions.comment,
    })
    .from(rules)
    .innerJoin(ruleVersions, and(eq(ruleVersions.ruleId, rules.id), eq(ruleVersions.version, rules.currentVersion)))
    .where(opts.ids ? inArray(rules.id, opts.ids.length ? opts.ids : [-1]) : undefined)
    .orderBy(asc(rules.id));
  return rows;
}

export function scopeOfRow(r: Pick<RuleRow, "pointId" | "lineId" | "areaId">): RuleScope {
  const scope: RuleScope = {};
  if (r.pointId !== null) scope.pointId = r.pointId;
  if (r.lineId !== null) scope.lineId = r.lineId;
  if (r.areaId !== null) scope.areaId = r.areaId;
  return scope;
}

/** A stored rule in the shape of a rule definition, not yet checked (params come from JSON). */
export function toRuleInput(r: RuleRow) {
  return {
    id: r.id,
    version: r.currentVersion,
    kind: r.kind,
    severity: r.severity,
    scope: scopeOfRow(r),
    onDelayS: r.onDelayS,
    offDelayS: r.offDelayS,
    onlyWhileRunning: r.onlyWhileRunning,
    enabled: r.enabled,
    params: r.params,
  };
}

export type RuleProblem = { ruleId: number; message: string };

/**
 * The rules the engine runs: each stored rule parsed with the lib's schema. A rule that does not
 * parse (edited by hand in the database, or scoped to a device or neutralizer, which the engine
 * does not know) is left out and reported, never silently "fixed".
 */
export function toRuleDefinitions(rows: readonly RuleRow[]): { rules: RuleDefinition[]; problems: RuleProblem[] } {
  const out: RuleDefinition[] = [];
  const problems: RuleProblem[] = [];
  for (const r of rows) {
    if (r.deviceId !== null || r.neutralizerId !== null) {
      problems.push({ ruleId: r.id, message: "scoped to a device or neutralizer; the rules engine scopes rules to points, lines and halls only" });
      continue;
    }
    const parsed = ruleDefinitionSchema.safeParse(toRuleInput(r));
    if (parsed.success) out.push(parsed.data);
    else problems.push({ ruleId: r.id, message: parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ") });
  }
  return { rules: out, problems };
}

export async function loadRuleDefinitions(db: Db): Promise<{ rules: RuleDefinition[]; problems: RuleProblem[] }> {
  return toRuleDefinitions(await listRuleRows(db));
}

/** Changes whenever a rule is added, enabled/disabled or gets a new version. */
export async function readRulesSignature(db: Db): Promise<string> {
  const [row] = await db
    .select({
      n: sql<number>`COUNT(*)`,
      versions: sql<number>`COALESCE(SUM(${rules.currentVersion}), 0)`,
      enabled: sql<number>`COALESCE(SUM(${rules.enabled}), 0)`,
      maxId: sql<number>`COALESCE(MAX(${rules.id}), 0)`,
    })
    .from(rules);
  const [v] = await db.select({ maxId: sql<number>`COALESCE(MAX(${ruleVersions.id}), 0)` }).from(ruleVersions);
  return `${Number(row.n)}:${Number(row.versions)}:${Number(row.enabled)}:${Number(row.maxId)}:${Number(v.maxId)}`;
}
