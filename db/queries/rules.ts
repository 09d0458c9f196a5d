// Rules (limits) and their versions: the read model the alerts runner and the limits editor
// share, and the one write path for a change (a new version + an audit-log entry, in one
// transaction). The rule definitions themselves are checked with lib/rules' zod schemas, so a
// rule that the engine would refuse can never be saved.
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "../client";
import { auditLog, people, rules, ruleVersions } from "../schema";
import { writeAudit } from "./audit";
import {
  ruleDefinitionSchema,
  type RuleDefinition,
  type RuleKind,
  type RuleScope,
  type Severity,
} from "../../lib/rules";
import { AppError, badInput, fieldErrorsFromIssues, notFound } from "../../lib/errors";
import { RULE_KIND_LABELS } from "../../components/alerts/labels";

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

// ---------------------------------------------------------------------------------------------
// Saving a change

export const ruleScopeInputSchema = z.object({
  pointId: z.number().int().positive().nullable().default(null),
  lineId: z.number().int().positive().nullable().default(null),
  areaId: z.number().int().positive().nullable().default(null),
});

export const saveRuleInputSchema = z.object({
  /** absent: a new rule at this scope (an override of the inherited one) */
  ruleId: z.number().int().positive().optional(),
  /** the version the editor started from: a save over a newer one is refused (409) */
  baseVersion: z.number().int().positive().optional(),
  kind: z.enum(["charge_high", "charge_rate", "rh_low", "rh_forecast", "sensor_silent", "sensor_flat", "effect_loss"]),
  scope: ruleScopeInputSchema,
  severity: z.enum(["low", "medium", "high"]),
  onDelayS: z.number(),
  offDelayS: z.number(),
  onlyWhileRunning: z.boolean(),
  enabled: z.boolean().default(true),
  params: z.record(z.string(), z.unknown()),
  comment: z.string().trim().max(300).optional(),
});
export type SaveRuleInput = z.input<typeof saveRuleInputSchema>;

/**
 * Checks a proposed rule with the engine's own schema ("clear level on the safe side", "delays
 * ≥ 0", …). Returns the parsed definition or throws a 400 with field errors keyed like the form
 * ("params.clearKv", "onDelayS").
 */
export function checkProposedRule(input: z.output<typeof saveRuleInputSchema>, id = 1, version = 1): RuleDefinition {
  const scope: RuleScope = {};
  if (input.scope.pointId !== null) scope.pointId = input.scope.pointId;
  if (input.scope.lineId !== null) scope.lineId = input.scope.lineId;
  if (input.scope.areaId !== null) scope.areaId = input.scope.areaId;
  const parsed = ruleDefinitionSchema.safeParse({
    id,
    version,
    kind: input.kind,
    severity: input.severity,
    scope,
    onDelayS: input.onDelayS,
    offDelayS: input.offDelayS,
    onlyWhileRunning: input.onlyWhileRunning,
    enabled: input.enabled,
    params: input.params,
  });
  if (!parsed.success) {
    const fieldErrors = fieldErrorsFromIssues(parsed.error.issues);
    const first = Object.entries(fieldErrors)[0];
    throw badInput(first ? `Check ${first[0]}: ${first[1][0]}` : "The rule is not valid.", fieldErrors);
  }
  return parsed.data;
}

export function defaultRuleName(kind: RuleKind, where: string | null): string {
  const base = RULE_KIND_LABELS[kind];
  return (where ? `${base} — ${where}` : base).slice(0, 160);
}

function describeSettings(r: { severity: string; onDelayS: number; offDelayS: number; onlyWhileRunning: boolean; enabled: boolean; params: unknown }): string {
  const params = r.params && typeof r.params === "object" ? Object.entries(r.params).map(([k, v]) => `${k} ${String(v)}`).join(", ") : "";
  return `${r.enabled ? "" : "DISABLED; "}${r.severity}; ${params}; on-delay ${r.onDelayS} s, off-delay ${r.offDelayS} s${r.onlyWhileRunning ? "; only while running" : ""}`;
}

export type SaveRuleResult = { ruleId: number; version: number; created: boolean };

/**
 * Saves a change as a new version (or a new rule at a scope) and writes the audit entry with
 * old → new in the same transaction. The alerts runner notices within seconds (it polls
 * readRulesSignature) and continues without a restart.
 */
export async function saveRuleVersion(
  db: Db,
  raw: SaveRuleInput,
  who: { personId: number; where?: string | null },
  nowMs = Date.now(),
): Promise<SaveRuleResult> {
  const parsedInput = saveRuleInputSchema.safeParse(raw);
  if (!parsedInput.success) throw badInput("The rule is not valid.", fieldErrorsFromIssues(parsedInput.error.issues));
  const input = parsedInput.data;
  const def = checkProposedRule(input);
  const scopeCols = { pointId: input.scope.pointId, lineId: input.scope.lineId, areaId: input.scope.areaId };

  return db.transaction(async (tx) => {
    if (input.ruleId !== undefined) {
      const [current] = await tx
        .select({ id: rules.id, kind: rules.kind, currentVersion: rules.currentVersion, enabled: rules.enabled, pointId: rules.pointId, lineId: rules.lineId, areaId: rules.areaId, name: rules.name })
        .from(rules)
        .where(eq(rules.id, input.ruleId))
        .for("update");
      if (!current) throw notFound("No such rule.");
      if (current.kind !== input.kind) throw badInput("A rule's kind cannot change; add a new rule instead.", { kind: ["A rule's kind cannot change"] });
      if (current.pointId !== scopeCols.pointId || current.lineId !== scopeCols.lineId || current.areaId !== scopeCols.areaId) {
        throw badInput("A rule's scope cannot change; add a rule at the other scope instead.", { scope: ["A rule's scope cannot change"] });
      }
      if (input.baseVersion !== undefined && input.baseVersion !== current.currentVersion) {
        throw new AppError("conflict", `Someone saved version ${current.currentVersion} of this rule while you were editing version ${input.baseVersion}. Reload to see it.`);
      }
      const [old] = await tx
        .select({ severity: ruleVersions.severity, onDelayS: ruleVersions.onDelayS, offDelayS: ruleVersions.offDelayS, onlyWhileRunning: ruleVersions.onlyWhileRunning, params: ruleVersions.params })
        .from(ruleVersions)
        .where(and(eq(ruleVersions.ruleId, current.id), eq(ruleVersions.version, current.currentVersion)));
      const version = current.currentVersion + 1;
      await tx.insert(ruleVersions).values({
        ruleId: current.id,
        version,
        severity: def.severity,
        onDelayS: def.onDelayS,
        offDelayS: def.offDelayS,
        onlyWhileRunning: def.onlyWhileRunning,
        params: def.params,
        createdBy: who.personId,
        createdAt: nowMs,
        comment: input.comment || null,
      });
      await tx.update(rules).set({ currentVersion: version, enabled: def.enabled }).where(eq(rules.id, current.id));
      const before = old ? describeSettings({ ...old, enabled: current.enabled }) : "(no earlier version)";
      const after = describeSettings({ ...def, enabled: def.enabled });
      await writeAudit(
        tx,
        {
          personId: who.personId,
          action: "rule.version",
          subjectType: "rule",
          subjectId: current.id,
          summary: `${current.name}: version ${current.currentVersion} → ${version}. Was: ${before}. Now: ${after}.${input.comment ? ` Why: ${input.comment}` : ""}`,
          detail: { ruleId: current.id, fromVersion: current.currentVersion, toVersion: version, old: old ? { ...old, enabled: current.enabled } : null, new: { severity: def.severity, onDelayS: def.onDelayS, offDelayS: def.offDelayS, onlyWhileRunning: def.onlyWhileRunning, enabled: def.enabled, params: def.params } },
        },
        nowMs,
      );
      return { ruleId: current.id, version, created: false };
    }

    // a new rule at this scope: refuse a second rule of the same kind, scope and severity
    const same = await tx
      .select({ id: rules.id, severity: ruleVersions.severity })
      .from(rules)
      .innerJoin(ruleVersions, and(eq(ruleVersions.ruleId, rules.id), eq(ruleVersions.version, rules.currentVersion)))
      .where(
        and(
          eq(rules.kind, input.kind),
          scopeCols.pointId === null ? isNull(rules.pointId) : eq(rules.pointId, scopeCols.pointId),
          scopeCols.lineId === null ? isNull(rules.lineId) : eq(rules.lineId, scopeCols.lineId),
          scopeCols.areaId === null ? isNull(rules.areaId) : eq(rules.areaId, scopeCols.areaId),
          isNull(rules.deviceId),
          isNull(rules.neutralizerId),
        ),
      );
    const clash = same.find((s) => s.severity === def.severity);
    if (clash) throw new AppError("conflict", `A ${def.severity} rule of this kind already exists here (rule ${clash.id}); edit that one.`);
    const name = defaultRuleName(input.kind, who.where ?? null);
    const [res] = await tx.insert(rules).values({ kind: input.kind, name, ...scopeCols, enabled: def.enabled, currentVersion: 1, createdAt: nowMs });
    const ruleId = res.insertId;
    await tx.insert(ruleVersions).values({
      ruleId,
      version: 1,
      severity: def.severity,
      onDelayS: def.onDelayS,
      offDelayS: def.offDelayS,
      onlyWhileRunning: def.onlyWhileRunning,
      params: def.params,
      createdBy: who.personId,
      createdAt: nowMs,
      comment: input.comment || null,
    });
    await writeAudit(
      tx,
      {
        personId: who.personId,
        action: "rule.create",
        subjectType: "rule",
        subjectId: ruleId,
        summary: `${name}: new rule (version 1). Was: the inherited rule. Now: ${describeSettings({ ...def, enabled: def.enabled })}.${input.comment ? ` Why: ${input.comment}` : ""}`,
        detail: { ruleId, toVersion: 1, new: { severity: def.severity, onDelayS: def.onDelayS, offDelayS: def.offDelayS, onlyWhileRunning: def.onlyWhileRunning, enabled: def.enabled, params: def.params }, scope: scopeCols },
      },
      nowMs,
    );
    return { ruleId, version: 1, created: true };
  });
}

export type RuleAuditEntry = { id: number; ts: number; personName: string | null; action: string; subjectId: string | null; summary: string };

/** The latest limit changes (for the limits page). */
export async function listRuleAudit(db: Db, limit = 20): Promise<RuleAuditEntry[]> {
  return db
    .select({ id: auditLog.id, ts: auditLog.ts, personName: people.name, action: auditLog.action, subjectId: auditLog.subjectId, summary: auditLog.summary })
    .from(auditLog)
    .leftJoin(people, eq(people.id, auditLog.personId))
    .where(eq(auditLog.subjectType, "rule"))
    .orderBy(desc(auditLog.ts), desc(auditLog.id))
    .limit(Math.min(limit, 200));
}

export type RuleVersionEntry = { version: number; severity: Severity; onDelayS: number; offDelayS: number; onlyWhileRunning: boolean; params: unknown; createdAt: number; createdByName: string | null; comment: string | null };

export async function listRuleVersions(db: Db, ruleId: number): Promise<RuleVersionEntry[]> {
  return db
    .select({
      version: ruleVersions.version,
      severity: ruleVersions.severity,
      onDelayS: ruleVersions.onDelayS,
      offDelayS: ruleVersions.offDelayS,
      onlyWhileRunning: ruleVersions.onlyWhileRunning,
      params: ruleVersions.params,
      createdAt: ruleVersions.createdAt,
      createdByName: people.name,
      comment: ruleVersions.comment,
    })
    .from(ruleVersions)
    .leftJoin(people, eq(people.id, ruleVersions.createdBy))
    .where(eq(ruleVersions.ruleId, ruleId))
    .orderBy(desc(ruleVersions.version));
}
