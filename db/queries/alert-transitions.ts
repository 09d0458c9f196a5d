// The alerts runner's writes for the engine's transitions (raise, update, clear) and for
// shelving that has run out. Every write that changes an alert also writes an alert_events row
// in the same transaction.
import { and, desc, eq, gt, inArray, isNotNull, isNull, lte } from "drizzle-orm";
import type { Db } from "../client";
import { alertEvents, alerts } from "../schema";
import { applyAlertAction, type AlertTransition } from "../../lib/rules";
import { ACTIVE_ALERT_STATES, SEVERITY_WORDS, formatAlertValue, type AlertState, type RuleKind, type Severity } from "../../lib/vocabulary";
import type { AlertChange } from "../../lib/views/alerts";
import { lifecycleColumns, lifecycleOfRow, rowOfLifecycle, type DbWriter } from "./alert-rows";
import type { AlertSubject } from "./topology";

/** What a raise carries (an engine transition, or a condition event of lib/alerts/condition-merge.ts). */
export type RaiseFields = Omit<AlertTransition, "type"> & { type?: string };

export type OpenAlertRef = { id: number; ruleId: number; subjectKey: string; startTs: number };

/** Alerts the engine may still hold active (not yet cleared): the runner's key map at start-up. */
export async function listUnclearedAlerts(db: Db): Promise<OpenAlertRef[]> {
  return db
    .select({ id: alerts.id, ruleId: alerts.ruleId, subjectKey: alerts.subjectKey, startTs: alerts.startTs })
    .from(alerts)
    .where(and(isNull(alerts.endTs), inArray(alerts.state, [...ACTIVE_ALERT_STATES])));
}

/**
 * A raise: a new alert row (its place from the subject directory) and its "raised" event. If the
 * same rule and subject is shelved on an earlier alert right now, the new one inherits the
 * shelving: shelving silences a nuisance alert, not one occurrence of it.
 */
export async function insertRaisedAlert(tx: DbWriter, t: RaiseFields, subject: AlertSubject | undefined, nowMs: number): Promise<{ id: number; shelvedUntilTs: number | null }> {
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
    shownTs: nowMs,
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
export async function applyUpdateTransition(tx: DbWriter, alertId: number, t: Pick<AlertTransition, "ts" | "peakValue" | "message" | "expectedCrossingTs">): Promise<void> {
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

type AlertPlaceChange = { state: AlertState; severity: Severity; lineId: number | null; areaId: number | null };

/**
 * One alert of a condition got worse (lib/alerts/condition-merge.ts): a more severe rule of the
 * same condition now holds ("escalate", e.g. past the 20 kV limit on top of the 12 kV one) or
 * the peak is clearly past the one last told ("worse"). The row takes the new severity, kind
 * and peak; on call is told again from now (worsened_ts, notified_level back to 0), and an
 * acknowledged alert asks for a new acknowledgement. Returns null when the row has cleared.
 */
export async function applyWorsened(
  tx: DbWriter,
  alertId: number,
  e: { type: "escalate" | "worse"; ts: number; kind: RuleKind; severity: Severity; previousSeverity?: Severity; peakValue: number; message: string },
): Promise<AlertPlaceChange | null> {
  const [row] = await tx.select({ state: alerts.state, lineId: alerts.lineId, areaId: alerts.areaId }).from(alerts).where(eq(alerts.id, alertId)).for("update");
  if (!row || (row.state !== "active_unacked" && row.state !== "active_acked")) return null;
  await tx
    .update(alerts)
    .set({
      severity: e.severity,
      kind: e.kind,
      ...(Number.isFinite(e.peakValue) ? { peakValue: e.peakValue } : {}),
      message: e.message.slice(0, 300),
      worsenedTs: e.ts,
      notifiedLevel: 0,
      state: "active_unacked",
    })
    .where(eq(alerts.id, alertId));
  const peak = formatAlertValue(e.kind, e.peakValue);
  const comment =
    e.type === "escalate"
      ? `Now ${SEVERITY_WORDS[e.severity].toLowerCase()}${e.previousSeverity ? ` (was ${SEVERITY_WORDS[e.previousSeverity].toLowerCase()})` : ""}, peak ${peak}: ${e.message}`
      : `Peak now ${peak}: ${e.message}`;
  await tx.insert(alertEvents).values({ alertId, ts: e.ts, kind: "worsened", personId: null, comment: comment.slice(0, 300), value: Number.isFinite(e.peakValue) ? String(Number(e.peakValue.toPrecision(8))).slice(0, 32) : null });
  return { state: "active_unacked", severity: e.severity, lineId: row.lineId, areaId: row.areaId };
}

/** The most severe rule of a condition cleared while a milder one still holds: one step down. */
export async function applyEased(tx: DbWriter, alertId: number, e: { ts: number; kind: RuleKind; severity: Severity; previousSeverity?: Severity; message: string }): Promise<AlertPlaceChange | null> {
  const [row] = await tx.select({ state: alerts.state, lineId: alerts.lineId, areaId: alerts.areaId }).from(alerts).where(eq(alerts.id, alertId)).for("update");
  if (!row || (row.state !== "active_unacked" && row.state !== "active_acked")) return null;
  await tx.update(alerts).set({ severity: e.severity, kind: e.kind }).where(eq(alerts.id, alertId));
  const comment = `Back to ${SEVERITY_WORDS[e.severity].toLowerCase()}${e.previousSeverity ? ` (was ${SEVERITY_WORDS[e.previousSeverity].toLowerCase()})` : ""}: ${e.message}`;
  await tx.insert(alertEvents).values({ alertId, ts: e.ts, kind: "eased", personId: null, comment: comment.slice(0, 300), value: null });
  return { state: row.state, severity: e.severity, lineId: row.lineId, areaId: row.areaId };
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
