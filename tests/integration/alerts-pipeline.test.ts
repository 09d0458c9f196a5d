// The whole alert path on the real broker, worker (with the alerts runner), mailer and SMTP
// sink, each its own process, against a real MariaDB:
// - the plant simulator's cold snap (played at 3000× through the broker) raises the humidity
//   forecast well before the humidity-low alert;
// - a neutralizer losing its effect (charge after it no longer much lower than before it)
//   raises an effect-loss alert;
// - the simulator's silenced sensor raises a silent alert;
// - the on-call person gets exactly one e-mail per alert in the SMTP sink, escalation reaches the
//   next people when nobody acknowledges, and an alert acknowledged in time e-mails nobody;
// - replaying the recorded data with the live rules gives the alerts the live worker raised;
// - a limit saved as a new version is used by the running worker within seconds.
//
// The effect-loss part publishes crafted readings (as the devices, through the broker): the
// simulator's fouling neutralizer sits at Gravure Press 1's unwind, the first point of the web
// path, so no meter measures the charge before it and its effect cannot be judged from charge.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { connectDevice, endClient, freePort, publishAsync, ROOT, spawnTs, startIngestStack, waitFor, type IngestStack, type Proc } from "./ingest-support/processes";
import { alertEvents, alerts, devices, lines, neutralizers, outbox, people } from "@/db/schema";
import { respondToAlert } from "@/db/queries/alert-actions";
import { saveAlertingSettings } from "@/db/queries/oncall";
import { listRuleRows } from "@/db/queries/rule-rows";
import { saveRuleVersion } from "@/db/queries/rule-versions";
import { replayRuleProposal } from "@/db/use-cases/replay-rule-proposal";
import { readDeviceSecrets } from "@/db/seed";
import { readSinkIndex } from "@/ingest/smtp-sink";
import { deviceTopics } from "@/lib/contract/topics";
import { DEMO_AREAS, DEMO_PEOPLE, fieldMeterCode, loggerCode, speedGatewayCode } from "@/lib/demo-plant";
import { PlantModel } from "@/simulators/plant-model";

const MIN = 60_000;
const H = 3_600_000;
const NAME = "alerts_pipe";

let tdb: TestDatabase;
let stack: IngestStack;
let sink: Proc;
let mailer: Proc;
let smtpPort = 0;
const mailDataDir = path.join(ROOT, ".data", "test-ingest", `${NAME}${process.env.STACK_SLOT ?? ""}-mail`);
const clients: MqttClient[] = [];
const deviceClients = new Map<string, MqttClient>();
const procs: Proc[] = [];
let engineerId = 0;
let leadId = 0;

const KNIFE_EXIT = fieldMeterCode("slitter-1", "knife-exit");
const PRESS_LOGGER = loggerCode("press-hall");
const FLEXO_BEFORE = fieldMeterCode("flexo-2", "unwind");
const FLEXO_AFTER = fieldMeterCode("flexo-2", "print-exit");
const FLEXO_GATEWAY = speedGatewayCode("flexo-2");

async function deviceRow(code: string) {
  const [d] = await tdb.db.select({ id: devices.id, pointId: devices.pointId, lineId: devices.lineId, areaId: devices.areaId }).from(devices).where(eq(devices.code, code));
  return d;
}

async function rule(kind: string, severity?: string) {
  const rows = await listRuleRows(tdb.db);
  const r = rows.find((x) => x.kind === kind && x.pointId === null && x.lineId === null && x.areaId === null && (!severity || x.severity === severity));
  if (!r) throw new Error(`no plant-wide ${kind} rule`);
  return r;
}

function uncheckedBody(r: Awaited<ReturnType<typeof rule>>) {
  return { ruleId: r.id, baseVersion: r.currentVersion, kind: r.kind, scope: { pointId: null, lineId: null, areaId: null }, severity: r.severity, onDelayS: r.onDelayS, offDelayS: r.offDelayS, onlyWhileRunning: r.onlyWhileRunning, params: Object.fromEntries(Object.entries(r.params && typeof r.params === "object" ? r.params : {})) };
}

async function alertsOf(kind: (typeof alerts.$inferSelect)["kind"], subjectKey?: string) {
  const rows = await tdb.db.select().from(alerts).where(subjectKey ? and(eq(alerts.kind, kind), eq(alerts.subjectKey, subjectKey)) : eq(alerts.kind, kind));
  return rows.sort((a, b) => a.startTs - b.startTs);
}

/** A hall's humidity alerts (one per condition: the forecast opens it, the low limit escalates it). */
async function humidityAlertsOf(subjectKey: string) {
  const rows = await tdb.db.select().from(alerts).where(eq(alerts.subjectKey, subjectKey));
  return rows.filter((a) => a.kind === "rh_forecast" || a.kind === "rh_low").sort((a, b) => a.startTs - b.startTs);
}

async function eventsOf(alertId: number, kind: (typeof alertEvents.$inferSelect)["kind"]) {
  return (await tdb.db.select().from(alertEvents).where(and(eq(alertEvents.alertId, alertId), eq(alertEvents.kind, kind)))).sort((a, b) => a.ts - b.ts);
}

// ---- the simulator's cold snap, worked out from the same model the simulator plays ----
// the scenario is placed so the played span ends in the past: the simulator then plays it all at
// 3000× and never has to wait for real time. The hall's climate follows the time of day, so the
// crossing moves with the anchor: shift the anchor until the crossing falls about 90 minutes ago.
const pressHall = DEMO_AREAS.find((a) => a.slug === "press-hall")!;
/** when the Press Hall's (noise-free) humidity first falls under the 30 % limit, per the model */
function firstUnder30(m: PlantModel, anchorMs: number): number {
  for (let t = anchorMs - 36 * H; t < anchorMs; t += MIN) if (m.climate.at(pressHall, t).rhPct < 30) return t;
  throw new Error("the model's cold snap never takes the Press Hall under 30 %");
}
const { anchorColdSnap, crossing30 } = (() => {
  const target = Date.now() - 90 * MIN;
  let anchorMs = Math.floor((Date.now() + 25 * H) / 1000) * 1000;
  for (let i = 0; ; i++) {
    const m = new PlantModel({ anchorMs, seed: 7 });
    const c = firstUnder30(m, anchorMs);
    if (Math.abs(c - target) < 30 * MIN || i === 6) return { anchorColdSnap: anchorMs, crossing30: c };
    anchorMs = Math.floor((anchorMs - (c - target)) / 1000) * 1000;
  }
})();

beforeAll(async () => {
  tdb = await createTestDatabase(NAME, { seed: true });
  const db = tdb.db;
  engineerId = (await db.select({ id: people.id }).from(people).where(eq(people.email, DEMO_PEOPLE.find((p) => p.role === "engineer")!.email)))[0].id;
  leadId = (await db.select({ id: people.id }).from(people).where(eq(people.email, DEMO_PEOPLE.find((p) => p.role === "shift_lead")!.email)))[0].id;

  // silence is judged only for the knife-exit meter here: the cold snap is played from the past
  // at 3000×, and a plant-wide silent rule would (rightly) find every other sensor silent
  const silent = await rule("sensor_silent");
  await saveRuleVersion(db, { ...uncheckedBody(silent), enabled: false }, { personId: engineerId });
  const knife = await deviceRow(KNIFE_EXIT);
  await saveRuleVersion(db, { kind: "sensor_silent", scope: { pointId: knife.pointId, lineId: null, areaId: null }, severity: "medium", onDelayS: 0, offDelayS: 10, onlyWhileRunning: false, params: { silentS: 45 } }, { personId: engineerId, where: "Knife exit" });
  // e-mail medium and up after 20 s unacknowledged, escalate every 8 s (shortened for the test)
  await saveAlertingSettings(db, { notifyMinSeverity: "medium", notifyAfterS: 20, escalateAfterS: 8, digestHourLocal: 6 }, engineerId);

  smtpPort = await freePort();
  fs.rmSync(mailDataDir, { recursive: true, force: true }); // the sink's index of an earlier run
  sink = spawnTs("smtp-sink", "ingest/smtp-sink.ts", [], { SMTP_PORT: String(smtpPort), DATA_DIR: mailDataDir });
  procs.push(sink);
  await waitFor("the SMTP sink", async () => /listening/.test(sink.output()), 60_000);

  stack = await startIngestStack(NAME, tdb.env, {
    env: { ALERTS_ESCALATE_EVERY_MS: "1000", ALERTS_RULES_POLL_MS: "1000", APP_URL: "http://127.0.0.1:3999", INGEST_LIVE_INTERVAL_MS: "500" },
  });
  mailer = spawnTs("mailer", "ingest/mailer.ts", [], { ...tdb.env, SMTP_HOST: "127.0.0.1", SMTP_PORT: String(smtpPort), MAILER_POLL_MS: "300", DATA_DIR: mailDataDir });
  procs.push(mailer);
}, 240_000);

afterAll(async () => {
  for (const c of clients) await endClient(c).catch(() => undefined);
  for (const p of procs) await p.stop("SIGTERM").catch(() => undefined);
  await stack?.stop();
  await tdb?.close();
});

describe("live alerts from the simulator and the devices", () => {
  let silentAlertId = 0;

  it(
    "the simulator's silenced sensor raises a silent alert; acknowledged in time, it e-mails nobody",
    async () => {
      // the simulator's second silence of the knife-exit meter (anchor + 25 min, 6 min long) starts ~40 s from now
      const anchorSilent = Math.floor((Date.now() - 25 * MIN + 40_000) / 1000) * 1000;
      const sim = spawnTs("plant-knife", "simulators/plant.ts", ["--backfill-days", "0", "--devices", KNIFE_EXIT, "--anchor", String(anchorSilent), "--malformed-every-s", "0", "--duration-s", "150"], {
        ...stack.env,
        DATA_DIR: path.join(ROOT, ".data"),
      });
      procs.push(sim);
      const knife = await waitFor(
        "the silent alert",
        async () => {
          const list = await alertsOf("sensor_silent", `sensor:${KNIFE_EXIT}`);
          return list.length > 0 ? list[0] : null;
        },
        150_000,
        250,
      );
      // acknowledge at once: nobody should be e-mailed about it
      await respondToAlert(tdb.db, { alertId: knife.id, type: "ack" }, leadId);
      silentAlertId = knife.id;
      expect(knife.severity).toBe("medium");
      // it was raised at the last reading + 45 s of silence: after the silence began, not before
      expect(knife.startTs).toBeGreaterThanOrEqual(anchorSilent + 25 * MIN + 45_000 - 1000);
      expect(knife.startTs).toBeLessThan(anchorSilent + 25 * MIN + 45_000 + 5000);
      expect(knife.deviceId).toBe((await deviceRow(KNIFE_EXIT)).id);
      expect(knife.message).toMatch(/No data from fm-slitter-1-knife-exit/);
    },
    200_000,
  );

  it(
    "the cold snap (the simulator at 3000×) raises the humidity forecast well before the humidity-low alert",
    async () => {
      const from = crossing30 - 4 * H;
      const until = crossing30 + 30 * MIN;
      const sim = spawnTs(
        "plant-coldsnap",
        "simulators/plant.ts",
        ["--backfill-days", "0", "--devices", PRESS_LOGGER, "--anchor", String(anchorColdSnap), "--from", String(from), "--until", String(until), "--speed", "3000", "--malformed-every-s", "0"],
        { ...stack.env, DATA_DIR: path.join(ROOT, ".data") },
      );
      procs.push(sim);
      // the hall climate model is integrated step by step, so on a busy 2-core machine the 4.5 h
      // played at 3000× can take a few minutes of CPU; allow for it
      expect(await sim.exit(300_000)).toBe(0);
      const area = (await deviceRow(PRESS_LOGGER)).areaId!;
      // one alert for the hall drying out: opened by the forecast, escalated when the low limit is passed
      const [humidity, worsened] = await waitFor(
        "the humidity alert, escalated",
        async () => {
          const list = await humidityAlertsOf(`area:${area}`);
          if (list.length === 0 || list[0].kind !== "rh_low") return null;
          const w = await eventsOf(list[0].id, "worsened");
          return w.length > 0 ? ([list[0], w[0]] as const) : null;
        },
        60_000,
      );
      expect(await humidityAlertsOf(`area:${area}`)).toHaveLength(1);
      const forecastRule = await rule("rh_forecast");
      expect(humidity.ruleId).toBe(forecastRule.id);
      // rh_low: 30 % limit, 120 s on-delay (lib/rules/defaults.ts); the escalation comes about when
      // the model's humidity crosses 30 % (the logger's ±0.35 % noise moves the first reading under it by minutes)
      expect(Math.abs(worsened.ts - 120_000 - crossing30)).toBeLessThan(20 * MIN);
      // rh_forecast: trend over 30 min projected 60 min ahead, 300 s on-delay: some 55 min earlier
      expect(humidity.startTs).toBeLessThan(worsened.ts - 30 * MIN);
      expect(humidity.expectedCrossingTs).not.toBeNull();
      expect(humidity.expectedCrossingTs!).toBeGreaterThan(humidity.startTs);
      expect(worsened.comment).toMatch(/^Now medium \(was low\)/);
      expect(humidity.severity).toBe("medium");
      expect(humidity.worsenedTs).toBe(worsened.ts);
      expect(humidity.peakValue!).toBeLessThan(30);
    },
    420_000,
  );

  it(
    "a neutralizer losing its effect raises an effect-loss alert (crafted readings through the broker)",
    async () => {
      const secrets = readDeviceSecrets(tdb.name);
      const [before, after, gw] = await Promise.all([FLEXO_BEFORE, FLEXO_AFTER, FLEXO_GATEWAY].map((c) => connectDevice(stack, c, secrets[c])));
      clients.push(before, after, gw);
      deviceClients.set(FLEXO_AFTER, after);
      const t0 = Math.floor((Date.now() - 16 * MIN) / 1000) * 1000;
      const bSets: unknown[] = [];
      const aSets: unknown[] = [];
      const gSets: unknown[] = [];
      for (let i = 0; i < 15 * 60; i++) {
        const ts = t0 + i * 1000;
        const wobble = Math.sin(i / 7);
        bSets.push({ ts, values: { charge_kv: Number((5 + 0.3 * wobble).toFixed(3)) } });
        // a clean bar takes 90 % off for 7 min, then over 3 min it fouls to taking only 16 % off
        const fouled = Math.min(1, Math.max(0, (i - 420) / 180));
        aSets.push({ ts, values: { charge_kv: Number((0.5 + 3.7 * fouled + (0.05 + 0.15 * fouled) * wobble).toFixed(3)) } });
        if (i % 5 === 0) gSets.push({ ts, values: { running: 1, speed_mpm: 280 + (i % 3) } });
      }
      const send = async (c: MqttClient, code: string, sets: unknown[]) => {
        for (let i = 0; i < sets.length; i += 500) await publishAsync(c, deviceTopics.readings(code), JSON.stringify({ batch: sets.slice(i, i + 500) }));
      };
      await send(gw, FLEXO_GATEWAY, gSets);
      await send(before, FLEXO_BEFORE, bSets);
      await send(after, FLEXO_AFTER, aSets);
      const printExit = await deviceRow(FLEXO_AFTER);
      const [n] = await tdb.db.select({ id: neutralizers.id }).from(neutralizers).where(eq(neutralizers.pointId, printExit.pointId!));
      const loss = await waitFor(
        "the effect-loss alert",
        async () => {
          const list = await alertsOf("effect_loss", `neutralizer:${n.id}`);
          return list.length > 0 ? list[0] : null;
        },
        60_000,
      );
      // healthy for 7 min (90 % off): nothing; raised after fouling, with the 60 s on-delay
      expect(loss.startTs).toBeGreaterThan(t0 + 8 * MIN);
      expect(loss.startTs).toBeLessThan(t0 + 15 * MIN);
      expect(loss.peakValue!).toBeLessThan(0.5);
      expect(loss.lineId).toBe(printExit.lineId);
      expect(loss.message).toMatch(/reduces charge only/);
      // nothing was raised for the other rules on these clean signals
      expect(await alertsOf("charge_high", `point:${printExit.pointId}`)).toHaveLength(0);
    },
    120_000,
  );

  it(
    "each unacknowledged alert e-mails the on-call person once, then escalates; nothing is sent twice",
    async () => {
      const area = (await deviceRow(PRESS_LOGGER)).areaId!;
      // the hall's one humidity alert (its forecast stage, low severity, was never mailed)
      const [low] = await humidityAlertsOf(`area:${area}`);
      const [loss] = await alertsOf("effect_loss");
      // the seeded roster has three escalation orders on call now
      const expectKeys = (id: number) => [1, 2, 3].map((o) => `alert:${id}:order:${o}:`);
      await waitFor(
        "escalation to order 3 for both alerts, all sent",
        async () => {
          const rows = await tdb.db.select({ key: outbox.dedupeKey, state: outbox.state }).from(outbox);
          const sent = rows.filter((r) => r.state === "sent").map((r) => r.key);
          return [...expectKeys(low.id), ...expectKeys(loss.id)].every((k) => sent.some((s) => s.startsWith(k))) ? true : null;
        },
        90_000,
        500,
      );
      const rows = await tdb.db.select().from(outbox);
      const alertMails = rows.filter((r) => r.dedupeKey.startsWith("alert:"));
      // exactly: 3 orders × 2 unacknowledged medium alerts; none for the acknowledged silent one
      expect(alertMails.map((r) => r.dedupeKey.replace(/:person:\d+$/, "")).sort()).toEqual([...expectKeys(low.id), ...expectKeys(loss.id)].map((k) => k.slice(0, -1)).sort());
      expect(alertMails.some((r) => r.dedupeKey.startsWith(`alert:${silentAlertId}:`))).toBe(false);

      // the sink holds each of them exactly once
      const index = readSinkIndex(mailDataDir);
      for (const m of alertMails) {
        const stored = index.filter((e) => e.key === m.dedupeKey && !e.duplicate);
        expect(stored, m.dedupeKey).toHaveLength(1);
        expect(stored[0].messageId).toBe(m.messageId);
        expect(stored[0].to).toContain(m.toAddress);
      }
      // the order-1 mail of the humidity alert: what, where, since when, the peak and the chart link
      const first = alertMails.find((m) => m.dedupeKey.startsWith(`alert:${low.id}:order:1:`))!;
      const [firstLine] = await tdb.db.select({ id: lines.id }).from(lines).where(eq(lines.areaId, area)).orderBy(lines.displayOrder, lines.id).limit(1);
      expect(first.subject).toMatch(/^◆ Over: Humidity low — Press Hall \(medium\)$/);
      expect(first.bodyText).toContain(`http://127.0.0.1:3999/lines/${firstLine.id}?at=${low.startTs}`);
      expect(first.bodyText).toMatch(/Peak: {4}2\d\.\d % RH/);
      expect(first.bodyText).toMatch(/Since: {3}\w{3} \d{1,2} \w{3} \d{4}, \d\d:\d\d \(plant time\)/);
      const second = alertMails.find((m) => m.dedupeKey.startsWith(`alert:${low.id}:order:2:`))!;
      expect(second.subject.startsWith("[Escalated] ")).toBe(true);
      const [lowNow] = await tdb.db.select().from(alerts).where(eq(alerts.id, low.id));
      expect(lowNow.notifiedLevel).toBe(3);
    },
    120_000,
  );

  it(
    "replaying the recorded data with the live rules gives the alerts the live worker raised",
    async () => {
      const area = (await deviceRow(PRESS_LOGGER)).areaId!;
      const printExit = await deviceRow(FLEXO_AFTER);
      const span = { fromTs: crossing30 - 5 * H, toTs: Date.now() };
      const cases = [
        { kind: "rh_forecast", scope: { pointId: null, lineId: null, areaId: area }, subject: `area:${area}` },
        { kind: "rh_low", scope: { pointId: null, lineId: null, areaId: area }, subject: `area:${area}` },
        { kind: "effect_loss", scope: { pointId: printExit.pointId, lineId: null, areaId: null }, subject: null },
      ] as const;
      // a replay judges one rule alone; the live worker keeps one alert per condition, so the
      // forecast's episodes are the humidity alerts' raises and the low limit's are their escalations
      const [humidity] = await humidityAlertsOf(`area:${area}`);
      const escalations = (await eventsOf(humidity.id, "worsened")).map((e) => e.ts);
      for (const c of cases) {
        const live = await rule(c.kind);
        const result = await replayRuleProposal(tdb.db, tdb.pool, { ...uncheckedBody(live), ...span, source: "raw" });
        expect(result.current.episodes.length, c.kind).toBeGreaterThan(0);
        // the unchanged proposal raises the same
        expect(result.proposed.count).toBe(result.current.count);
        if (c.kind === "rh_low") {
          expect(result.current.episodes.map((e) => e.raisedTs)).toEqual(escalations);
          continue;
        }
        const stored = (await tdb.db.select().from(alerts).where(eq(alerts.ruleId, live.id)))
          .filter((a) => (c.subject ? a.subjectKey === c.subject : true))
          .sort((a, b) => a.startTs - b.startTs);
        expect(result.current.episodes.map((e) => [e.ruleId, e.subjectKey, e.raisedTs]), c.kind).toEqual(stored.map((a) => [a.ruleId, a.subjectKey, a.startTs]));
        if (c.kind === "effect_loss") expect(result.current.episodes.map((e) => Number(e.peakValue.toFixed(6))), c.kind).toEqual(stored.map((a) => Number(a.peakValue!.toFixed(6))));
      }
    },
    120_000,
  );

  it(
    "a limit saved as a new rule is used by the running worker within seconds",
    async () => {
      const printExit = await deviceRow(FLEXO_AFTER);
      const saved = await saveRuleVersion(
        tdb.db,
        { kind: "charge_high", scope: { pointId: printExit.pointId, lineId: null, areaId: null }, severity: "medium", onDelayS: 0, offDelayS: 0, onlyWhileRunning: false, params: { limitKv: 3, clearKv: 2.5 } },
        { personId: engineerId, where: "Print exit" },
      );
      const savedAt = Date.now();
      await new Promise((r) => setTimeout(r, 2500)); // the runner polls every second
      // the broker takes a device only under its own code as client id: reuse its connection
      const c = deviceClients.get(FLEXO_AFTER)!;
      const now = Date.now();
      await publishAsync(c, deviceTopics.readings(FLEXO_AFTER), JSON.stringify({ batch: [0, 1, 2].map((i) => ({ ts: now + i * 1000 - 3000, values: { charge_kv: 4.4 } })) }));
      const alert = await waitFor(
        "a charge alert from the new rule",
        async () => {
          const list = await alertsOf("charge_high", `point:${printExit.pointId}`);
          return list.find((a) => a.ruleId === saved.ruleId) ?? null;
        },
        30_000,
      );
      expect(alert.ruleVersion).toBe(1);
      expect(alert.startTs).toBeGreaterThanOrEqual(now - 3000);
      expect(Date.now() - savedAt).toBeLessThan(20_000);
      expect(stack.worker?.output()).toMatch(/alerts engine reloaded/);
    },
    60_000,
  );
});
