// On-call e-mails and escalation, run by the alerts runner about every few seconds:
// an alert at or above the set severity, still active and unacknowledged (and not shelved)
// notifyAfterS after it was raised (at once after it got worse), is told to the on-call people
// of escalation order 1; each escalateAfterS after that without an acknowledgement, to the next
// order on the roster. Storms go out as one message: alerts of one hall raised within a few
// minutes form a group, sent when its first alert is due and escalated as one
// (lib/alerts/notification-groups.ts decides, ingest/alerts-notify-send.ts sends). Each alert's
// notified_level is raised by a guarded UPDATE and the messages are queued in the same
// transaction, so each person gets one message per group and step however often this runs.
import type { Db } from "../db/client";
import { listNotifyCandidates, type NotifyCandidate } from "../db/queries/alert-notify-candidates";
import { runMaintenanceRound } from "../db/queries/maintenance-round";
import { getAlertingSettings, listOnCallAt, type AlertingSettings } from "../db/queries/oncall";
import type { AlertSubject } from "../db/queries/topology";
import { SEVERITY_RANK, type Severity } from "../lib/vocabulary";
import { firstDueTs, nextStep, planGroupMessages, type PendingNotifyItem } from "../lib/alerts/notification-groups";
import { sendPlannedMessage, toldAgainTs } from "./alerts-notify-send";

export function severitiesAtOrAbove(min: Severity): Severity[] {
  return (["low", "medium", "high"] as const).filter((s) => SEVERITY_RANK[s] >= SEVERITY_RANK[min]);
}

/**
 * Pure: which escalation order (if any) is due for an alert now. `notifiedLevel` is the highest
 * order already e-mailed (0: nobody yet); `orders` the escalation orders on call now. The first
 * e-mail is due notifyAfterS after the raise, or at once from worsenedTs when it got worse; each
 * later one escalateAfterS after the previous step, counting the steps already taken among the
 * orders on call.
 */
export function planNotification(
  alert: { startTs: number; shownTs?: number | null; notifiedLevel: number; worsenedTs?: number | null },
  orders: readonly number[],
  settings: Pick<AlertingSettings, "notifyAfterS" | "escalateAfterS">,
  nowMs: number,
): { order: number; dueTs: number } | null {
  return nextStep(firstDueTs(alert, settings.notifyAfterS), alert.notifiedLevel, orders, settings.escalateAfterS, nowMs);
}

/** A candidate as the grouping sees it: its time is when it was raised, or when it got worse after on call was told. */
export function toPendingItem(a: NotifyCandidate, notifyAfterS: number): PendingNotifyItem {
  const worse = toldAgainTs(a);
  return {
    alertId: a.id,
    ts: worse ?? a.startTs,
    kind: a.kind,
    severity: a.severity,
    areaId: a.areaId,
    areaName: a.areaName,
    lineId: a.lineId,
    lineName: a.lineName,
    pointName: a.pointName,
    value: a.peakValue,
    message: a.message,
    worsened: worse !== null,
    notifiedLevel: a.notifiedLevel,
    notifyGroup: a.notifyGroup,
    dueTs: firstDueTs(a, notifyAfterS),
  };
}

export type EscalationResult = { notified: Array<{ alertId: number; order: number; recipients: string[]; group: string }> };

export async function runEscalation(
  db: Db,
  nowMs: number,
  opts: { appUrl: string; timeZone: string; subjects: ReadonlyMap<string, AlertSubject>; settings?: AlertingSettings },
): Promise<EscalationResult> {
  await runMaintenanceRound(db, nowMs); // planned work: hold the alerts it explains, summarize the windows that ended
  const settings = opts.settings ?? (await getAlertingSettings(db));
  // every candidate raised so far, those not due yet included: they go with their hall's group
  const candidates = await listNotifyCandidates(db, severitiesAtOrAbove(settings.notifyMinSeverity), nowMs, nowMs);
  const result: EscalationResult = { notified: [] };
  if (candidates.length === 0) return result;
  const onCall = await listOnCallAt(db, nowMs);
  const orders = onCall.map((s) => s.escalationOrder);
  const byId = new Map(candidates.map((a) => [a.id, a]));
  const plans = planGroupMessages(
    candidates.map((a) => toPendingItem(a, settings.notifyAfterS)),
    orders,
    settings.escalateAfterS,
    nowMs,
  );
  for (const plan of plans) {
    const recipients = onCall.filter((s) => s.escalationOrder === plan.order);
    const told = await sendPlannedMessage(db, plan, byId, recipients, nowMs, opts);
    for (const a of told) result.notified.push({ alertId: a.id, order: plan.order, recipients: recipients.map((r) => r.personEmail), group: plan.key });
  }
  return result;
}
