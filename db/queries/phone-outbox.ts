// The phone outbox (texts and push): queued with the escalation step that causes them, claimed
// and sent by the notifier (ingest/notifier.ts). Same rules as the mail outbox
// (db/queries/outbox.ts): a unique dedupe key so nothing is queued twice, a conditional UPDATE to
// claim a row with a lease, a doubling backoff after a failure; a text that gives up queues the
// same words as an e-mail (the fallback), in the same transaction that marks it failed.
import { and, eq, inArray, lte, or, sql } from "drizzle-orm";
import type { Db } from "../client";
import { people, phoneOutbox, pushSubscriptions } from "../schema";
import { enqueueMail } from "./outbox";
import { SEVERITIES, type Severity } from "../../lib/vocabulary";

type Inserter = Pick<Db, "insert" | "select">;

export type NewPhoneMessage = {
  dedupeKey: string;
  channel: "sms" | "push";
  personId: number;
  alertId: number | null;
  toAddress: string;
  title: string;
  body: string;
  url: string | null;
  fallbackEmail: string | null;
};

export async function enqueuePhoneMessage(tx: Pick<Db, "insert">, m: NewPhoneMessage, nowMs: number): Promise<boolean> {
  const [res] = await tx
    .insert(phoneOutbox)
    .ignore()
    .values({ ...m, dedupeKey: m.dedupeKey.slice(0, 160), title: m.title.slice(0, 160), body: m.body.slice(0, 640), state: "pending", attempts: 0, nextAttemptTs: nowMs, createdTs: nowMs });
  return res.affectedRows === 1;
}

/** "high,medium" → ["high", "medium"]; unknown words are dropped. */
export function parseSeverityList(text: string): Severity[] {
  const set = new Set(text.split(",").map((s) => s.trim()));
  return SEVERITIES.filter((s) => set.has(s));
}

/**
 * Queues a text (if the person gave a number and opted in for this severity) and a push to each
 * of their subscriptions (if opted in) for one person and one escalation step of an alert.
 */
export async function queueAlertPhoneMessages(
  tx: Inserter,
  // dedupePrefix: the step's key when it is not the alert's first telling (a storm group, or told again after it got worse)
  input: { alertId: number; order: number; severity: Severity; personIds: number[]; title: string; body: string; url: string; dedupePrefix?: string },
  nowMs: number,
): Promise<{ sms: number; push: number }> {
  if (input.personIds.length === 0) return { sms: 0, push: 0 };
  const who = await tx
    .select({ id: people.id, email: people.email, phone: people.phoneE164, sms: people.smsSeverities, push: people.pushSeverities })
    .from(people)
    .where(and(inArray(people.id, input.personIds), eq(people.active, true)));
  const subs = await tx.select({ id: pushSubscriptions.id, personId: pushSubscriptions.personId }).from(pushSubscriptions).where(inArray(pushSubscriptions.personId, input.personIds));
  let sms = 0;
  let push = 0;
  const prefix = input.dedupePrefix ?? `alert:${input.alertId}:order:${input.order}`;
  for (const p of who) {
    const base = { personId: p.id, alertId: input.alertId, title: input.title, body: input.body, url: input.url };
    if (p.phone && parseSeverityList(p.sms).includes(input.severity)) {
      const text = `${input.title}: ${input.body} ${input.url}`;
      if (await enqueuePhoneMessage(tx, { ...base, body: text, dedupeKey: `${prefix}:sms:${p.id}`, channel: "sms", toAddress: p.phone, fallbackEmail: p.email }, nowMs)) sms++;
    }
    if (parseSeverityList(p.push).includes(input.severity)) {
      for (const s of subs.filter((x) => x.personId === p.id)) {
        if (await enqueuePhoneMessage(tx, { ...base, dedupeKey: `${prefix}:push:${s.id}`, channel: "push", toAddress: String(s.id), fallbackEmail: null }, nowMs)) push++;
      }
    }
  }
  return { sms, push };
}

export type ClaimedPhoneMessage = typeof phoneOutbox.$inferSelect;

export async function claimDuePhoneMessages(db: Db, nowMs: number, leaseMs: number, max = 20): Promise<ClaimedPhoneMessage[]> {
  const due = await db
    .select({ id: phoneOutbox.id })
    .from(phoneOutbox)
    .where(and(inArray(phoneOutbox.state, ["pending", "sending"]), lte(phoneOutbox.nextAttemptTs, nowMs)))
    .orderBy(phoneOutbox.nextAttemptTs, phoneOutbox.id)
    .limit(max);
  const out: ClaimedPhoneMessage[] = [];
  for (const { id } of due) {
    const [res] = await db
      .update(phoneOutbox)
      .set({ state: "sending", attempts: sql`${phoneOutbox.attempts} + 1`, nextAttemptTs: nowMs + leaseMs })
      .where(and(eq(phoneOutbox.id, id), or(eq(phoneOutbox.state, "pending"), eq(phoneOutbox.state, "sending")), lte(phoneOutbox.nextAttemptTs, nowMs)));
    if (res.affectedRows !== 1) continue;
    const [row] = await db.select().from(phoneOutbox).where(eq(phoneOutbox.id, id));
    if (row) out.push(row);
  }
  return out;
}

export async function markPhoneSent(db: Db, id: number, providerId: string, deliveryStatus: string, nowMs: number): Promise<void> {
  await db
    .update(phoneOutbox)
    .set({ state: "sent", sentTs: nowMs, providerId: providerId.slice(0, 120), deliveryStatus: deliveryStatus.slice(0, 40), lastError: null })
    .where(and(eq(phoneOutbox.id, id), eq(phoneOutbox.state, "sending")));
}

export async function setDeliveryStatus(db: Db, id: number, deliveryStatus: string): Promise<void> {
  await db.update(phoneOutbox).set({ deliveryStatus: deliveryStatus.slice(0, 40) }).where(eq(phoneOutbox.id, id));
}

/**
 * A failed attempt: back to pending after `retryAtTs`, or (null) failed for good — then a text
 * with a fallback address queues the same words as an e-mail, in the same transaction.
 */
export async function markPhoneFailed(db: Db, m: ClaimedPhoneMessage, error: string, retryAtTs: number | null, nowMs: number, deliveryStatus?: string): Promise<{ fallbackQueued: boolean }> {
  return db.transaction(async (tx) => {
    if (retryAtTs !== null) {
      await tx.update(phoneOutbox).set({ state: "pending", nextAttemptTs: retryAtTs, lastError: error.slice(0, 500) }).where(and(eq(phoneOutbox.id, m.id), eq(phoneOutbox.state, "sending")));
      return { fallbackQueued: false };
    }
    const fallbackKey = m.channel === "sms" && m.fallbackEmail ? `sms-fallback:${m.id}` : null;
    const [res] = await tx
      .update(phoneOutbox)
      .set({ state: "failed", lastError: error.slice(0, 500), deliveryStatus: (deliveryStatus ?? "failed").slice(0, 40), fallbackMailKey: fallbackKey })
      .where(and(eq(phoneOutbox.id, m.id), eq(phoneOutbox.state, "sending")));
    if (res.affectedRows !== 1 || !fallbackKey || !m.fallbackEmail) return { fallbackQueued: false };
    const text = [`A text message to ${m.toAddress} could not be sent (${error.slice(0, 200)}), so here it is by e-mail:`, "", m.body, "", m.url ?? ""].join("\n");
    const q = await enqueueMail(tx, { dedupeKey: fallbackKey, toAddress: m.fallbackEmail, subject: `[Text not delivered] ${m.title}`, bodyText: text }, nowMs);
    return { fallbackQueued: q.queued };
  });
}

export type PushTarget = { id: number; endpoint: string; p256dh: string; auth: string };

export async function getPushSubscription(db: Db, id: number): Promise<PushTarget | null> {
  const [row] = await db.select({ id: pushSubscriptions.id, endpoint: pushSubscriptions.endpoint, p256dh: pushSubscriptions.p256dh, auth: pushSubscriptions.auth }).from(pushSubscriptions).where(eq(pushSubscriptions.id, id));
  return row ?? null;
}

export async function deletePushSubscription(db: Db, id: number): Promise<void> {
  await db.delete(pushSubscriptions).where(eq(pushSubscriptions.id, id));
}

export async function markPushOk(db: Db, id: number, nowMs: number): Promise<void> {
  await db.update(pushSubscriptions).set({ lastOkTs: nowMs }).where(eq(pushSubscriptions.id, id));
}
