// The mailer, its own process: sends what the outbox holds through SMTP (nodemailer) to
// SMTP_HOST:SMTP_PORT, and queues the scheduled mails (daily alert digest, weekly due list).
//
// Delivery: each round claims due rows (db/queries/outbox.ts: a conditional UPDATE to
// "sending" with a lease), sends each with Message-ID <outbox-<id>.<db>@<mail domain>>, and marks
// it sent in one statement as soon as the server has accepted it. A failure puts the row back to
// pending with a doubling backoff (MAILER_BACKOFF_BASE_MS … MAILER_BACKOFF_MAX_MS); only a
// permanent refusal (5xx) repeated MAILER_MAX_PERMANENT times marks it failed. Connection errors
// never give up: with the SMTP server down, mail waits and goes out when it returns.
// A crash (even SIGKILL) loses nothing: a row left "sending" is taken again when its lease
// (MAILER_LEASE_MS) ends; the resend has the same Message-ID, so the receiving side can drop it
// if it had in fact arrived.
//
// Schedules (checked every minute; each mail has a dedupe key, so a restart or a second mailer
// queues nothing twice):
//   digest:<plant date>:<personId>   the previous plant day's alerts, at alerting.digestHourLocal
//   due-list:<ISO week>:<personId>   the weekly due list (db/queries/due-list.ts), Mondays from then on
import fs from "node:fs";
import path from "node:path";
import tls from "node:tls";
import nodemailer, { type Transporter } from "nodemailer";
import { and, eq, inArray } from "drizzle-orm";
import { closeDb, getDb, type Db } from "../db/client";
import { getEnv } from "../db/env";
import { outbox, people } from "../db/schema";
import { listAlertsForDigest } from "../db/queries/alert-list";
import { queueWeeklyDueListEmail } from "../db/use-cases/due-list-email";
import { getPlantSettings } from "../db/queries/equipment";
import { getAlertingSettings } from "../db/queries/oncall";
import { claimDueMails, enqueueMail, markMailFailed, markMailSent, retryBackoffMs } from "../db/queries/outbox";
import { loadPlantTopology } from "../db/queries/topology";
import { loadDryAirWarnings } from "../db/queries/forecast";
import { refreshStoredForecast } from "./forecast-store";
import { getSettings, tlsFiles } from "../lib/settings";
import { formatPlantTime, previousPlantDay } from "../lib/plant-time";
import { alertMailInput, composeDigestEmail } from "../lib/mail/alert-emails";
import { createLogger, describeError } from "./log";
import { renderMailCharts } from "./mail-chart";

const log = createLogger("mailer");

export type MailerConfig = {
  pollMs: number;
  leaseMs: number;
  backoffBaseMs: number;
  backoffMaxMs: number;
  maxPermanentFailures: number;
  scheduleEveryMs: number;
  batch: number;
};

export function getMailerConfig(): MailerConfig {
  const s = getSettings();
  return {
    pollMs: s.MAILER_POLL_MS,
    leaseMs: s.MAILER_LEASE_MS,
    backoffBaseMs: s.MAILER_BACKOFF_BASE_MS,
    backoffMaxMs: s.MAILER_BACKOFF_MAX_MS,
    maxPermanentFailures: s.MAILER_MAX_PERMANENT,
    scheduleEveryMs: s.MAILER_SCHEDULE_EVERY_MS,
    batch: s.MAILER_BATCH,
  };
}

function mailDomain(from: string): string {
  const m = /@([A-Za-z0-9.-]+)/.exec(from);
  return m ? m[1] : "stillfield.invalid";
}

/** The Message-ID of an outbox row: the same on every attempt. */
export function outboxMessageId(id: number, dbName: string, from: string): string {
  return `<outbox-${id}.${dbName}@${mailDomain(from)}>`;
}

function isPermanent(err: unknown): boolean {
  const code = err && typeof err === "object" && "responseCode" in err ? Number(err.responseCode) : NaN;
  return code >= 500 && code < 600;
}

// ---- schedules ----

/** Queues yesterday's digest for everyone who asked for it (from the digest hour on). */
export async function queueDailyDigests(db: Db, nowMs: number, appUrl: string): Promise<number> {
  const [plant, alerting] = await Promise.all([getPlantSettings(db), getAlertingSettings(db)]);
  const day = previousPlantDay(nowMs, plant.timeZone);
  if (day.hourNow < alerting.digestHourLocal) return 0;
  const recipients = await db.select({ id: people.id, name: people.name, email: people.email }).from(people).where(and(eq(people.wantsDailyDigest, true), eq(people.active, true)));
  if (recipients.length === 0) return 0;
  const keys = recipients.map((r) => `digest:${day.date}:${r.id}`);
  const existing = new Set((await db.select({ k: outbox.dedupeKey }).from(outbox).where(inArray(outbox.dedupeKey, keys))).map((r) => r.k));
  const missing = recipients.filter((r) => !existing.has(`digest:${day.date}:${r.id}`));
  if (missing.length === 0) return 0;
  const [alerts, topo] = await Promise.all([listAlertsForDigest(db, day.fromTs, day.toTs), loadPlantTopology(db)]);
  const dayLabel = formatPlantTime(day.fromTs, plant.timeZone, "EEE d MMM yyyy");
  const dryAir = await loadDryAirWarnings(db, nowMs);
  let queued = 0;
  for (const r of missing) {
    const mail = composeDigestEmail(
      alerts.map((a) => ({
        ...alertMailInput(a, topo.subjects.get(a.subjectKey)),
        endTs: a.endTs,
        shelved: a.shelvedUntilTs !== null && a.shelvedUntilTs > nowMs,
        chattering: a.chattering,
      })),
      { dayLabel, recipientName: r.name, appUrl, timeZone: plant.timeZone, dryAir },
    );
    if ((await enqueueMail(db, { dedupeKey: `digest:${day.date}:${r.id}`, toAddress: r.email, subject: mail.subject, bodyText: mail.text, bodyHtml: mail.html }, nowMs)).queued) queued++;
  }
  return queued;
}

// ---- the loop ----

export async function startMailer(opts: { db?: Db; config?: MailerConfig } = {}) {
  const env = getEnv();
  const cfg = opts.config ?? getMailerConfig();
  const db = opts.db ?? getDb();
  // STARTTLS whenever the server offers it (nodemailer's default once ignoreTLS is off), checked
  // against the system's CAs plus our own (DATA_DIR/tls/ca.crt: the local sink's certificate);
  // SMTP_REQUIRE_TLS=1 refuses a server that does not offer it
  const caFile = tlsFiles(env).ca;
  const transport: Transporter = nodemailer.createTransport({
    host: env.SMTP_HOST,
    port: env.SMTP_PORT,
    secure: false,
    requireTLS: env.SMTP_REQUIRE_TLS,
    tls: { ca: fs.existsSync(caFile) ? [...tls.rootCertificates, fs.readFileSync(caFile, "utf8")] : undefined, minVersion: "TLSv1.2" },
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 15_000,
  });
  let stopping = false;
  let busy: Promise<void> | null = null;
  let lastSchedule = 0;
  let lastWeekKey = "";
  let lastFailureLog = 0;
  let lastForecast = 0;

  async function sendOne(m: Awaited<ReturnType<typeof claimDueMails>>[number]): Promise<void> {
    const messageId = outboxMessageId(m.id, env.DB_NAME, env.MAIL_FROM);
    try {
      // the chart is drawn at send time from the readings; a chart that cannot be drawn never holds the mail back
      const charts = m.chart ? await renderMailCharts(db, m.chart, (await getPlantSettings(db)).timeZone, (err) => log.warn(`mail ${m.id}: chart not drawn`, { error: describeError(err) })).catch((err: unknown) => {
        log.warn(`mail ${m.id}: charts not drawn`, { error: describeError(err) });
        return [];
      }) : [];
      await transport.sendMail({
        from: env.MAIL_FROM,
        to: m.toAddress,
        subject: m.subject,
        text: m.bodyText,
        html: m.bodyHtml ?? undefined,
        messageId,
        headers: { "X-Stillfield-Key": m.dedupeKey },
        attachments: charts.length > 0 ? charts : undefined,
      });
    } catch (err) {
      const now = Date.now();
      const permanent = isPermanent(err);
      const giveUp = permanent && m.attempts >= cfg.maxPermanentFailures;
      await markMailFailed(db, m.id, describeError(err), giveUp ? null : now + retryBackoffMs(m.attempts, cfg.backoffBaseMs, cfg.backoffMaxMs));
      if (giveUp) log.error(`mail ${m.id} to ${m.toAddress} refused for good`, { error: describeError(err) });
      else if (now - lastFailureLog > 5000) {
        lastFailureLog = now;
        log.warn(`mail ${m.id} to ${m.toAddress} not sent (attempt ${m.attempts}); will retry`, { error: describeError(err) });
      }
      return;
    }
    await markMailSent(db, m.id, messageId, Date.now());
    log.info(`sent mail ${m.id} to ${m.toAddress}: ${m.subject}`);
  }

  async function schedules(now: number): Promise<void> {
    if (now - lastSchedule < cfg.scheduleEveryMs) return;
    lastSchedule = now;
    // the outdoor forecast for tomorrow's dry-air warning, about once an hour (a failure waits for the next hour)
    if (env.WEATHER_API_URL && now - lastForecast >= 3_600_000) {
      lastForecast = now;
      await refreshStoredForecast(db, env.WEATHER_API_URL, now).catch((err: unknown) => log.warn("could not fetch the outdoor forecast", { error: describeError(err) }));
    }
    const digests = await queueDailyDigests(db, now, env.APP_URL);
    if (digests) log.info(`queued ${digests} daily digest(s)`);
    const plant = await getPlantSettings(db);
    const day = previousPlantDay(now, plant.timeZone);
    const alerting = await getAlertingSettings(db);
    // Mondays (weekday 1) from the digest hour: the weekly due list (idempotent per ISO week)
    if (day.weekday === 1 && day.hourNow >= alerting.digestHourLocal) {
      const weekKey = `${day.date}`;
      if (weekKey !== lastWeekKey) {
        const r = await queueWeeklyDueListEmail(db, now);
        lastWeekKey = weekKey;
        if (r.queued) log.info(`queued the weekly due list (${r.weekKey}) for ${r.queued} people`);
      }
    }
  }

  async function round(): Promise<void> {
    const now = Date.now();
    try {
      await schedules(now);
    } catch (err) {
      log.warn("could not queue scheduled mail; will retry", { error: describeError(err) });
      lastSchedule = 0;
    }
    let claimed: Awaited<ReturnType<typeof claimDueMails>> = [];
    try {
      claimed = await claimDueMails(db, now, cfg.leaseMs, cfg.batch);
    } catch (err) {
      log.warn("could not read the outbox; will retry", { error: describeError(err) });
      return;
    }
    for (const m of claimed) {
      if (stopping) break; // the rest stay claimed until their lease ends, then are sent
      try {
        await sendOne(m);
      } catch (err) {
        log.error(`mail ${m.id}: could not record the outcome`, { error: describeError(err) });
      }
    }
  }

  const timer = setInterval(() => {
    if (busy || stopping) return;
    busy = round().finally(() => {
      busy = null;
    });
  }, cfg.pollMs);
  log.info(`sending the outbox through ${env.SMTP_HOST}:${env.SMTP_PORT}`, { pollMs: cfg.pollMs, leaseMs: cfg.leaseMs });

  return {
    async stop() {
      stopping = true;
      clearInterval(timer);
      if (busy) await busy;
      transport.close();
    },
  };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  startMailer()
    .then((m) => {
      let stopRequested = false;
      const stop = (sig: string) => {
        if (stopRequested) return;
        stopRequested = true;
        log.info(`${sig}: finishing the mail in hand, then stopping`);
        m.stop()
          .then(() => closeDb())
          .then(() => process.exit(0))
          .catch(() => process.exit(1));
      };
      process.on("SIGTERM", () => stop("SIGTERM"));
      process.on("SIGINT", () => stop("SIGINT"));
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
