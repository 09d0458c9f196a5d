// The live data path against the real broker and worker: a device publishes a reading, the
// worker commits it and publishes its line's snapshot, and the app's one hub subscription hands
// it to every open stream. Also: alert changes pass through, junk on the internal topics is
// counted and dropped, and the time from publish to hand-over stays well under 2 s.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { MqttClient } from "mqtt";
import { quantile } from "simple-statistics";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { getPlantLayout } from "../../db/queries/plant";
import { internalTopics, deviceTopics } from "../../lib/contract/topics";
import { connectDevice, connectService, endClient, publishAsync, serviceAccount, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";
import type { HubEvent } from "../../app/_server/live-hub";

let tdb: TestDatabase;
let stack: IngestStack;
let device: MqttClient;
let logger: MqttClient;
let hubModule: typeof import("../../app/_server/live-hub");
let hub: import("../../app/_server/live-hub").LiveHub;
const events: HubEvent[] = [];
const second: HubEvent[] = [];
let unsubscribe: Array<() => void> = [];
let fm: { id: number; code: string; lineId: number };
let th: { id: number; code: string; areaId: number };

beforeAll(async () => {
  tdb = await createTestDatabase("dashboards_live", { seed: true });
  stack = await startIngestStack("dashboards_live", tdb.env, { env: { INGEST_LIVE_INTERVAL_MS: "1000" } });
  hubModule = await import("../../app/_server/live-hub");
  // the app's hub takes its broker from the environment; this one is pointed at the test broker
  hub = new hubModule.LiveHub({ host: "127.0.0.1", port: stack.mqttPort, ...serviceAccount(stack, "app") });
  const layout = await getPlantLayout(tdb.db);
  const line = layout[0].lines[0];
  fm = { id: line.points[0].fieldMeter!.id, code: line.points[0].fieldMeter!.code, lineId: line.id };
  th = { id: layout[0].logger!.id, code: layout[0].logger!.code, areaId: layout[0].id };
  const secrets = readDeviceSecrets(tdb.name);
  device = await connectDevice(stack, fm.code, secrets[fm.code]);
  logger = await connectDevice(stack, th.code, secrets[th.code]);
  unsubscribe = [hub.subscribe((e) => events.push(e)), hub.subscribe((e) => second.push(e))];
  await waitFor("the hub's broker connection", async () => hub.isConnected(), 20_000);
});

afterAll(async () => {
  for (const u of unsubscribe) u();
  await hub?.close();
  if (device) await endClient(device);
  if (logger) await endClient(logger);
  await stack?.stop();
  await tdb?.close();
});

function liveSample(scope: "line" | "area", id: number, deviceId: number, channel: string, ts: number): number | null {
  for (const e of events) {
    if (e.type !== "live" || e.snapshot.scope !== scope || e.snapshot.id !== id) continue;
    for (const s of e.snapshot.series) {
      if (s.deviceId !== deviceId || s.channel !== channel) continue;
      const hit = s.samples.find(([t]) => t === ts);
      if (hit) return hit[1];
    }
  }
  return null;
}

describe("live hub", () => {
  it("the app's hub is one shared instance per process; one connection serves every listener", () => {
    expect(hubModule.getLiveHub()).toBe(hubModule.getLiveHub());
    expect(hub.stats()).toMatchObject({ listeners: 2, connected: true });
  });

  it("hands a device's committed reading to every listener in its line's snapshot, and a logger's in its hall's", async () => {
    const ts = Date.now();
    await publishAsync(device, deviceTopics.readings(fm.code), JSON.stringify({ ts, values: { charge_kv: -7.25 } }));
    await publishAsync(logger, deviceTopics.readings(th.code), JSON.stringify({ ts, values: { temp_c: 20.5, rh_pct: 31.5 } }));
    expect(await waitFor("the line snapshot", async () => liveSample("line", fm.lineId, fm.id, "charge_kv", ts), 10_000)).toBe(-7.25);
    expect(await waitFor("the hall snapshot", async () => liveSample("area", th.areaId, th.id, "rh_pct", ts), 10_000)).toBe(31.5);
    const inSecond = second.some((e) => e.type === "live" && e.snapshot.series.some((s) => s.samples.some(([t]) => t === ts)));
    expect(inSecond).toBe(true);
  });

  it("forwards alert changes and drops what does not parse, counting it", async () => {
    const svc = await connectService(stack, "dashboards-live-test-publisher");
    const rejectedBefore = hub.stats().rejected;
    await publishAsync(svc, internalTopics.alerts, JSON.stringify({ alertId: 41, lineId: fm.lineId, areaId: th.areaId, state: "active_unacked", severity: "medium", ts: Date.now() }));
    await publishAsync(svc, internalTopics.liveLine(fm.lineId), "{not json");
    await publishAsync(svc, internalTopics.liveLine(fm.lineId), JSON.stringify({ v: 2, scope: "line", id: fm.lineId, ts: 1, series: [] }));
    await waitFor("the alert event", async () => events.some((e) => e.type === "alert" && e.alert.alertId === 41), 10_000);
    await waitFor("two rejections", async () => hub.stats().rejected - rejectedBefore >= 2, 10_000);
    expect(events.some((e) => e.type === "live" && e.snapshot.ts === 1)).toBe(false);
    await endClient(svc);
  });

  it("gets a published reading to the app within 2 s at the 95th percentile", async () => {
    const delays: number[] = [];
    for (let i = 0; i < 20; i++) {
      const ts = Date.now();
      const value = Number((1 + i / 100).toFixed(2));
      await publishAsync(device, deviceTopics.readings(fm.code), JSON.stringify({ ts, values: { charge_kv: value } }));
      await waitFor("the reading", async () => liveSample("line", fm.lineId, fm.id, "charge_kv", ts) === value, 10_000, 20);
      delays.push(Date.now() - ts);
      await new Promise((r) => setTimeout(r, 150));
    }
    const p95 = quantile(delays, 0.95);
    console.log(`live path publish → app hub: p50 ${quantile(delays, 0.5).toFixed(0)} ms, p95 ${p95.toFixed(0)} ms`);
    expect(p95).toBeLessThan(2000);
  });
});
