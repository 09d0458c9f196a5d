// Alerts: the list and detail read models, the people's actions on an alert (acknowledge,
// comment, shelve, unshelve — the state changes come from lib/rules' alert lifecycle), the
// writes the alerts runner makes for the engine's transitions, and the alert-load figures.
// Every write that changes an alert also writes an alert_events row in the same transaction.
import { and, asc, desc, eq, gt, gte, inArray, isNotNull, isNull, lt, lte, ne, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import { alertEvents, alerts, areas, lines, people, points, rules } from "../schema";
import {
  applyAlertAction,
  type AlertAction,
  type AlertLifecycleState,
  type AlertTransition,
} from "../../lib/rules";
import { AppError, notFound } from "../../lib/errors";
import type { AlertState, RuleKind, Severity } from "../../lib/vocabulary";
import type { AlertSubject } from "./topology";

/** What the runner and the app's actions write with (a Db or a transaction). */
export type DbWriter = Pick<Db, "select" | "insert" | "update">;

export const ALERT_STATE_NAMES = ["active_unacked", "active_acked", "cleared_unacked", "closed"] as const;
export const OPEN_STATES: AlertState[] = ["active_unacked", "active_acked", "cleared_unacked"];

export type AlertListItem = {
  id: number;
  ruleId: number;
  ruleVersion: number;
  ruleName: string | null;
  kind: RuleKind;
  severity: Severity;
  subjectKey: string;
  areaId: number | null;
  lineId: number | null;
  pointId: number | null;
  deviceId: number | null;
  neutralizerId: number | null;
  areaName: string | null;
  lineName: string | null;
  pointName: string | null;
  state: AlertState;
  message: string;
  startTs: number;
  endTs: number | null;
  closedTs: number | null;
  peakValue: number | null;
  expectedCrossingTs: number | null;
  chattering: boolean;
  shelvedUntilTs: number | null;
  shelvedReason: string | null;
  ackedBy: number | null;
  ackedByName: string | null;
  ackedTs: number | null;
  notifiedLevel: number;
  /** the line page to open: the alert's line, else the first line of its hall */
  linkLineId: number | null;
};

const listColumns = {
  id: alerts.id,
  ruleId: alerts.ruleId,
  ruleVersion: alerts.ruleVersion,
  ruleName: rules.name,
  kind: alerts.kind,
  severity: alerts.severity,
  subjectKey: alerts.subjectKey,
  areaId: alerts.areaId,
  lineId: alerts.lineId,
  pointId: alerts.pointId,
  deviceId: alerts.deviceId,
  neutralizerId: alerts.neutralizerId,
  areaName: areas.name,
  lineName: lines.name,
  pointName: points.name,
  state: alerts.state,
  message: alerts.message,
  startTs: alerts.startTs,
  endTs: alerts.endTs,
  closedTs: alerts.closedTs,
  peakValue: alerts.peakValue,
  expectedCrossingTs: alerts.expectedCrossingTs,
  chattering: alerts.chattering,
  shelvedUntilTs: alerts.shelvedUntilTs,
  shelvedReason: alerts.shelvedReason,
  ackedBy: alerts.ackedBy,
  ackedByName: people.name,
  ackedTs: alerts.ackedTs,
  notifiedLevel: alerts.notifiedLevel,
  linkLineId: sql<number | null>`COALESCE(${alerts.lineId}, (SELECT l2.id FROM ${lines} AS l2 WHERE l2.area_id = ${alerts.areaId} ORDER BY l2.display_order, l2.id LIMIT 1))`.mapWith((v: unknown) => (v === null || v === undefined ? null : Number(v))),
};

export type AlertFilters = {
  areaId?: number;
  lineId?: number;
  states?: AlertState[];
  /** only alerts not closed */
  openOnly?: boolean;
  severities?: Severity[];
  /** alerts overlapping [fromTs, toTs): started before toTs and not ended before fromTs */
  fromTs?: number;
  toTs?: number;
  ids?: number[];
  limit?: number;
};

function filterWhere(f: AlertFilters): SQL | undefined {
  const where: SQL[] = [];
  if (f.areaId !== undefined) where.push(eq(alerts.areaId, f.areaId));
  if (f.lineId !== undefined) where.push(eq(alerts.lineId, f.lineId));
  if (f.states?.length) where.push(inArray(alerts.state, f.states));
  if (f.openOnly) where.push(ne(alerts.state, "closed"));
  if (f.severities?.length) where.push(inArray(alerts.severity, f.severities));
  if (f.toTs !== undefined) where.push(lt(alerts.startTs, f.toTs));
  if (f.fromTs !== undefined) where.push(or(isNull(alerts.closedTs), gte(alerts.closedTs, f.fromTs))!);
  if (f.ids) where.push(inArray(alerts.id, f.ids.length ? f.ids : [-1]));
  return where.length ? and(...where) : undefined;
}

/**
 * Alerts for the list: open ones first (high severity first, then the longest waiting first),
 * then closed ones, newest first.
 */
export async function listAlerts(db: Db, f: AlertFilters = {}): Promise<AlertListItem[]> {
  const rows = await db
    .select(listColumns)
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .leftJoin(areas, eq(areas.id, alerts.areaId))
    .leftJoin(lines, eq(lines.id, alerts.lineId))
    .leftJoin(points, eq(points.id, alerts.pointId))
    .leftJoin(people, eq(people.id, alerts.ackedBy))
    .where(filterWhere(f))
    .orderBy(
      sql`(${alerts.state} = 'closed') ASC`,
      sql`(CASE ${alerts.severity} WHEN 'high' THEN 3 WHEN 'medium' THEN 2 ELSE 1 END) DESC`,
      sql`(CASE WHEN ${alerts.state} = 'closed' THEN -${alerts.startTs} ELSE ${alerts.startTs} END) ASC`,
      asc(alerts.id),
    )
    .limit(Math.min(f.limit ?? 200, 1000));
  return rows;
}

export type AlertEvent = { id: number; ts: number; kind: string; personId: number | null; personName: string | null; comment: string | null; value: string | null };
export type AlertDetail = AlertListItem & { events: AlertEvent[] };

export async function getAlertDetail(db: Db, id: number): Promise<AlertDetail | null> {
  const [row] = await listAlerts(db, { ids: [id], limit: 1 });
  if (!row) return null;
  const events = await db
    .select({ id: alertEvents.id, ts: alertEvents.ts, kind: alertEvents.kind, personId: alertEvents.personId, personName: people.name, comment: alertEvents.comment, value: alertEvents.value })
    .from(alertEvents)
    .leftJoin(people, eq(people.id, alertEvents.personId))
    .where(eq(alertEvents.alertId, id))
    .orderBy(asc(alertEvents.ts), asc(alertEvents.id));
  return { ...row, events };
}

/** Counts for the page header: open alerts by state. */
export async function countOpenAlerts(db: Db): Promise<Record<AlertState, number>> {
  const rows = await db.select({ state: alerts.state, n: sql<number>`COUNT(*)` }).from(alerts).where(ne(alerts.state, "closed")).groupBy(alerts.state);
  const out: Record<AlertState, number> = { active_unacked: 0, active_acked: 0, cleared_unacked: 0, closed: 0 };
  for (const r of rows) out[r.state] = Number(r.n);
  return out;
}

// ---------------------------------------------------------------------------------------------
// Lifecycle <-> row

type LifecycleRow = {
  state: AlertState;
  startTs: number;
  endTs: number | null;
  closedTs: number | null;
  ackedBy: number | null;
  ackedTs: number | null;
  shelvedUntilTs: number | null;
  shelvedReason: string | null;
};

export function lifecycleOfRow(r: LifecycleRow): AlertLifecycleState {
  return {
    state: r.state,
    raisedTs: r.startTs,
    ackedTs: r.ackedTs,
    ackedBy: r.ackedBy,
    clearedTs: r.endTs,
    closedTs: r.closedTs,
    shelved: r.shelvedUntilTs !== null,
    shelvedTs: null,
    shelvedUntilTs: r.shelvedUntilTs,
    shelvedReason: r.shelvedReason,
    shelvedBy: null,
  };
}

function rowOfLifecycle(s: AlertLifecycleState) {
  return {
    state: s.state,
    endTs: s.clearedTs,
    closedTs: s.closedTs,
    ackedBy: s.ackedBy,
    ackedTs: s.ackedTs,
    shelvedUntilTs: s.shelved ? s.shelvedUntilTs : null,
    shelvedReason: s.shelved ? (s.shelvedReason ?? "").slice(0, 300) : null,
  };
}

const lifecycleColumns = {
  id: alerts.id,
  lineId: alerts.lineId,
  areaId: alerts.areaId,
  severity: alerts.severity,
  state: alerts.state,
  startTs: alerts.startTs,
  endTs: alerts.endTs,
  closedTs: alerts.closedTs,
  ackedBy: alerts.ackedBy,
  ackedTs: alerts.ackedTs,
  shelvedUntilTs: alerts.shelvedUntilTs,
  shelvedReason: alerts.shelvedReason,
};

/** The change to announce on `stillfield/internal/alerts` after the transaction commits. */
export type AlertChange = { alertId: number; lineId: number | null; areaId: number | null; state: AlertState; severity: Severity; ts: number; shelved: boolean };

// ---------------------------------------------------------------------------------------------
// People's actions

export type RespondInput =
  | { alertId: number; type: "ack"; comment?: string }
  | { alertId: number; type: "comment"; comment: string }
  | { alertId: number; type: "shelve"; untilTs: number; reason: string }
  | { alertId: number; type: "unshelve"; comment?: string };

/**
 * Applies a person's action to an alert (row locked for the transaction), writes the events and
 * returns the change. An action the lifecycle refuses (already acknowledged, closed, …) is a 409
 * with the lifecycle's own words.
 */
export async function respondToAlert(db: Db, input: RespondInput, personId: number, nowMs = Date.now()): Promise<AlertChange> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select(lifecycleColumns).from(alerts).where(eq(alerts.id, input.alertId)).for("update");
    if (!row) throw notFound("No such alert.");
    const change = (state: AlertState, shelved: boolean): AlertChange => ({
      alertId: row.id,
      lineId: row.lineId,
      areaId: row.areaId,
      state,
      severity: row.severity,
      ts: nowMs,
      shelved,
    });

    if (input.type === "comment") {
      await tx.insert(alertEvents).values({ alertId: row.id, ts: nowMs, kind: "commented", personId, comment: input.comment });
      return change(row.state, row.shelvedUntilTs !== null && row.shelvedUntilTs > nowMs);
    }

    // actions are dated no earlier than the raise (clocks of app and worker may differ a little)
    const ts = Math.max(nowMs, row.startTs);
    const action: AlertAction =
      input.type === "ack"
        ? { type: "ack", ts, actorId: personId }
        : input.type === "shelve"
          ? { type: "shelve", ts, untilTs: input.untilTs, reason: input.reason, actorId: personId }
          : { type: "unshelve", ts, actorId: personId };
    const before = lifecycleOfRow(row);
    const result = applyAlertAction(before, action);
    if (result.error) throw new AppError("conflict", result.error.message);
    const next = result.state;
    await tx.update(alerts).set(rowOfLifecycle(next)).where(eq(alerts.id, row.id));

    const events: (typeof alertEvents.$inferInsert)[] = [];
    if (result.shelveExpired) events.push({ alertId: row.id, ts, kind: "unshelved", personId: null, comment: "Shelving ran out" });
    if (input.type === "ack") {
      events.push({ alertId: row.id, ts, kind: "acknowledged", personId, comment: input.comment || null });
      if (next.state === "closed") events.push({ alertId: row.id, ts, kind: "closed", personId, comment: null });
    } else if (input.type === "shelve") {
      events.push({ alertId: row.id, ts, kind: "shelved", personId, comment: input.reason.trim(), value: String(input.untilTs) });
    } else {
      events.push({ alertId: row.id, ts, kind: "unshelved", personId, comment: input.comment || null });
    }
    await tx.insert(alertEvents).values(events);
    return change(next.state, next.shelved);
  });
}

// ---------------------------------------------------------------------------------------------
// The runner's writes

export type OpenAlertRef = { id: number; ruleId: number; subjectKey: string; startTs: number };

/** Alerts the engine may still hold active (not yet cleared): the runner's key map at start-up. */
export async function listUnclearedAlerts(db: Db): Promise<OpenAlertRef[]> {
  return db
    .select({ id: alerts.id, ruleId: alerts.ruleId, subjectKey: alerts.subjectKey, startTs: alerts.startTs })
    .from(alerts)
    .where(and(isNull(alerts.endTs), inArray(alerts.state, ["active_unacked", "active_acked"])));
}

/**
 * A raise: a new alert row (its place from the subject directory) and its "raised" event. If the
 * same rule and subject is shelved on an earlier alert right now, the new one inherits the
 * shelving: shelving silences a nuisance alert, not one occurrence of it.
 */
export async function insertRaisedAlert(tx: DbWriter, t: AlertTransition, subject: AlertSubject | undefined, nowMs: number): Promise<{ id: number; shelvedUntilTs: number | null }> {
  const [shelf] = await tx
    .select({ shelvedUntilTs: alerts.shelvedUntilTs, shelvedReason: alerts.shelvedReason })
    .from(alerts)
    .where(and(eq(alerts.ruleId, t.ruleId), eq(alerts.subjectKey, t.subjectKey), isNotNull(alerts.shelvedUntilTs), gt(alerts.shelvedUntilTs, Math.max(nowMs, t.ts))))
    .orderBy(desc(alerts.shelvedUntilTs))
    .limit(1);
  const [res] = await tx.insert(alerts).values({
    ruleId: t.ruleId,
    ruleVersion: t.ruleVersion,
    kind: t.kind,
    severity: t.severity,
    subjectKey: t.subjectKey.slice(0, 80),
    areaId: subject?.areaId ?? null,
    lineId: subject?.lineId ?? null,
    pointId: subject?.pointId ?? null,
    deviceId: subject?.deviceId ?? null,
    neutralizerId: subject?.neutralizerId ?? null,
    state: "active_unacked",
    message: t.message.slice(0, 300),
    startTs: t.raisedTs,
    peakValue: Number.isFinite(t.peakValue) ? t.peakValue : null,
    expectedCrossingTs: t.expectedCrossingTs ?? null,
    chattering: t.chattering,
    shelvedUntilTs: shelf?.shelvedUntilTs ?? null,
    shelvedReason: shelf?.shelvedReason ?? null,
  });
  const id = Number(res.insertId);
  const events: (typeof alertEvents.$inferInsert)[] = [
    { alertId: id, ts: t.ts, kind: "raised", personId: null, comment: t.conditionSinceTs !== undefined ? `Condition since ${new Date(t.conditionSinceTs).toISOString()}` : null, value: String(Number(t.value.toPrecision(8))).slice(0, 32) },
  ];
  if (shelf?.shelvedUntilTs) {
    events.push({ alertId: id, ts: t.ts, kind: "shelved", personId: null, comment: `Still shelved: ${shelf.shelvedReason ?? ""}`.slice(0, 300), value: String(shelf.shelvedUntilTs) });
  }
  await tx.insert(alertEvents).values(events);
  return { id, shelvedUntilTs: shelf?.shelvedUntilTs ?? null };
}

/** An update: the peak (and the forecast's crossing time) moved. */
export async function applyUpdateTransition(tx: DbWriter, alertId: number, t: AlertTransition): Promise<void> {
  await tx
    .update(alerts)
    .set({
      peakValue: Number.isFinite(t.peakValue) ? t.peakValue : null,
      message: t.message.slice(0, 300),
      ...(t.expectedCrossingTs !== undefined ? { expectedCrossingTs: t.expectedCrossingTs } : {}),
    })
    .where(eq(alerts.id, alertId));
  await tx.insert(alertEvents).values({ alertId, ts: t.ts, kind: "updated", personId: null, comment: t.message.slice(0, 300), value: String(Number(t.peakValue.toPrecision(8))).slice(0, 32) });
}

/**
 * A clear (the condition is back to normal, or its rule is gone): active_unacked →
 * cleared_unacked, active_acked → closed. Returns the new state, or null when the row had
 * already cleared.
 */
export async function applyClearTransition(
  tx: DbWriter,
  alertId: number,
  clear: { ts: number; peakValue?: number; message?: string; reason?: string },
): Promise<{ state: AlertState; severity: Severity; lineId: number | null; areaId: number | null; shelved: boolean } | null> {
  const [row] = await tx.select(lifecycleColumns).from(alerts).where(eq(alerts.id, alertId)).for("update");
  if (!row) return null;
  const ts = Math.max(clear.ts, row.startTs);
  const result = applyAlertAction(lifecycleOfRow(row), { type: "clear", ts });
  if (result.error) return null; // already cleared or closed
  const next = result.state;
  await tx
    .update(alerts)
    .set({
      ...rowOfLifecycle(next),
      ...(clear.peakValue !== undefined && Number.isFinite(clear.peakValue) ? { peakValue: clear.peakValue } : {}),
      ...(clear.message ? { message: clear.message.slice(0, 300) } : {}),
    })
    .where(eq(alerts.id, alertId));
  const events: (typeof alertEvents.$inferInsert)[] = [];
  if (result.shelveExpired) events.push({ alertId, ts, kind: "unshelved", personId: null, comment: "Shelving ran out" });
  events.push({ alertId, ts, kind: "cleared", personId: null, comment: (clear.reason ?? clear.message ?? null)?.slice(0, 300) ?? null });
  if (next.state === "closed") events.push({ alertId, ts, kind: "closed", personId: null, comment: null });
  await tx.insert(alertEvents).values(events);
  return { state: next.state, severity: row.severity, lineId: row.lineId, areaId: row.areaId, shelved: next.shelved };
}

/** Shelvings whose time is up: cleared on the row, with an "unshelved" event each. */
export async function expireShelving(db: Db, nowMs: number): Promise<AlertChange[]> {
  const due = await db
    .select({ id: alerts.id })
    .from(alerts)
    .where(and(isNotNull(alerts.shelvedUntilTs), lte(alerts.shelvedUntilTs, nowMs)))
    .limit(500);
  const changes: AlertChange[] = [];
  for (const { id } of due) {
    const change = await db.transaction(async (tx) => {
      const [row] = await tx.select(lifecycleColumns).from(alerts).where(eq(alerts.id, id)).for("update");
      if (!row || row.shelvedUntilTs === null || row.shelvedUntilTs > nowMs) return null;
      await tx.update(alerts).set({ shelvedUntilTs: null, shelvedReason: null }).where(eq(alerts.id, id));
      await tx.insert(alertEvents).values({ alertId: id, ts: Math.max(row.shelvedUntilTs, row.startTs), kind: "unshelved", personId: null, comment: "Shelving ran out" });
      return { alertId: id, lineId: row.lineId, areaId: row.areaId, state: row.state, severity: row.severity, ts: nowMs, shelved: false } satisfies AlertChange;
    });
    if (change) changes.push(change);
  }
  return changes;
}

// ---------------------------------------------------------------------------------------------
// Notification candidates

export type NotifyCandidate = {
  id: number;
  ruleId: number;
  kind: RuleKind;
  severity: Severity;
  subjectKey: string;
  areaId: number | null;
  lineId: number | null;
  pointId: number | null;
  message: string;
  startTs: number;
  peakValue: number | null;
  expectedCrossingTs: number | null;
  notifiedLevel: number;
  areaName: string | null;
  lineName: string | null;
  pointName: string | null;
};

/** Active, unacknowledged, unshelved alerts at or above a severity, raised at or before `startedBy`. */
export async function listNotifyCandidates(db: Db, severities: Severity[], startedBy: number, nowMs: number): Promise<NotifyCandidate[]> {
  return db
    .select({
      id: alerts.id,
      ruleId: alerts.ruleId,
      kind: alerts.kind,
      severity: alerts.severity,
      subjectKey: alerts.subjectKey,
      areaId: alerts.areaId,
      lineId: alerts.lineId,
      pointId: alerts.pointId,
      message: alerts.message,
      startTs: alerts.startTs,
      peakValue: alerts.peakValue,
      expectedCrossingTs: alerts.expectedCrossingTs,
      notifiedLevel: alerts.notifiedLevel,
      areaName: areas.name,
      lineName: lines.name,
      pointName: points.name,
    })
    .from(alerts)
    .leftJoin(areas, eq(areas.id, alerts.areaId))
    .leftJoin(lines, eq(lines.id, alerts.lineId))
    .leftJoin(points, eq(points.id, alerts.pointId))
    .where(
      and(
        eq(alerts.state, "active_unacked"),
        inArray(alerts.severity, severities.length ? severities : ["high"]),
        lte(alerts.startTs, startedBy),
        or(isNull(alerts.shelvedUntilTs), lte(alerts.shelvedUntilTs, nowMs)),
      ),
    )
    .orderBy(asc(alerts.startTs))
    .limit(500);
}

// ---------------------------------------------------------------------------------------------
// Alert load (EEMUA 191 / ISA-18.2 benchmarks)

export type LoadAlert = { id: number; ruleId: number; ruleName: string | null; kind: RuleKind; severity: Severity; subjectKey: string; startTs: number; endTs: number | null; closedTs: number | null; chattering: boolean; state: AlertState };

export async function listAlertsStartedBetween(db: Db, fromTs: number, toTs: number, limit = 200_000): Promise<LoadAlert[]> {
  return db
    .select({
      id: alerts.id,
      ruleId: alerts.ruleId,
      ruleName: rules.name,
      kind: alerts.kind,
      severity: alerts.severity,
      subjectKey: alerts.subjectKey,
      startTs: alerts.startTs,
      endTs: alerts.endTs,
      closedTs: alerts.closedTs,
      chattering: alerts.chattering,
      state: alerts.state,
    })
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .where(and(gte(alerts.startTs, fromTs), lt(alerts.startTs, toTs)))
    .orderBy(asc(alerts.startTs))
    .limit(limit);
}

/** Alerts still not cleared that were raised before `beforeTs` (standing alerts). */
export async function listStandingAlerts(db: Db, beforeTs: number): Promise<LoadAlert[]> {
  return db
    .select({
      id: alerts.id,
      ruleId: alerts.ruleId,
      ruleName: rules.name,
      kind: alerts.kind,
      severity: alerts.severity,
      subjectKey: alerts.subjectKey,
      startTs: alerts.startTs,
      endTs: alerts.endTs,
      closedTs: alerts.closedTs,
      chattering: alerts.chattering,
      state: alerts.state,
    })
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .where(and(isNull(alerts.endTs), inArray(alerts.state, ["active_unacked", "active_acked"]), lt(alerts.startTs, beforeTs)))
    .orderBy(asc(alerts.startTs))
    .limit(1000);
}

export const TEN_MIN_MS = 10 * 60_000;
export const DAY_MS = 86_400_000;
/** More than this many alerts in 10 minutes is a flood (EEMUA 191 / ISA-18.2: "more than 10 alarms in 10 minutes"). */
export const FLOOD_PER_10_MIN = 10;
/** EEMUA 191 / ISA-18.2 average alarm rate per 10 minutes: about 1 "very likely acceptable", 2 "manageable". */
export const BENCHMARK_ACCEPTABLE_PER_10_MIN = 1;
export const BENCHMARK_MANAGEABLE_PER_10_MIN = 2;
/** ISA-18.2 target: under 1 % of the time in flood. */
export const BENCHMARK_FLOOD_TIME_FRACTION = 0.01;
/** Standing (stale) alerts: active for more than 24 hours (ISA-18.2 "stale alarm", from memory). */
export const STANDING_MS = 24 * 3_600_000;

export type AlertLoad = {
  fromTs: number;
  toTs: number;
  total: number;
  /** alerts raised in each 10-minute bucket from fromTs */
  per10Min: number[];
  perDay: Array<{ dayTs: number; count: number }>;
  averagePer10Min: number;
  peakPer10Min: number;
  floodBuckets: number;
  floodTimeFraction: number;
  floods: Array<{ startTs: number; endTs: number; count: number }>;
  chatteringCount: number;
  chatteringRules: Array<{ ruleId: number; ruleName: string | null; subjectKey: string; count: number }>;
  standing: Array<{ id: number; ruleName: string | null; kind: RuleKind; subjectKey: string; startTs: number; hours: number }>;
  noisiest: Array<{ ruleId: number; ruleName: string | null; kind: RuleKind; count: number; share: number }>;
  verdict: "acceptable" | "manageable" | "demanding" | "overloaded";
};

/**
 * Pure: the alert-load figures over [fromTs, toTs) from the alerts raised in it (and those
 * standing at `nowMs`). Day buckets start at fromTs (plant days are the caller's concern).
 */
export function computeAlertLoad(raised: readonly LoadAlert[], standingNow: readonly LoadAlert[], fromTs: number, toTs: number, nowMs: number): AlertLoad {
  const spanMs = Math.max(TEN_MIN_MS, toTs - fromTs);
  const nBuckets = Math.ceil(spanMs / TEN_MIN_MS);
  const per10Min = new Array<number>(nBuckets).fill(0);
  const nDays = Math.ceil(spanMs / DAY_MS);
  const perDayCounts = new Array<number>(nDays).fill(0);
  const byRule = new Map<number, { ruleId: number; ruleName: string | null; kind: RuleKind; count: number }>();
  const chatter = new Map<string, { ruleId: number; ruleName: string | null; subjectKey: string; count: number }>();
  let total = 0;
  let chatteringCount = 0;
  for (const a of raised) {
    if (a.startTs < fromTs || a.startTs >= toTs) continue;
    total++;
    per10Min[Math.floor((a.startTs - fromTs) / TEN_MIN_MS)]++;
    perDayCounts[Math.floor((a.startTs - fromTs) / DAY_MS)]++;
    const r = byRule.get(a.ruleId) ?? { ruleId: a.ruleId, ruleName: a.ruleName, kind: a.kind, count: 0 };
    r.count++;
    byRule.set(a.ruleId, r);
    if (a.chattering) {
      chatteringCount++;
      const key = `${a.ruleId}|${a.subjectKey}`;
      const c = chatter.get(key) ?? { ruleId: a.ruleId, ruleName: a.ruleName, subjectKey: a.subjectKey, count: 0 };
      c.count++;
      chatter.set(key, c);
    }
  }
  const floods: AlertLoad["floods"] = [];
  let floodBuckets = 0;
  per10Min.forEach((count, i) => {
    if (count <= FLOOD_PER_10_MIN) return;
    floodBuckets++;
    const startTs = fromTs + i * TEN_MIN_MS;
    const last = floods[floods.length - 1];
    if (last && last.endTs === startTs) {
      last.endTs = startTs + TEN_MIN_MS;
      last.count += count;
    } else floods.push({ startTs, endTs: startTs + TEN_MIN_MS, count });
  });
  const averagePer10Min = total / nBuckets;
  const floodTimeFraction = floodBuckets / nBuckets;
  const noisiest = [...byRule.values()]
    .sort((a, b) => b.count - a.count || a.ruleId - b.ruleId)
    .slice(0, 10)
    .map((r) => ({ ...r, share: total ? r.count / total : 0 }));
  const standing = standingNow
    .filter((a) => nowMs - a.startTs > STANDING_MS)
    .map((a) => ({ id: a.id, ruleName: a.ruleName, kind: a.kind, subjectKey: a.subjectKey, startTs: a.startTs, hours: (nowMs - a.startTs) / 3_600_000 }));
  const verdict: AlertLoad["verdict"] =
    floodTimeFraction >= BENCHMARK_FLOOD_TIME_FRACTION && averagePer10Min > BENCHMARK_MANAGEABLE_PER_10_MIN
      ? "overloaded"
      : averagePer10Min <= BENCHMARK_ACCEPTABLE_PER_10_MIN
        ? "acceptable"
        : averagePer10Min <= BENCHMARK_MANAGEABLE_PER_10_MIN
          ? "manageable"
          : "demanding";
  return {
    fromTs,
    toTs,
    total,
    per10Min,
    perDay: perDayCounts.map((count, i) => ({ dayTs: fromTs + i * DAY_MS, count })),
    averagePer10Min,
    peakPer10Min: per10Min.reduce((m, x) => Math.max(m, x), 0),
    floodBuckets,
    floodTimeFraction,
    floods,
    chatteringCount,
    chatteringRules: [...chatter.values()].sort((a, b) => b.count - a.count).slice(0, 10),
    standing,
    noisiest,
    verdict,
  };
}

export async function getAlertLoad(db: Db, fromTs: number, toTs: number, nowMs = Date.now()): Promise<AlertLoad> {
  const [raised, standing] = await Promise.all([listAlertsStartedBetween(db, fromTs, toTs), listStandingAlerts(db, nowMs - STANDING_MS)]);
  return computeAlertLoad(raised, standing, fromTs, toTs, nowMs);
}

/** Alerts raised in [fromTs, toTs) for the daily digest, oldest first. */
export async function listAlertsForDigest(db: Db, fromTs: number, toTs: number): Promise<AlertListItem[]> {
  const rows = await db
    .select(listColumns)
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .leftJoin(areas, eq(areas.id, alerts.areaId))
    .leftJoin(lines, eq(lines.id, alerts.lineId))
    .leftJoin(points, eq(points.id, alerts.pointId))
    .leftJoin(people, eq(people.id, alerts.ackedBy))
    .where(and(gte(alerts.startTs, fromTs), lt(alerts.startTs, toTs)))
    .orderBy(asc(alerts.startTs))
    .limit(2000);
  return rows;
}
