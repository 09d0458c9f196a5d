// The broker's sign-in and topic rules against the real broker process and the real devices
// table: wrong credentials cannot connect; a device cannot publish to
// another device's topic or read internal topics; oversized messages are refused; a disabled
// device is refused within the refresh interval. Every refusal is counted.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { MqttClient } from "mqtt";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { deviceTopics, internalTopics } from "../../lib/contract/topics";
import {
  connectClient,
  connectDevice,
  connectService,
  endClient,
  serviceAccount,
  startIngestStack,
  waitFor,
  type IngestStack,
} from "./ingest-support/processes";

let tdb: TestDatabase;
let stack: IngestStack;
let secrets: Record<string, string>;
const A = "fm-gravure-1-unwind";
const B = "fm-gravure-1-infeed";

beforeAll(async () => {
  tdb = await createTestDatabase("ingest_broker", { seed: true });
  secrets = readDeviceSecrets(tdb.name);
  stack = await startIngestStack("broker", tdb.env, {
    startWorker: false,
    env: { BROKER_DEVICE_REFRESH_MS: "500", MQTT_MAX_PAYLOAD_BYTES: "4096" },
  });
});

afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
});

function closed(c: MqttClient): Promise<void> {
  return new Promise((resolve) => {
    if (c.disconnected || !c.connected) return resolve();
    c.once("close", () => resolve());
  });
}

/** The QoS the broker granted, or 128 when it refused (mqtt.js reports a refusal as an error). */
function subscribeGranted(c: MqttClient, filter: string): Promise<number> {
  return new Promise((resolve, reject) =>
    c.subscribe(filter, { qos: 1 }, (err, granted) => {
      if (!err) return resolve(granted?.[0]?.qos ?? -1);
      const packet = "packet" in err ? err.packet : undefined;
      if (packet && typeof packet === "object" && "granted" in packet && Array.isArray(packet.granted)) {
        const g: unknown = packet.granted[0];
        return resolve(typeof g === "number" ? g : -1);
      }
      reject(err);
    }),
  );
}

describe("broker sign-in", () => {
  it("refuses wrong or missing credentials and counts each refusal", async () => {
    const before = (await stack.brokerStats()).refused.auth;
    const attempts = [
      { clientId: A, username: A, password: "not-the-secret" },
      { clientId: A, username: A, password: secrets[B] }, // another device's secret
      { clientId: "fm-nowhere", username: "fm-nowhere", password: "x" },
      { clientId: "someone", username: A, password: secrets[A] }, // client id is not the device code
      { clientId: "svc-x", username: serviceAccount(stack, "worker").username, password: "wrong-service-password" },
      { clientId: A },
    ];
    for (const opts of attempts) {
      await expect(connectClient(stack.mqttPort, opts)).rejects.toThrow(/refused|Bad username|Not authorized|Identifier/i);
    }
    expect((await stack.brokerStats()).refused.auth - before).toBe(attempts.length);
  });

  it("lets a device in with its own code and secret", async () => {
    const c = await connectDevice(stack, A, secrets[A]);
    expect(c.connected).toBe(true);
    await endClient(c);
  });
});

describe("broker topic rules", () => {
  it("closes a device that publishes to another device's topic or an internal topic; nothing is delivered", async () => {
    // the worker's account watches device topics, the app's internal ones
    const svc = await connectService(stack, "svc-watch");
    const svcApp = await connectService(stack, "svc-watch-app", "app");
    const received: string[] = [];
    svc.on("message", (topic) => received.push(topic));
    svcApp.on("message", (topic) => received.push(topic));
    await subscribeGranted(svc, "stillfield/d/#");
    await subscribeGranted(svcApp, "stillfield/internal/#");
    const before = (await stack.brokerStats()).refused.publish;

    for (const topic of [deviceTopics.readings(B), internalTopics.liveLine(1), internalTopics.alerts, deviceTopics.command(A)]) {
      const dev = await connectDevice(stack, A, secrets[A]);
      const gone = closed(dev);
      dev.publish(topic, JSON.stringify({ ts: Date.now(), values: { charge_kv: 1 } }), { qos: 1 });
      await gone;
      dev.end(true);
    }
    // its own topic still works, and is the only thing the watcher saw
    const dev = await connectDevice(stack, A, secrets[A]);
    await new Promise<void>((r, j) => dev.publish(deviceTopics.readings(A), JSON.stringify({ ts: Date.now(), values: { charge_kv: 1 } }), { qos: 1 }, (e) => (e ? j(e) : r())));
    await waitFor("the allowed message", async () => received.includes(deviceTopics.readings(A)));
    expect(received.filter((t) => t !== deviceTopics.readings(A) && t !== deviceTopics.status(A))).toEqual([]);
    expect((await stack.brokerStats()).refused.publish - before).toBe(4);
    await endClient(dev);
    await endClient(svc);
    await endClient(svcApp);
  });

  it("refuses a device's subscriptions to internal topics, other devices and wildcards, and delivers nothing from them", async () => {
    const dev = await connectDevice(stack, A, secrets[A]);
    const got: string[] = [];
    dev.on("message", (t) => got.push(t));
    const before = (await stack.brokerStats()).refused.subscribe;
    for (const f of ["stillfield/internal/#", internalTopics.liveLine(1), internalTopics.alerts, "#", "stillfield/d/+/readings", deviceTopics.command(B)]) {
      expect(await subscribeGranted(dev, f)).toBe(128);
    }
    expect(await subscribeGranted(dev, deviceTopics.command(A))).toBe(1);
    expect((await stack.brokerStats()).refused.subscribe - before).toBe(6);

    const svc = await connectService(stack, "svc-pub");
    for (const t of [internalTopics.liveLine(1), internalTopics.alerts, deviceTopics.command(B), deviceTopics.command(A)]) {
      await new Promise<void>((r) => svc.publish(t, '{"v":1}', { qos: 1 }, () => r()));
    }
    await waitFor("the device's own command", async () => got.length > 0);
    await new Promise((r) => setTimeout(r, 300));
    expect(got).toEqual([deviceTopics.command(A)]);
    await endClient(svc);
    await endClient(dev);
  });

  it("refuses a message over the size limit and counts it", async () => {
    const before = (await stack.brokerStats()).refused.oversized;
    const dev = await connectDevice(stack, A, secrets[A]);
    const gone = closed(dev);
    dev.publish(deviceTopics.readings(A), "x".repeat(5000), { qos: 1 });
    await gone;
    dev.end(true);
    expect((await stack.brokerStats()).refused.oversized - before).toBe(1);
  });
});

describe("device administration", () => {
  it("closes and then refuses a device disabled by an admin within the refresh interval", async () => {
    const code = "th-labelling-room";
    const dev = await connectDevice(stack, code, secrets[code]);
    const gone = closed(dev);
    const t0 = Date.now();
    await tdb.pool.query("UPDATE devices SET enabled = 0 WHERE code = ?", [code]);
    await gone;
    // refresh every 500 ms in this test (BROKER_DEVICE_REFRESH_MS); 20 s by default
    expect(Date.now() - t0).toBeLessThan(3000);
    dev.end(true);
    await expect(connectDevice(stack, code, secrets[code])).rejects.toThrow(/Not authorized|refused/i);
    expect((await stack.brokerStats()).kicked).toBeGreaterThanOrEqual(1);
    await tdb.pool.query("UPDATE devices SET enabled = 1 WHERE code = ?", [code]);
  });

  it("publishes a device's offline status when it leaves without its will", async () => {
    const svc = await connectService(stack, "svc-status");
    const statuses: string[] = [];
    svc.on("message", (t, m) => t === deviceTopics.status(B) && statuses.push(m.toString()));
    await subscribeGranted(svc, deviceTopics.status(B));
    const dev = await connectDevice(stack, B, secrets[B]);
    await endClient(dev); // a clean DISCONNECT discards the will
    await waitFor("the broker's offline message", async () => statuses.length > 0);
    expect(JSON.parse(statuses[0])).toEqual({ online: false });
    await endClient(svc);
  });
});
