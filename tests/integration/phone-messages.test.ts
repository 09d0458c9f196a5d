// Texts and push end to end, from a simulated excursion: a field meter (through the real broker
// and worker) reports charge over a point's 20 kV limit, the alerts runner raises the alert and,
// unacknowledged, tells the on-call people; the notifier (its own process) texts them through
// the SMS provider's SDK pointed at the local fake, and pushes through web-push to a local push
// service over TLS that decrypts the payload with the subscription's keys. Each is sent once.
// Then the fake SMS service is told to fail: the text is retried with backoff, given up, and its
// words go out by e-mail; a push endpoint that answers 410 is removed.
import fs from "node:fs";
import path from "node:path";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, like } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { connectDevice, endClient, freePort, publishAsync, ROOT, spawnTs, startIngestStack, waitFor, type IngestStack, type Proc } from "./ingest-support/processes";
import { startPushFake } from "./phone-support/push-fake";
import { alerts, devices, outbox, people, phoneOutbox, pushSubscriptions } from "@/db/schema";
import { addShift, saveAlertingSettings } from "@/db/queries/oncall";
import { saveRuleVersion } from "@/db/queries/rule-versions";
import { readDeviceSecrets } from "@/db/seed";
import { startSmsFake } from "@/ingest/sms-fake";
import { deviceTopics } from "@/lib/contract/topics";
import { DEMO_PEOPLE, fieldMeterCode } from "@/lib/demo-plant";
import { createHash } from "node:crypto";
import { simpleParser } from "mailparser";
import { mailDir, readSinkIndex } from "@/ingest/smtp-sink";
import { parseRangeParams } from "@/components/charts/ranges";

const NAME = "phone_msgs";
const dataDir = path.join(ROOT, ".data", "test-ingest", `${NAME}-phone`);
const SID = "AC0123456789abcdef0123456789abcdef";
const TOKEN = "test-sms-token-123";
const METER_A = fieldMeterCode("gravure-1", "unwind");
const METER_B = fieldMeterCode("flexo-2", "unwind");

let tdb: TestDatabase;
let stack: IngestStack;
let sms: Awaited<ReturnType<typeof startSmsFake>>;
let push: Awaited<ReturnType<typeof startPushFake>>;
let notifier: Proc;
let sink: Proc;
let mailer: Proc;
const mailDataDir = path.join(dataDir, "mail-sink");
const clients: MqttClient[] = [];
let engineerId = 0;
let leadId = 0;
let pushSubId = "";

async function personId(role: string) {
  return (await tdb.db.select({ id: people.id }).from(people).where(eq(people.email, DEMO_PEOPLE.find((p) => p.role === role)!.email)))[0].id;
}

async function overLimit(code: string) {
  const secrets = readDeviceSecrets(tdb.name);
  const c = await connectDevice(stack, code, secrets[code]);
  clients.push(c);
  const [d] = await tdb.db.select({ pointId: devices.pointId }).from(devices).where(eq(devices.code, code));
  await saveRuleVersion(
    tdb.db,
    { kind: "charge_high", scope: { pointId: d.pointId, lineId: null, areaId: null }, severity: "high", onDelayS: 1, offDelayS: 30, onlyWhileRunning: false, params: { limitKv: 20, clearKv: 17 } },
    { personId: engineerId, where: code },
  );
  // the rule is picked up within ALERTS_RULES_POLL_MS; then 8 s of readings at −24.5 kV
  await new Promise((r) => setTimeout(r, 1500));
  for (let i = 0; i < 8; i++) {
    await publishAsync(c, deviceTopics.readings(code), JSON.stringify({ batch: [{ ts: Date.now(), values: { charge_kv: -24.5 } }] }));
    await new Promise((r) => setTimeout(r, 1000));
  }
  return d.pointId!;
}

beforeAll(async () => {
  tdb = await createTestDatabase(NAME, { seed: true });
  fs.rmSync(dataDir, { recursive: true, force: true });
  engineerId = await personId("engineer");
  leadId = await personId("shift_lead");
  await tdb.db.update(people).set({ phoneE164: "+447700900123", smsSeverities: "high", pushSeverities: "high" }).where(eq(people.id, engineerId));
  await tdb.db.update(people).set({ phoneE164: "+447700900124", smsSeverities: "high,medium", pushSeverities: "" }).where(eq(people.id, leadId));
  const now = Date.now();
  for (const id of [engineerId, leadId]) await addShift(tdb.db, { personId: id, startTs: now - 3_600_000, endTs: now + 3 * 3_600_000, escalationOrder: 1 }, engineerId);
  await saveAlertingSettings(tdb.db, { notifyMinSeverity: "high", notifyAfterS: 2, escalateAfterS: 3600, digestHourLocal: 6 }, engineerId);

  push = await startPushFake(path.join(dataDir, "push-fake"));
  const sub = push.subscribe();
  pushSubId = sub.id;
  await tdb.db.insert(pushSubscriptions).values({ personId: engineerId, endpointHash: createHash("sha256").update(sub.endpoint).digest("hex"), endpoint: sub.endpoint, p256dh: sub.keys.p256dh, auth: sub.keys.auth, createdTs: now });

  const smtpPort = await freePort();
  sink = spawnTs("smtp-sink", "ingest/smtp-sink.ts", [], { SMTP_PORT: String(smtpPort), DATA_DIR: mailDataDir });
  await waitFor("the SMTP sink", async () => /listening/.test(sink.output()), 60_000);
  mailer = spawnTs("mailer", "ingest/mailer.ts", [], { ...tdb.env, SMTP_HOST: "127.0.0.1", SMTP_PORT: String(smtpPort), MAILER_POLL_MS: "300", DATA_DIR: mailDataDir });
  sms = await startSmsFake({ port: await freePort(), dir: path.join(dataDir, "sms"), accountSid: SID, authToken: TOKEN });
  stack = await startIngestStack(NAME, tdb.env, { env: { ALERTS_ESCALATE_EVERY_MS: "500", ALERTS_RULES_POLL_MS: "500", APP_URL: "http://127.0.0.1:3998" } });
  notifier = spawnTs("notifier", "ingest/notifier.ts", [], {
    ...tdb.env,
    DATA_DIR: dataDir,
    SMS_API_BASE: `http://127.0.0.1:${sms.port}`,
    SMS_ACCOUNT_SID: SID,
    SMS_AUTH_TOKEN: TOKEN,
    NOTIFIER_POLL_MS: "200",
    NOTIFIER_BACKOFF_BASE_MS: "200",
    NOTIFIER_BACKOFF_MAX_MS: "400",
    NOTIFIER_MAX_ATTEMPTS: "3",
  });
}, 240_000);

afterAll(async () => {
  for (const c of clients) await endClient(c).catch(() => undefined);
  await notifier?.stop("SIGTERM").catch(() => undefined);
  await mailer?.stop("SIGTERM").catch(() => undefined);
  await sink?.stop("SIGTERM").catch(() => undefined);
  await stack?.stop();
  await sms?.close();
  await push?.close();
  await tdb?.close();
});

describe("texts and push from an excursion", () => {
  it(
    "texts each opted-in on-call person once and pushes once, encrypted to the subscription; delivery is recorded",
    async () => {
      const pointId = await overLimit(METER_A);
      const alert = await waitFor("the alert", async () => (await tdb.db.select().from(alerts).where(and(eq(alerts.pointId, pointId), eq(alerts.kind, "charge_high"))))[0], 30_000);
      const sent = await waitFor(
        "two texts and a push sent",
        async () => {
          const rows = await tdb.db.select().from(phoneOutbox).where(eq(phoneOutbox.alertId, alert.id));
          return rows.length === 3 && rows.every((r) => r.state === "sent") ? rows : null;
        },
        40_000,
      );
      expect(sent.filter((r) => r.channel === "sms").map((r) => r.toAddress).sort()).toEqual(["+447700900123", "+447700900124"]);
      const files = fs.readdirSync(path.join(dataDir, "sms")).map((f) => JSON.parse(fs.readFileSync(path.join(dataDir, "sms", f), "utf8")) as { to: string; body: string; from: string });
      expect(files.map((f) => f.to).sort()).toEqual(["+447700900123", "+447700900124"]);
      expect(files[0].body).toContain("Charge over limit");
      expect(files[0].body).toContain(`/alerts/${alert.id}`);
      expect(push.received).toHaveLength(1);
      expect(push.received[0].payload).toMatchObject({ title: expect.stringContaining("Charge over limit"), url: `http://127.0.0.1:3998/alerts/${alert.id}` });
      expect(push.refused).toEqual([]);
      // the provider's status is asked again until it is final
      await waitFor("delivered", async () => (await tdb.db.select().from(phoneOutbox).where(and(eq(phoneOutbox.alertId, alert.id), eq(phoneOutbox.channel, "sms")))).every((r) => r.deliveryStatus === "delivered"), 15_000);
      // a few more escalation rounds queue nothing new: each was sent once
      await new Promise((r) => setTimeout(r, 2500));
      expect(await tdb.db.select().from(phoneOutbox).where(eq(phoneOutbox.alertId, alert.id))).toHaveLength(3);
      expect(fs.readdirSync(path.join(dataDir, "sms"))).toHaveLength(2);
      expect(push.received).toHaveLength(1);

      // the on-call e-mail of the same alert: the chart inline as a PNG under 60 kB, the value with
      // its unit, the plain-text part, and a link frozen to the chart's hour
      const key = `alert:${alert.id}:order:1:person:${engineerId}`;
      const entry = await waitFor("the on-call e-mail", async () => readSinkIndex(mailDataDir).find((e) => e.key === key && e.file), 30_000);
      // keepCidLinks: mailparser otherwise swaps the cid: reference for a data: URI
      const mail = await simpleParser(fs.readFileSync(path.join(mailDir(mailDataDir), entry.file!)), { keepCidLinks: true });
      const image = mail.attachments.find((x) => x.contentType === "image/png");
      expect(image).toBeDefined();
      expect(image!.cid).toBe("alert-chart@stillfield");
      expect(image!.size).toBeLessThan(60 * 1024);
      expect(image!.content.subarray(1, 4).toString("latin1")).toBe("PNG");
      expect(String(mail.html)).toContain("cid:alert-chart@stillfield");
      expect(mail.text).toContain("Peak:    \u221224.5 kV");
      const frozen = /(http:\/\/127\.0\.0\.1:3998\/lines\/(\d+)\?at=(\d+)&range=custom&from=(\d+)&to=(\d+))/.exec(mail.text ?? "");
      expect(frozen, mail.text).not.toBeNull();
      expect(Number(frozen![2])).toBe(alert.lineId);
      expect(Number(frozen![3])).toBe(alert.startTs);
      // the frozen link names the same hour the chart shows, and the line page reads it as that range
      const url = new URL(frozen![1]);
      const range = parseRangeParams((k) => url.searchParams.get(k));
      expect(range).toEqual({ kind: "custom", from: Number(frozen![4]), to: Number(frozen![5]) });
      expect(Number(frozen![5]) - Number(frozen![4])).toBe(3_600_000);
      expect(Number(frozen![4])).toBeLessThan(alert.startTs);
    },
    120_000,
  );

  it(
    "when the SMS service fails, the text is retried, given up and sent by e-mail; a gone push endpoint is removed",
    async () => {
      sms.setMode("fail");
      push.markGone(pushSubId);
      const pointId = await overLimit(METER_B);
      const alert = await waitFor("the second alert", async () => (await tdb.db.select().from(alerts).where(and(eq(alerts.pointId, pointId), eq(alerts.kind, "charge_high"))))[0], 30_000);
      const failed = await waitFor(
        "both texts given up",
        async () => {
          const rows = await tdb.db.select().from(phoneOutbox).where(and(eq(phoneOutbox.alertId, alert.id), eq(phoneOutbox.channel, "sms")));
          return rows.length === 2 && rows.every((r) => r.state === "failed") ? rows : null;
        },
        40_000,
      );
      expect(failed.every((r) => r.attempts === 3)).toBe(true);
      expect(failed.every((r) => /503|unavailable/i.test(r.lastError ?? ""))).toBe(true);
      const fallbacks = await tdb.db.select().from(outbox).where(like(outbox.dedupeKey, "sms-fallback:%"));
      const emails = await tdb.db.select({ id: people.id, email: people.email }).from(people);
      expect(fallbacks.map((m) => m.toAddress).sort()).toEqual(emails.filter((p) => p.id === engineerId || p.id === leadId).map((p) => p.email).sort());
      expect(fallbacks[0].subject).toMatch(/^\[Text not delivered\]/);
      expect(fallbacks[0].bodyText).toContain(`/alerts/${alert.id}`);
      const pushRow = await waitFor("the push answered 410", async () => (await tdb.db.select().from(phoneOutbox).where(and(eq(phoneOutbox.alertId, alert.id), eq(phoneOutbox.channel, "push"), eq(phoneOutbox.state, "failed"))))[0], 20_000);
      expect(pushRow.deliveryStatus).toBe("gone");
      expect(await tdb.db.select().from(pushSubscriptions)).toEqual([]);
      // nothing was written to the SMS folder while the service failed
      expect(fs.readdirSync(path.join(dataDir, "sms"))).toHaveLength(2);
    },
    120_000,
  );
});
