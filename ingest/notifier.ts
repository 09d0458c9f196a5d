// The notifier, its own process: sends what the phone outbox holds — texts through the SMS
// provider's SDK, pushes through web-push (ingest/phone-senders.ts) — and records the outcome.
//
// Each round claims due rows (db/queries/phone-outbox.ts: a conditional UPDATE with a lease, so
// two notifiers never send the same row and a crash mid-send is retried after the lease). A sent
// text records the provider's message id and status, and its delivery status is asked again on
// a later round until the provider calls it final. A failure is retried with a doubling backoff
// (NOTIFIER_BACKOFF_BASE_MS … _MAX_MS); after NOTIFIER_MAX_ATTEMPTS, or at once on a permanent
// refusal, the text is marked failed and its words go out by e-mail instead. A push endpoint
// that answers 404 or 410 is gone: its subscription is deleted.
import fs from "node:fs";
import path from "node:path";
import { and, eq, inArray, isNotNull } from "drizzle-orm";
import { closeDb, getDb, type Db } from "../db/client";
import { phoneOutbox } from "../db/schema";
import { claimDuePhoneMessages, deletePushSubscription, getPushSubscription, markPhoneFailed, markPhoneSent, markPushOk, setDeliveryStatus, type ClaimedPhoneMessage } from "../db/queries/phone-outbox";
import { retryBackoffMs } from "../db/queries/outbox";
import { ensureVapidKeys } from "../db/vapid-keys";
import { getSettings, tlsFiles } from "../lib/settings";
import { createPushSender, createSmsSender, SendError } from "./phone-senders";
import { createLogger, describeError } from "./log";

const log = createLogger("notifier");
const FINAL_SMS_STATES = new Set(["delivered", "undelivered", "failed", "read"]);

export type NotifierOptions = {
  db?: Db;
  pollMs?: number;
  leaseMs?: number;
  backoffBaseMs?: number;
  backoffMaxMs?: number;
  maxAttempts?: number;
  smsApiBase?: string;
  pushCaFile?: string;
};

export async function startNotifier(opts: NotifierOptions = {}) {
  const s = getSettings();
  const db = opts.db ?? getDb();
  const cfg = {
    pollMs: opts.pollMs ?? s.NOTIFIER_POLL_MS,
    leaseMs: opts.leaseMs ?? 60_000,
    backoffBaseMs: opts.backoffBaseMs ?? s.NOTIFIER_BACKOFF_BASE_MS,
    backoffMaxMs: opts.backoffMaxMs ?? s.NOTIFIER_BACKOFF_MAX_MS,
    maxAttempts: opts.maxAttempts ?? s.NOTIFIER_MAX_ATTEMPTS,
  };
  const sms = createSmsSender({ accountSid: s.SMS_ACCOUNT_SID, authToken: s.SMS_AUTH_TOKEN, from: s.SMS_FROM, apiBase: opts.smsApiBase ?? s.SMS_API_BASE });
  const caFile = opts.pushCaFile ?? path.join(s.DATA_DIR, "push-fake", "ca.crt");
  const push = createPushSender({ keys: ensureVapidKeys(s.DATA_DIR), subject: s.VAPID_SUBJECT, ca: fs.existsSync(caFile) ? fs.readFileSync(caFile, "utf8") : fs.existsSync(tlsFiles(s).ca) ? fs.readFileSync(tlsFiles(s).ca, "utf8") : undefined });
  let stopping = false;
  let busy: Promise<void> | null = null;

  async function fail(m: ClaimedPhoneMessage, err: unknown, now: number, deliveryStatus?: string) {
    const permanent = err instanceof SendError && err.permanent;
    const giveUp = permanent || m.attempts >= cfg.maxAttempts;
    const r = await markPhoneFailed(db, m, describeError(err), giveUp ? null : now + retryBackoffMs(m.attempts, cfg.backoffBaseMs, cfg.backoffMaxMs), now, deliveryStatus);
    if (giveUp) log.warn(`${m.channel} ${m.id} to ${m.toAddress} given up after ${m.attempts} attempt(s)${r.fallbackQueued ? "; sent by e-mail instead" : ""}`, { error: describeError(err) });
    else log.info(`${m.channel} ${m.id} not sent (attempt ${m.attempts}); will retry`, { error: describeError(err) });
  }

  async function sendOne(m: ClaimedPhoneMessage) {
    const now = Date.now();
    if (m.channel === "sms") {
      try {
        const r = await sms.send(m.toAddress, m.body);
        await markPhoneSent(db, m.id, r.sid, r.status, Date.now());
        log.info(`texted ${m.toAddress} (${r.sid}, ${r.status})`);
      } catch (err) {
        await fail(m, err, now);
      }
      return;
    }
    const sub = await getPushSubscription(db, Number(m.toAddress));
    if (!sub) return fail(m, new SendError("the subscription was removed", true, 410), now, "gone");
    try {
      const r = await push.send(sub, { title: m.title, body: m.body, url: m.url, tag: m.dedupeKey.split(":order:")[0] });
      await markPhoneSent(db, m.id, `push ${r.statusCode}`, "accepted", Date.now());
      await markPushOk(db, sub.id, Date.now());
      log.info(`pushed to subscription ${sub.id}`);
    } catch (err) {
      if (err instanceof SendError && (err.status === 404 || err.status === 410)) {
        await deletePushSubscription(db, sub.id);
        log.info(`push subscription ${sub.id} is gone (${err.status}); removed`);
        return fail(m, err, now, "gone");
      }
      await fail(m, err, now);
    }
  }

  /** Asks the provider again about texts sent without a final status (the last few hundred). */
  async function refreshStatuses() {
    const rows = await db
      .select({ id: phoneOutbox.id, sid: phoneOutbox.providerId, status: phoneOutbox.deliveryStatus })
      .from(phoneOutbox)
      .where(and(eq(phoneOutbox.channel, "sms"), eq(phoneOutbox.state, "sent"), isNotNull(phoneOutbox.providerId), inArray(phoneOutbox.deliveryStatus, ["queued", "accepted", "sending", "sent"])))
      .limit(50);
    for (const r of rows) {
      if (!r.sid) continue;
      try {
        const status = await sms.status(r.sid);
        if (status !== r.status) await setDeliveryStatus(db, r.id, status);
        if (FINAL_SMS_STATES.has(status)) log.info(`text ${r.sid}: ${status}`);
      } catch (err) {
        log.warn(`could not ask about text ${r.sid}`, { error: describeError(err) });
      }
    }
  }

  async function round() {
    const claimed = await claimDuePhoneMessages(db, Date.now(), cfg.leaseMs, 20);
    for (const m of claimed) {
      if (stopping) break;
      try {
        await sendOne(m);
      } catch (err) {
        log.error(`message ${m.id}: could not record the outcome`, { error: describeError(err) });
      }
    }
    if (!stopping) await refreshStatuses();
  }

  const timer = setInterval(() => {
    if (busy || stopping) return;
    busy = round()
      .catch((err: unknown) => log.warn("round failed; will retry", { error: describeError(err) }))
      .finally(() => {
        busy = null;
      });
  }, cfg.pollMs);
  log.info(`sending texts${opts.smsApiBase ?? s.SMS_API_BASE ? ` through ${opts.smsApiBase ?? s.SMS_API_BASE}` : ""} and pushes`, cfg);
  return {
    async stop() {
      stopping = true;
      clearInterval(timer);
      if (busy) await busy;
    },
  };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  startNotifier()
    .then((n) => {
      const stop = () =>
        void n
          .stop()
          .then(() => closeDb())
          .then(() => process.exit(0));
      process.on("SIGTERM", stop);
      process.on("SIGINT", stop);
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
