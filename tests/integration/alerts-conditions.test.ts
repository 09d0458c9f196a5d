// One alert per condition, live: the real broker and worker (with its alerts runner) against a
// real MariaDB, fed crafted readings as the devices would send them.
// - One excursion at one point passing the 12 kV limit and then the 20 kV one (the default
//   rules, lib/rules/defaults.ts) is one alert: raised medium, escalated to high (a "worsened"
//   event, told again), eased back to medium when the charge falls under 17 kV, cleared under
//   10 kV. Not two alerts.
// - The sensors behind one parent going silent together (here the whole data feed of a plant
//   cut down to three sensors) is one "silent" alert for the parent, none for the sensors.
import { and, eq, inArray, notInArray } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { alertEvents, alerts, devices, people } from "@/db/schema";
import { listRuleRows } from "@/db/queries/rule-rows";
import { saveRuleVersion } from "@/db/queries/rule-versions";
import { readDeviceSecrets } from "@/db/seed";
import { deviceTopics } from "@/lib/contract/topics";
import { DEMO_PEOPLE, fieldMeterCode, speedGatewayCode } from "@/lib/demo-plant";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { connectDevice, endClient, publishAsync, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";

const NAME = "alerts_cond";
const METER = fieldMeterCode("laminator-1", "rewind");
const GATEWAY = speedGatewayCode("laminator-1");
const SILENT_CODES = [fieldMeterCode("bagger-1", "unwind"), fieldMeterCode("bagger-1", "seal-exit"), speedGatewayCode("bagger-1")];

let tdb: TestDatabase;
let stack: IngestStack;
const clients: MqttClient[] = [];

beforeAll(async () => {
  tdb = await createTestDatabase(NAME, { seed: true });
  stack = await startIngestStack(NAME, tdb.env, { env: { ALERTS_RULES_POLL_MS: "500", ALERTS_ESCALATE_EVERY_MS: "1000" } });
}, 240_000);

afterAll(async () => {
  for (const c of clients) await endClient(c).catch(() => undefined);
  await stack?.stop();
  await tdb?.close();
}, 120_000);

async function send(code: string, sets: Array<{ ts: number; values: Partial<Record<string, number>> }>) {
  const secrets = readDeviceSecrets(tdb.name);
  const c = await connectDevice(stack, code, secrets[code]);
  clients.push(c);
  for (let i = 0; i < sets.length; i += 400) await publishAsync(c, deviceTopics.readings(code), JSON.stringify({ batch: sets.slice(i, i + 400) }));
  return c;
}

describe("one alert per condition, live", () => {
  it("an excursion past 12 kV and then 20 kV is one alert that escalates, eases and clears in steps", async () => {
    const [meter] = await tdb.db.select({ id: devices.id, pointId: devices.pointId }).from(devices).where(eq(devices.code, METER));
    const t0 = Math.floor((Date.now() - 10 * 60_000) / 1000) * 1000;
    // kV per second: 2 min at 2, 1 min at 14, 1 min at 23, 1 min at 15, 2 min at 3
    const profile = (s: number) => (s < 120 ? 2 : s < 180 ? 14 : s < 240 ? 23 : s < 300 ? 15 : 3);
    const seconds = Array.from({ length: 420 }, (_, s) => s);
    await send(GATEWAY, seconds.map((s) => ({ ts: t0 + s * 1000, values: { running: 1, speed_mpm: 240 } })));
    await send(METER, seconds.map((s) => ({ ts: t0 + s * 1000, values: { charge_kv: profile(s) + (s % 3) * 0.05 } })));

    const subject = `point:${meter.pointId}`;
    const rules = await listRuleRows(tdb.db);
    const over12 = rules.find((r) => r.kind === "charge_high" && (r.params as { limitKv?: number }).limitKv === 12)!;
    // the alert the 12 kV rule opened, once it has cleared
    await waitFor(
      "the charge alert to clear",
      async () => {
        const rows = await tdb.db.select().from(alerts).where(and(eq(alerts.subjectKey, subject), eq(alerts.ruleId, over12.id)));
        return rows.length > 0 && rows.every((r) => r.endTs !== null) ? rows : null;
      },
      60_000,
      250,
    );
    // and nothing else of the charge family was opened for the excursion (till it cleared at 330 s)
    const alert = (await tdb.db.select().from(alerts).where(and(eq(alerts.subjectKey, subject), inArray(alerts.kind, ["charge_high", "charge_rate"])))).filter((r) => r.startTs <= t0 + 330_000);
    // one alert, not one per limit
    expect(alert).toHaveLength(1);
    const [a] = alert;
    const events = await tdb.db.select().from(alertEvents).where(eq(alertEvents.alertId, a.id)).orderBy(alertEvents.ts, alertEvents.id);
    const kinds = events.map((e) => e.kind);
    expect(kinds[0]).toBe("raised");
    expect(kinds).toContain("worsened");
    expect(kinds).toContain("eased");
    expect(kinds[kinds.length - 1]).toBe("cleared");
    const raised = events.find((e) => e.kind === "raised")!;
    // the 12 kV rule's peak passed 23 kV (a clearly worse peak) as the 20 kV rule raised: told again either way
    const worsened = events.find((e) => e.kind === "worsened" && /^Now high/.test(e.comment ?? ""))!;
    const eased = events.find((e) => e.kind === "eased")!;
    const cleared = events.find((e) => e.kind === "cleared")!;
    // 12 kV passed at 120 s with a 10 s on-delay; 20 kV at 180 s, also 10 s
    expect(raised.ts).toBe(t0 + 130_000);
    expect(worsened.ts).toBe(t0 + 190_000);
    expect(worsened.comment).toMatch(/^Now high \(was medium\)/);
    // under 17 kV (the 20 kV rule's clear level) at 240 s, 30 s off-delay; under 10 kV at 300 s, 30 s
    expect(eased.ts).toBe(t0 + 270_000);
    expect(eased.comment).toMatch(/^Back to medium \(was high\)/);
    expect(cleared.ts).toBe(t0 + 330_000);
    expect(a.peakValue).toBeCloseTo(23.1, 6);
    expect(a.worsenedTs).toBe(t0 + 190_000);
    expect(a.severity).toBe("medium");
  }, 120_000);

  it("the sensors behind one parent going silent together are one alert for the parent", async () => {
    const engineer = (await tdb.db.select({ id: people.id }).from(people).where(eq(people.email, DEMO_PEOPLE.find((p) => p.role === "engineer")!.email)))[0];
    // a plant of three sensors: the data feed is all of them
    await tdb.db.update(devices).set({ enabled: false }).where(notInArray(devices.code, SILENT_CODES));
    const silent = (await listRuleRows(tdb.db)).find((r) => r.kind === "sensor_silent")!;
    await saveRuleVersion(
      tdb.db,
      { ruleId: silent.id, baseVersion: silent.currentVersion, kind: "sensor_silent", scope: { pointId: null, lineId: null, areaId: null }, severity: "medium", onDelayS: 0, offDelayS: 5, onlyWhileRunning: false, params: { silentS: 8 } },
      { personId: engineer.id },
    );
    const cutAt = Date.now();
    await new Promise((r) => setTimeout(r, 2000)); // the runner reloads plant and rules
    const now = Date.now();
    const sets = Array.from({ length: 5 }, (_, i) => now - 5000 + i * 1000);
    await Promise.all(SILENT_CODES.map((code) => send(code, sets.map((ts) => ({ ts, values: code.startsWith("fm-") ? { charge_kv: 1.2 } : { running: 1, speed_mpm: 100 } })))));
    // then nothing: after 8 s each is silent; the hold waits 30 s for its siblings
    const feedAlerts = await waitFor(
      "the data feed's silent alert",
      async () => {
        const rows = await tdb.db.select().from(alerts).where(eq(alerts.subjectKey, "gateway:feed"));
        return rows.some((r) => r.startTs > cutAt) ? rows : null;
      },
      90_000,
      500,
    );
    // the feed's alert of the plant that never reported (26 of 26 silent) cleared when the plant
    // was cut to three sensors and they reported; their silence is one new alert
    const fresh = feedAlerts.filter((r) => r.startTs > cutAt);
    expect(fresh).toHaveLength(1);
    expect(fresh[0].message).toMatch(/^The data feed \(broker or worker\) silent: 3 of 3 sensors/);
    expect(feedAlerts.filter((r) => r.startTs <= cutAt).every((r) => r.endTs !== null)).toBe(true);
    const sensorAlerts = await tdb.db.select().from(alerts).where(inArray(alerts.subjectKey, SILENT_CODES.map((c) => `sensor:${c}`)));
    expect(sensorAlerts).toEqual([]);
  }, 150_000);
});
