// Rules (limits) and their versions: the read model the alerts runner and the limits editor
// share, and the one write path for a change (a new version + an audit-log entry, in one
// transaction). The rule definitions themselves are checked with lib/rules' zod schemas, so a
// rule that the engine would refuse can never be saved.
import { and, asc, desc, eq, gte, inArray, isNull, lt, sql } from "drizzle-orm";
import type mysql from "mysql2/promise";
import { z } from "zod";
import type { Db } from "../client";
import { alerts as alertsTable, auditLog, people, rules, ruleVersions } from "../schema";
import { writeAudit } from "./audit";
import { loadPlantTopology, type AlertSubject } from "./topology";
import {
  collectAlertEpisodes,
  replay,
  ruleDefinitionSchema,
  type AlertEpisode,
  type Channel,
  type Reading,
  type RuleDefinition,
  type RuleKind,
  type RuleScope,
  type Severity,
  type Topology,
} from "../../lib/rules";
import { AppError, badInput, fieldErrorsFromIssues, notFound } from "../../lib/errors";
import { RULE_KIND_WORDS } from "../../lib/vocabulary";

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
  const base = RULE_KIND_WORDS[kind];
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

// ---------------------------------------------------------------------------------------------
// Backtest: replay proposed rules over recorded data (the limits editor)

/** Raw readings are replayed when the span holds at most this many (else 1-minute rollups). */
export const REPLAY_RAW_BUDGET = 2_000_000;
export const REPLAY_DEFAULT_SPAN_MS = 7 * 86_400_000;
export const REPLAY_MAX_SPAN_MS = 31 * 86_400_000;
const EPISODES_SHOWN = 300;

type ReplaySensor = { deviceId: number; code: string; channels: Channel[] };

/** The sensors (and channels) a replay of one kind within a scope needs, and the topology trimmed to them. */
export function scopeTopologyForReplay(
  topology: Topology,
  kind: RuleKind,
  scope: { pointId: number | null; lineId: number | null; areaId: number | null },
  flatChannel: Channel | null,
): Topology {
  const lineOfPoint = new Map<number, number>();
  for (const l of topology.lines) for (const p of l.pointIds) lineOfPoint.set(p, l.lineId);
  const areaOfLine = new Map(topology.lines.map((l) => [l.lineId, l.areaId]));
  const pointIn = (pointId: number) => {
    const lineId = lineOfPoint.get(pointId);
    const areaId = lineId !== undefined ? areaOfLine.get(lineId) : undefined;
    return (scope.pointId === null || scope.pointId === pointId) && (scope.lineId === null || scope.lineId === lineId) && (scope.areaId === null || scope.areaId === areaId);
  };
  const lineIn = (lineId: number) => scope.pointId === null && (scope.lineId === null || scope.lineId === lineId) && (scope.areaId === null || scope.areaId === areaOfLine.get(lineId));
  const areaIn = (areaId: number) => scope.pointId === null && scope.lineId === null && (scope.areaId === null || scope.areaId === areaId);

  const usesCharge = kind === "charge_high" || kind === "charge_rate" || kind === "effect_loss" || (kind === "sensor_flat" && flatChannel === "charge_kv") || kind === "sensor_silent";
  const usesClimate = kind === "rh_low" || kind === "rh_forecast" || (kind === "sensor_flat" && (flatChannel === "rh_pct" || flatChannel === "temp_c")) || kind === "sensor_silent";
  const pointsKept = new Set<number>();
  if (usesCharge) {
    for (const p of topology.points) if (pointIn(p.pointId)) pointsKept.add(p.pointId);
    if (kind === "effect_loss") for (const n of topology.neutralizers) if (pointsKept.has(n.afterPointId)) pointsKept.add(n.beforePointId);
  }
  const linesWithPoints = new Set([...pointsKept].map((p) => lineOfPoint.get(p)));
  const keepGateway = (lineId: number) =>
    (usesCharge && linesWithPoints.has(lineId)) || (kind === "sensor_silent" && lineIn(lineId)) || (kind === "sensor_flat" && flatChannel === "speed_mpm" && lineIn(lineId));
  return {
    areas: topology.areas.map((a) => ({ ...a, climateSensorKey: usesClimate && areaIn(a.areaId) ? a.climateSensorKey : null })),
    lines: topology.lines.map((l) => ({ ...l, runningSensorKey: keepGateway(l.lineId) ? l.runningSensorKey : null, speedSensorKey: keepGateway(l.lineId) ? l.speedSensorKey : null })),
    points: topology.points.map((p) => ({ ...p, fieldMeterSensorKey: pointsKept.has(p.pointId) ? p.fieldMeterSensorKey : null })),
    neutralizers: topology.neutralizers,
  };
}

function replaySensors(topology: Topology, deviceIdByCode: ReadonlyMap<string, number>, kind: RuleKind, flatChannel: Channel | null): ReplaySensor[] {
  const out = new Map<string, Set<Channel>>();
  const add = (code: string | null, ch: Channel) => {
    if (code === null) return;
    const set = out.get(code) ?? new Set<Channel>();
    set.add(ch);
    out.set(code, set);
  };
  for (const p of topology.points) add(p.fieldMeterSensorKey, "charge_kv");
  for (const l of topology.lines) {
    add(l.runningSensorKey, "running");
    if (kind === "sensor_flat" && flatChannel === "speed_mpm") add(l.speedSensorKey, "speed_mpm");
  }
  for (const a of topology.areas) {
    add(a.climateSensorKey, "rh_pct");
    if (kind === "sensor_flat" && flatChannel === "temp_c") add(a.climateSensorKey, "temp_c");
  }
  const sensors: ReplaySensor[] = [];
  for (const [code, channels] of out) {
    const deviceId = deviceIdByCode.get(code);
    if (deviceId !== undefined) sensors.push({ deviceId, code, channels: [...channels] });
  }
  return sensors;
}

async function estimateRawCount(pool: mysql.Pool, sensors: ReplaySensor[], fromTs: number, toTs: number): Promise<number> {
  let total = 0;
  for (const s of sensors) {
    const [rows] = await pool.query<mysql.RowDataPacket[]>(
      "SELECT COALESCE(SUM(`count`), 0) AS n FROM rollup_1m WHERE device_id = ? AND channel IN (?) AND bucket_ts >= ? AND bucket_ts < ?",
      [s.deviceId, s.channels, fromTs - 60_000, toTs],
    );
    total += Number(rows[0]?.n ?? 0);
  }
  return total;
}

type Series = { code: string; channel: Channel; ts: number[]; values: number[] };

async function loadRawSeries(pool: mysql.Pool, s: ReplaySensor, channel: Channel, fromTs: number, toTs: number): Promise<Series> {
  const [rows] = await pool.query<mysql.RowDataPacket[]>({
    sql: "SELECT ts, value FROM readings WHERE device_id = ? AND channel = ? AND ts >= ? AND ts < ? ORDER BY ts",
    values: [s.deviceId, channel, fromTs, toTs],
    rowsAsArray: true,
  });
  const ts = new Array<number>(rows.length);
  const values = new Array<number>(rows.length);
  for (let i = 0; i < rows.length; i++) {
    ts[i] = Number(rows[i][0]);
    values[i] = Number(rows[i][1]);
  }
  return { code: s.code, channel, ts, values };
}

/**
 * One value per minute from the 1-minute rollups: charge the extreme by magnitude (an excursion
 * inside the minute is not averaged away), running the minimum (a stop inside the minute
 * counts), humidity, temperature and speed the mean.
 */
async function loadMinuteSeries(pool: mysql.Pool, s: ReplaySensor, channel: Channel, fromTs: number, toTs: number): Promise<Series> {
  const [rows] = await pool.query<mysql.RowDataPacket[]>({
    sql: "SELECT bucket_ts, `min`, `max`, `sum`, `count` FROM rollup_1m WHERE device_id = ? AND channel = ? AND bucket_ts >= ? AND bucket_ts < ? ORDER BY bucket_ts",
    values: [s.deviceId, channel, fromTs, toTs],
    rowsAsArray: true,
  });
  const ts: number[] = [];
  const values: number[] = [];
  for (const r of rows) {
    const [b, mn, mx, sm, n] = [Number(r[0]), Number(r[1]), Number(r[2]), Number(r[3]), Number(r[4])];
    if (!(n > 0)) continue;
    const v = channel === "charge_kv" ? (Math.abs(mn) > Math.abs(mx) ? mn : mx) : channel === "running" ? mn : sm / n;
    ts.push(b);
    values.push(v);
  }
  return { code: s.code, channel, ts, values };
}

/** k-way merge of per-series arrays into time order (ties: series order, stable). */
export function mergeSeries(series: readonly Series[]): Reading[] {
  const total = series.reduce((n, s) => n + s.ts.length, 0);
  const out = new Array<Reading>(total);
  const idx = new Array<number>(series.length).fill(0);
  for (let k = 0; k < total; k++) {
    let best = -1;
    let bestTs = Infinity;
    for (let j = 0; j < series.length; j++) {
      const i = idx[j];
      if (i < series[j].ts.length && series[j].ts[i] < bestTs) {
        bestTs = series[j].ts[i];
        best = j;
      }
    }
    const s = series[best];
    out[k] = { sensorKey: s.code, channel: s.channel, ts: s.ts[idx[best]], value: s.values[idx[best]] };
    idx[best]++;
  }
  return out;
}

export const replayInputSchema = saveRuleInputSchema.extend({
  fromTs: z.number().int().optional(),
  toTs: z.number().int().optional(),
  /** force a source (tests); default: raw when within budget and retention, else 1-minute rollups */
  source: z.enum(["raw", "1m"]).optional(),
});
export type ReplayInput = z.input<typeof replayInputSchema>;

export type ReplayEpisode = { ruleId: number; severity: Severity; subjectKey: string; where: string; raisedTs: number; clearedTs: number | null; durationMs: number | null; peakValue: number; chattering: boolean; edited: boolean };
export type ReplaySide = { count: number; totalDurationMs: number; stillActive: number; chattering: number; episodes: ReplayEpisode[] };
export type ReplayResult = {
  fromTs: number;
  toTs: number;
  source: "raw" | "1m";
  readings: number;
  sensors: string[];
  elapsedMs: number;
  editedRuleId: number;
  current: ReplaySide;
  proposed: ReplaySide;
  /** alerts of this kind the live engine stored in the span, within the scope */
  stored: number;
};

function summarize(episodes: AlertEpisode[], editedRuleId: number, subjects: ReadonlyMap<string, AlertSubject>): ReplaySide {
  return {
    count: episodes.length,
    totalDurationMs: episodes.reduce((n, e) => n + (e.durationMs ?? 0), 0),
    stillActive: episodes.filter((e) => e.clearedTs === null).length,
    chattering: episodes.filter((e) => e.chattering).length,
    episodes: episodes.slice(-EPISODES_SHOWN).map((e) => ({
      ruleId: e.ruleId,
      severity: e.severity,
      subjectKey: e.subjectKey,
      where: subjects.get(e.subjectKey)?.where ?? e.subjectKey,
      raisedTs: e.raisedTs,
      clearedTs: e.clearedTs,
      durationMs: e.durationMs,
      peakValue: e.peakValue,
      chattering: e.chattering,
      edited: e.ruleId === editedRuleId,
    })),
  };
}

/**
 * Replays the current rules of the proposal's kind and the same set with the proposal in place
 * over the recorded data of the sensors in the proposal's scope (lib/rules replay(), the code
 * the live worker runs), and counts what each would have raised.
 */
export async function replayRuleProposal(db: Db, pool: mysql.Pool, raw: ReplayInput, nowMs = Date.now(), rawRetentionMs = 14 * 86_400_000): Promise<ReplayResult> {
  const started = performance.now();
  const parsedInput = replayInputSchema.safeParse(raw);
  if (!parsedInput.success) throw badInput("The replay request is not valid.", fieldErrorsFromIssues(parsedInput.error.issues));
  const input = parsedInput.data;
  const toTs = Math.min(input.toTs ?? nowMs, nowMs);
  const fromTs = input.fromTs ?? toTs - REPLAY_DEFAULT_SPAN_MS;
  if (!(fromTs < toTs)) throw badInput("The replay must start before it ends.", { fromTs: ["Start before the end"] });
  if (toTs - fromTs > REPLAY_MAX_SPAN_MS) throw badInput("Replay at most 31 days at a time.", { fromTs: ["At most 31 days"] });

  const [topo, rows] = await Promise.all([loadPlantTopology(db), listRuleRows(db)]);
  const { rules: current } = toRuleDefinitions(rows);
  const existing = input.ruleId !== undefined ? rows.find((r) => r.id === input.ruleId) : undefined;
  if (input.ruleId !== undefined && !existing) throw notFound("No such rule.");
  const editedRuleId = existing?.id ?? rows.reduce((m, r) => Math.max(m, r.id), 0) + 1;
  const proposal = checkProposedRule(input, editedRuleId, existing ? existing.currentVersion + 1 : 1);
  const sameKind = current.filter((r) => r.kind === input.kind);
  const proposedSet = [...sameKind.filter((r) => r.id !== editedRuleId), proposal];

  const flatChannel: Channel | null = proposal.kind === "sensor_flat" ? proposal.params.channel : null;
  const topology = scopeTopologyForReplay(topo.topology, input.kind, input.scope, flatChannel);
  const sensors = replaySensors(topology, topo.deviceIdByCode, input.kind, flatChannel);

  let source: "raw" | "1m" = input.source ?? "raw";
  if (!input.source) {
    if (fromTs < nowMs - rawRetentionMs) source = "1m";
    else if ((await estimateRawCount(pool, sensors, fromTs, toTs)) > REPLAY_RAW_BUDGET) source = "1m";
  }
  const series: Series[] = [];
  for (const s of sensors) {
    for (const ch of s.channels) series.push(await (source === "raw" ? loadRawSeries(pool, s, ch, fromTs, toTs) : loadMinuteSeries(pool, s, ch, fromTs, toTs)));
  }
  const readings = mergeSeries(series);
  const currentEpisodes = collectAlertEpisodes(replay(sameKind, topology, readings, { endTs: toTs }));
  const proposedEpisodes = collectAlertEpisodes(replay(proposedSet, topology, readings, { endTs: toTs }));

  // what the live engine stored over the span, within the scope
  const subjectInScope = new Set<string>();
  for (const p of topology.points) if (p.fieldMeterSensorKey !== null) subjectInScope.add(`point:${p.pointId}`);
  for (const a of topology.areas) if (a.climateSensorKey !== null) subjectInScope.add(`area:${a.areaId}`);
  for (const s of sensors) subjectInScope.add(`sensor:${s.code}`);
  for (const n of topology.neutralizers) subjectInScope.add(`neutralizer:${n.neutralizerId}`);
  const storedRows = await db
    .select({ subjectKey: alertsTable.subjectKey })
    .from(alertsTable)
    .where(and(eq(alertsTable.kind, input.kind), gte(alertsTable.startTs, fromTs), lt(alertsTable.startTs, toTs)));
  const stored = storedRows.filter((r) => subjectInScope.has(r.subjectKey)).length;

  return {
    fromTs,
    toTs,
    source,
    readings: readings.length,
    sensors: sensors.map((s) => s.code),
    elapsedMs: Math.round(performance.now() - started),
    editedRuleId,
    current: summarize(currentEpisodes, editedRuleId, topo.subjects),
    proposed: summarize(proposedEpisodes, editedRuleId, topo.subjects),
    stored,
  };
}
