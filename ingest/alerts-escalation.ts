// On-call e-mails and escalation, run by the alerts runner about every few seconds:
// an alert at or above the set severity, still active and unacknowledged (and not shelved)
// notifyAfterS after it was raised, is e-mailed to the on-call people of escalation order 1;
// each escalateAfterS after that without an acknowledgement, to the next order on the roster.
// The alert's notified_level (the highest order e-mailed) is raised by a guarded UPDATE and the
// mails are queued in the outbox in the same transaction, so each person gets one e-mail per
// alert and level however often (and in however many processes) this runs.
import { and, eq } from "drizzle-orm";
import type { Db } from "../db/client";
import { alertEvents, alerts } from "../db/schema";
import { listNotifyCandidates, type NotifyCandidate } from "../db/queries/alert-notify-candidates";
import { getAlertingSettings, listOnCallAt, type AlertingSettings, type RosterShift } from "../db/queries/oncall";
import { enqueueMail } from "../db/queries/outbox";
import { queueAlertPhoneMessages } from "../db/queries/phone-outbox";
import { getAlertChartSpec } from "../db/queries/alert-chart";
import { ALERT_CHART_CID, frozenLineLink } from "../lib/charts/alert-chart";
import type { AlertSubject } from "../db/queries/topology";
import { RULE_KIND_WORDS, SEVERITY_RANK, type Severity } from "../lib/vocabulary";
import { composeAlertEmail } from "../lib/mail/alert-emails";

export function severitiesAtOrAbove(min: Severity): Severity[] {
  return (["low", "medium", "high"] as const).filter((s) => SEVERITY_RANK[s] >= SEVERITY_RANK[min]);
}

/**
 * Pure: which escalation order (if any) is due for an alert now. `notifiedLevel` is the highest
 * order already e-mailed (0: nobody yet); `orders` the escalation orders on call now. The first
 * e-mail is due notifyAfterS after the raise; each later one escalateAfterS after the previous
 * step, counting the steps already taken among the orders on call.
 */
export function planNotification(
  alert: { startTs: number; notifiedLevel: number },
  orders: readonly number[],
  settings: Pick<AlertingSettings, "notifyAfterS" | "escalateAfterS">,
  nowMs: number,
): { order: number; dueTs: number } | null {
  const sorted = [...new Set(orders)].sort((a, b) => a - b);
  const next = sorted.find((o) => o > alert.notifiedLevel);
  if (next === undefined) return null;
  const stepsDone = sorted.filter((o) => o <= alert.notifiedLevel).length;
  const firstDue = alert.startTs + settings.notifyAfterS * 1000;
  const dueTs = alert.notifiedLevel === 0 ? firstDue : firstDue + Math.max(1, stepsDone) * settings.escalateAfterS * 1000;
  return nowMs >= dueTs ? { order: next, dueTs } : null;
}

export type EscalationResult = { notified: Array<{ alertId: number; order: number; recipients: string[] }> };

export async function runEscalation(
  db: Db,
  nowMs: number,
  opts: { appUrl: string; timeZone: string; subjects: ReadonlyMap<string, AlertSubject>; settings?: AlertingSettings },
): Promise<EscalationResult> {
  const settings = opts.settings ?? (await getAlertingSettings(db));
  const candidates = await listNotifyCandidates(db, severitiesAtOrAbove(settings.notifyMinSeverity), nowMs - settings.notifyAfterS * 1000, nowMs);
  const result: EscalationResult = { notified: [] };
  if (candidates.length === 0) return result;
  const onCall = await listOnCallAt(db, nowMs);
  const orders = onCall.map((s) => s.escalationOrder);
  for (const a of candidates) {
    const plan = planNotification(a, orders, settings, nowMs);
    if (!plan) continue;
    const recipients = onCall.filter((s) => s.escalationOrder === plan.order);
    const sent = await notifyOrder(db, a, plan.order, recipients, nowMs, opts);
    if (sent) result.notified.push({ alertId: a.id, order: plan.order, recipients: recipients.map((r) => r.personEmail) });
  }
  return result;
}

async function notifyOrder(
  db: Db,
  a: NotifyCandidate,
  order: number,
  recipients: RosterShift[],
  nowMs: number,
  opts: { appUrl: string; timeZone: string; subjects: ReadonlyMap<string, AlertSubject> },
): Promise<boolean> {
  const subject = opts.subjects.get(a.subjectKey);
  // the chart of the hour up to now, drawn by the mailer when it sends; its link is frozen to that hour
  const spec = (await getAlertChartSpec(db, a.id, nowMs))?.spec ?? null;
  const chart = spec
    ? { cid: ALERT_CHART_CID, frozenLink: spec.lineId !== null ? frozenLineLink(opts.appUrl, spec.lineId, spec) : `${opts.appUrl.replace(/\/$/, "")}/alerts/${a.id}`, alt: `Chart of ${spec.title.toLowerCase()}, the last hour, with the limit and the moment it was raised` }
    : undefined;
  return db.transaction(async (tx) => {
    const [res] = await tx
      .update(alerts)
      .set({ notifiedLevel: order })
      .where(and(eq(alerts.id, a.id), eq(alerts.notifiedLevel, a.notifiedLevel), eq(alerts.state, "active_unacked")));
    if (res.affectedRows !== 1) return false; // acknowledged meanwhile, or another runner did it
    const names: string[] = [];
    for (const r of recipients) {
      const mail = composeAlertEmail(
        {
          alertId: a.id,
          kind: a.kind,
          severity: a.severity,
          state: "active_unacked",
          message: a.message,
          startTs: a.startTs,
          peakValue: a.peakValue,
          expectedCrossingTs: a.expectedCrossingTs,
          areaName: a.areaName,
          lineName: a.lineName,
          pointName: a.pointName,
          where: subject?.where ?? null,
          linkLineId: a.lineId ?? subject?.linkLineId ?? null,
        },
        { level: order, recipientName: r.personName, appUrl: opts.appUrl, timeZone: opts.timeZone, nowMs, unackedForMs: nowMs - a.startTs, chart },
      );
      await enqueueMail(tx, { dedupeKey: `alert:${a.id}:order:${order}:person:${r.personId}`, toAddress: r.personEmail, subject: mail.subject, bodyText: mail.text, bodyHtml: mail.html, chart: spec }, nowMs);
      names.push(`${r.personName} <${r.personEmail}>`);
    }
    // texts and pushes to the same people, as each opted in for this severity (ingest/notifier.ts sends them)
    const phones = await queueAlertPhoneMessages(
      tx,
      {
        alertId: a.id,
        order,
        severity: a.severity,
        personIds: recipients.map((r) => r.personId),
        title: `${order > 1 ? "Escalated: " : ""}${RULE_KIND_WORDS[a.kind]} — ${subject?.where ?? ([a.areaName, a.lineName, a.pointName].filter(Boolean).join(" › ") || "the plant")}`,
        body: a.message,
        url: `${opts.appUrl.replace(/\/$/, "")}/alerts/${a.id}`,
      },
      nowMs,
    );
    if (phones.sms + phones.push > 0) names.push(`${phones.sms} text(s), ${phones.push} push(es)`);
    await tx.insert(alertEvents).values({
      alertId: a.id,
      ts: nowMs,
      kind: a.notifiedLevel === 0 ? "notified" : "escalated",
      personId: null,
      comment: (names.length ? `Order ${order}: ${names.join(", ")}` : `Nobody on call at order ${order}`).slice(0, 2000),
      value: String(order),
    });
    return true;
  });
}
