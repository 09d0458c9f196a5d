// Telling on call one planned message (lib/alerts/notification-groups.ts planGroupMessages): a
// storm group of one hall as one e-mail per person plus one text / push, or a lone alert as the
// alert's own e-mail. In one transaction: each alert's notified_level and notify_group are raised
// by a guarded UPDATE (an alert acknowledged meanwhile drops out of the message), the mails and
// phone messages are queued under dedupe keys made of the group (or alert), the order and, for an
// alert told again because it got worse, its worsened_ts; and each alert gets its own
// "notified" / "escalated" event. However often (and in however many processes) this runs, each
// person gets one message per group and step.
import { and, eq } from "drizzle-orm";
import type { Db } from "../db/client";
import { alertEvents, alerts } from "../db/schema";
import type { NotifyCandidate } from "../db/queries/alert-notify-candidates";
import type { RosterShift } from "../db/queries/oncall";
import { enqueueMail } from "../db/queries/outbox";
import { queueAlertPhoneMessages } from "../db/queries/phone-outbox";
import { getAlertChartSpec } from "../db/queries/alert-chart";
import type { AlertSubject } from "../db/queries/topology";
import { ALERT_CHART_CID, frozenLineLink } from "../lib/charts/alert-chart";
import { groupTitle, type PlannedGroupMessage } from "../lib/alerts/notification-groups";
import { RULE_KIND_WORDS, SEVERITY_RANK, SEVERITY_WORDS, formatAlertValue, type Severity } from "../lib/vocabulary";
import { alertMailInput, composeAlertEmail, type AlertMailInput } from "../lib/mail/alert-emails";
import { composeGroupEmail, composeGroupPhoneText, type GroupMailItem } from "../lib/mail/alert-group-emails";

/** The time it got worse, when on call is to be told again (it was told of it before); else null. */
export function toldAgainTs(a: Pick<NotifyCandidate, "worsenedTs" | "toldBefore">): number | null {
  return a.toldBefore ? a.worsenedTs : null;
}

export type SendOptions = { appUrl: string; timeZone: string; subjects: ReadonlyMap<string, AlertSubject> };

function mailInput(a: NotifyCandidate, subject: AlertSubject | undefined): AlertMailInput {
  return alertMailInput({ ...a, state: "active_unacked" }, subject);
}

/** Sends one planned message; returns the alerts it told (none if all were acknowledged or told meanwhile). */
export async function sendPlannedMessage(db: Db, plan: PlannedGroupMessage, byId: ReadonlyMap<number, NotifyCandidate>, recipients: RosterShift[], nowMs: number, opts: SendOptions): Promise<NotifyCandidate[]> {
  const planned = plan.items.map((i) => byId.get(i.alertId)).filter((a): a is NotifyCandidate => a !== undefined);
  if (planned.length === 0) return [];
  const base = opts.appUrl.replace(/\/$/, "");
  // the chart of the hour up to now of the group's first alert, drawn by the mailer when it sends
  const spec = (await getAlertChartSpec(db, planned[0].id, nowMs))?.spec ?? null;
  const chart = spec
    ? { cid: ALERT_CHART_CID, frozenLink: spec.lineId !== null ? frozenLineLink(opts.appUrl, spec.lineId, spec) : `${base}/alerts/${planned[0].id}`, alt: `Chart of ${spec.title.toLowerCase()}, the last hour, with the limit and the moment it was raised` }
    : undefined;
  return db.transaction(async (tx) => {
    const told: NotifyCandidate[] = [];
    for (const a of planned) {
      const [res] = await tx
        .update(alerts)
        .set({ notifiedLevel: plan.order, notifyGroup: plan.key.slice(0, 80) })
        .where(and(eq(alerts.id, a.id), eq(alerts.notifiedLevel, a.notifiedLevel), eq(alerts.state, "active_unacked")));
      if (res.affectedRows === 1) told.push(a); // else acknowledged meanwhile, or another runner did it
    }
    if (told.length === 0) return [];
    const names: string[] = [];
    const first = told[0];
    const severity = told.reduce<Severity>((s, a) => (SEVERITY_RANK[a.severity] > SEVERITY_RANK[s] ? a.severity : s), first.severity);
    let title: string;
    let phone: { title: string; body: string; url: string; alertId: number; prefix: string };
    if (told.length === 1) {
      // a lone alert: its own e-mail; told again after it got worse, under a new key
      const a = first;
      const worseTs = toldAgainTs(a);
      const worse = worseTs !== null ? `:w${worseTs}` : "";
      const subject = opts.subjects.get(a.subjectKey);
      for (const r of recipients) {
        const mail = composeAlertEmail(mailInput(a, subject), {
          level: plan.order,
          recipientName: r.personName,
          appUrl: opts.appUrl,
          timeZone: opts.timeZone,
          nowMs,
          unackedForMs: nowMs - (worseTs ?? a.startTs),
          chart,
          worsenedTs: worseTs,
        });
        await enqueueMail(tx, { dedupeKey: `alert:${a.id}${worse}:order:${plan.order}:person:${r.personId}`, toAddress: r.personEmail, subject: mail.subject, bodyText: mail.text, bodyHtml: mail.html, chart: spec }, nowMs);
        names.push(`${r.personName} <${r.personEmail}>`);
      }
      const where = subject?.where ?? ([a.areaName, a.lineName, a.pointName].filter(Boolean).join(" › ") || "the plant");
      title = `${worseTs !== null ? "Worse: " : ""}${plan.order > 1 ? "Escalated: " : ""}${RULE_KIND_WORDS[a.kind]} — ${where}`;
      const body = worseTs !== null ? `Now ${SEVERITY_WORDS[a.severity].toLowerCase()}, peak ${formatAlertValue(a.kind, a.peakValue)}. ${a.message}` : a.message;
      phone = { title, body, url: `${base}/alerts/${a.id}`, alertId: a.id, prefix: `alert:${a.id}${worse}:order:${plan.order}` };
    } else {
      const items: GroupMailItem[] = told.map((a) => ({ ...mailInput(a, opts.subjects.get(a.subjectKey)), worsenedTs: toldAgainTs(a) }));
      title = groupTitle(first.areaName, plan.group.items.filter((i) => told.some((a) => a.id === i.alertId)));
      const g = { title, severity, items };
      for (const r of recipients) {
        const mail = composeGroupEmail(g, { level: plan.order, recipientName: r.personName, appUrl: opts.appUrl, timeZone: opts.timeZone, nowMs, chart });
        await enqueueMail(tx, { dedupeKey: `group:${plan.key}:order:${plan.order}:person:${r.personId}`, toAddress: r.personEmail, subject: mail.subject, bodyText: mail.text, bodyHtml: mail.html, chart: spec }, nowMs);
        names.push(`${r.personName} <${r.personEmail}>`);
      }
      const words = composeGroupPhoneText(g, { level: plan.order });
      phone = { ...words, url: `${base}/alerts/${first.id}`, alertId: first.id, prefix: `group:${plan.key}:order:${plan.order}` };
    }
    // texts and pushes to the same people, as each opted in for the message's severity (ingest/notifier.ts sends them)
    const phones = await queueAlertPhoneMessages(
      tx,
      { alertId: phone.alertId, order: plan.order, severity, personIds: recipients.map((r) => r.personId), title: phone.title, body: phone.body, url: phone.url, dedupePrefix: phone.prefix },
      nowMs,
    );
    if (phones.sms + phones.push > 0) names.push(`${phones.sms} text(s), ${phones.push} push(es)`);
    const sentTo = names.length ? `Order ${plan.order}: ${names.join(", ")}` : `Nobody on call at order ${plan.order}`;
    const together = told.length > 1 ? `; sent together with ${told.length - 1} other alert${told.length === 2 ? "" : "s"} as "${title}"` : "";
    for (const a of told) {
      await tx.insert(alertEvents).values({
        alertId: a.id,
        ts: nowMs,
        kind: a.notifiedLevel === 0 ? "notified" : "escalated",
        personId: null,
        comment: `${toldAgainTs(a) !== null && a.notifiedLevel === 0 ? "Told again, worse. " : ""}${sentTo}${together}`.slice(0, 2000),
        value: String(plan.order),
      });
    }
    return told;
  });
}
