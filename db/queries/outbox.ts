// The mail outbox. A mail is queued in the same transaction as the change that causes it
// (dedupe_key is unique: the same event can never queue two mails), then the mailer claims it,
// sends it and marks it sent in one statement.
//
// Claiming: a row is taken by a conditional UPDATE (state pending, or a "sending" row whose
// lease ran out, and next_attempt_ts due); only the mailer whose UPDATE changed the row sends it.
// While sending, next_attempt_ts holds the lease's end, so a mailer that crashed mid-send leaves
// a row that another (or the restarted) mailer takes again once the lease is over. The resend
// carries the same Message-ID (derived from the outbox id), so a receiver that already has it
// can tell it is the same mail.
import { and, desc, eq, inArray, lte, or, sql } from "drizzle-orm";
import type { Db } from "../client";
import { outbox } from "../schema";
import type { DbWriter } from "./alert-rows";

export type NewMail = { dedupeKey: string; toAddress: string; subject: string; bodyText: string; bodyHtml?: string | null; chart?: unknown };

/**
 * The one outbox insert. Queues a mail unless one with the same dedupe key exists (queued or
 * already sent): then nothing changes and `queued` is false, so a double click or a second
 * scheduler round is harmless. Takes a Db or a transaction, so a mail can be queued in the
 * same transaction as the change that causes it.
 */
export async function enqueueMail(tx: Pick<Db, "insert">, mail: NewMail, nowMs: number): Promise<{ queued: boolean; id: number | null }> {
  const [res] = await tx
    .insert(outbox)
    .ignore()
    .values({
      dedupeKey: mail.dedupeKey.slice(0, 160),
      toAddress: mail.toAddress,
      subject: mail.subject.slice(0, 300),
      bodyText: mail.bodyText,
      bodyHtml: mail.bodyHtml ?? null,
      chart: mail.chart ?? null,
      state: "pending",
      attempts: 0,
      nextAttemptTs: nowMs,
      createdTs: nowMs,
    });
  return res.affectedRows === 1 ? { queued: true, id: Number(res.insertId) } : { queued: false, id: null };
}

export type ClaimedMail = { id: number; dedupeKey: string; toAddress: string; subject: string; bodyText: string; bodyHtml: string | null; attempts: number; createdTs: number; chart: unknown };

/** Claims up to `max` due mails for this mailer (see the header). */
export async function claimDueMails(db: Db, nowMs: number, leaseMs: number, max = 20): Promise<ClaimedMail[]> {
  const due = await db
    .select({ id: outbox.id })
    .from(outbox)
    .where(and(inArray(outbox.state, ["pending", "sending"]), lte(outbox.nextAttemptTs, nowMs)))
    .orderBy(outbox.nextAttemptTs, outbox.id)
    .limit(max);
  const claimed: ClaimedMail[] = [];
  for (const { id } of due) {
    const [res] = await db
      .update(outbox)
      .set({ state: "sending", attempts: sql`${outbox.attempts} + 1`, nextAttemptTs: nowMs + leaseMs })
      .where(and(eq(outbox.id, id), or(eq(outbox.state, "pending"), eq(outbox.state, "sending")), lte(outbox.nextAttemptTs, nowMs)));
    if (res.affectedRows !== 1) continue; // another mailer took it
    const [row] = await db
      .select({ id: outbox.id, dedupeKey: outbox.dedupeKey, toAddress: outbox.toAddress, subject: outbox.subject, bodyText: outbox.bodyText, bodyHtml: outbox.bodyHtml, attempts: outbox.attempts, createdTs: outbox.createdTs, chart: outbox.chart })
      .from(outbox)
      .where(eq(outbox.id, id));
    if (row) claimed.push(row);
  }
  return claimed;
}

/** Sent: one statement, only if this claim still holds the row. */
export async function markMailSent(db: DbWriter, id: number, messageId: string, nowMs: number): Promise<boolean> {
  const [res] = await db
    .update(outbox)
    .set({ state: "sent", sentTs: nowMs, messageId: messageId.slice(0, 200), lastError: null })
    .where(and(eq(outbox.id, id), eq(outbox.state, "sending")));
  return res.affectedRows === 1;
}

/** A failed attempt: back to pending, due again after the backoff; or failed for good. */
export async function markMailFailed(db: DbWriter, id: number, error: string, retryAtTs: number | null): Promise<void> {
  await db
    .update(outbox)
    .set(retryAtTs === null ? { state: "failed", lastError: error.slice(0, 500) } : { state: "pending", nextAttemptTs: retryAtTs, lastError: error.slice(0, 500) })
    .where(and(eq(outbox.id, id), eq(outbox.state, "sending")));
}

/**
 * Pure: the wait before attempt `attempts + 1` — doubling from baseMs, capped at maxMs, with up
 * to 20 % jitter (pass jitter 0 for tests) so many mailers do not retry in step.
 */
export function retryBackoffMs(attempts: number, baseMs: number, maxMs: number, jitter = Math.random()): number {
  const n = Math.max(1, attempts);
  const raw = Math.min(maxMs, baseMs * 2 ** Math.min(30, n - 1));
  return Math.round(raw * (1 + 0.2 * Math.min(1, Math.max(0, jitter))));
}

export type OutboxRow = { id: number; dedupeKey: string; toAddress: string; subject: string; state: "pending" | "sending" | "sent" | "failed"; attempts: number; createdTs: number; sentTs: number | null; lastError: string | null };

export async function listRecentMails(db: Db, limit = 30): Promise<OutboxRow[]> {
  return db
    .select({ id: outbox.id, dedupeKey: outbox.dedupeKey, toAddress: outbox.toAddress, subject: outbox.subject, state: outbox.state, attempts: outbox.attempts, createdTs: outbox.createdTs, sentTs: outbox.sentTs, lastError: outbox.lastError })
    .from(outbox)
    .orderBy(desc(outbox.id))
    .limit(Math.min(limit, 500));
}

export async function countMailsByState(db: Db): Promise<Record<OutboxRow["state"], number>> {
  const rows = await db.select({ state: outbox.state, n: sql<number>`COUNT(*)` }).from(outbox).groupBy(outbox.state);
  const out = { pending: 0, sending: 0, sent: 0, failed: 0 };
  for (const r of rows) out[r.state] = Number(r.n);
  return out;
}
