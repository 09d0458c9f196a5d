// Saving a rule change — the one write path: a new version (or a new rule at a scope) and its
// audit-log entry with old → new, in one transaction — and the rule history read models (the
// versions of a rule, the latest limit changes).
import { and, desc, eq, isNull } from "drizzle-orm";
import type { Db } from "../client";
import { auditLog, people, rules, ruleVersions } from "../schema";
import { writeAudit } from "./audit";
import type { Severity } from "../../lib/rules";
import { AppError, badInput, fieldErrorsFromIssues, notFound } from "../../lib/errors";
import { checkProposedRule, defaultRuleName, saveRuleInputSchema, type SaveRuleInput } from "../../lib/rules/rule-input";

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
