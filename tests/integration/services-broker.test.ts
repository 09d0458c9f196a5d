// The broker's hardening against the real broker process and the real devices table (README
// "Security"): service accounts split by duty, the reserved svc- prefix, the packet-size guard
// that closes a connection before a huge packet's body arrives, the connection cap, the bounded
// memory of unknown device names, a disabled device cut off within about a second, and the
// TLS listener that devices verify with this install's CA.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import mqtt, { type MqttClient } from "mqtt";
import { eq } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { deviceTopics, internalTopics } from "../../lib/contract/topics";
import { hashDeviceSecret } from "../../lib/device-secrets";
import { closeDb, getDb } from "@/db/client";
import { people } from "@/db/schema";
import { createDeviceAction } from "@/app/_server/actions/devices";
import { DEMO_PEOPLE } from "@/lib/demo-plant";
import { connectClient, connectDevice, connectService, endClient, freePort, publishAsync, ROOT, startIngestStack, type IngestStack } from "./ingest-support/processes";

let tdb: TestDatabase;
let stack: IngestStack;
let secrets: Record<string, string>;
let tlsDir: string;
let tlsPort: number;
const A = "fm-gravure-1-unwind";

beforeAll(async () => {
  tdb = await createTestDatabase("services_broker", { seed: true });
  secrets = readDeviceSecrets(tdb.name);
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "sf-broker-tls-"));
  execFileSync("bash", ["scripts/tls.sh"], { cwd: ROOT, env: { ...process.env, DATA_DIR: dataDir }, stdio: "ignore" });
  tlsDir = path.join(dataDir, "tls");
  tlsPort = await freePort();
  stack = await startIngestStack("services_broker", tdb.env, {
    startWorker: false,
    env: {
      MQTT_MAX_PAYLOAD_BYTES: "4096",
      MQTT_MAX_CONNECTIONS: "12",
      BROKER_UNKNOWN_CODES_KEPT: "5",
      MQTT_TLS_PORT: String(tlsPort),
      MQTT_TLS_CERT_FILE: path.join(tlsDir, "server.crt"),
      MQTT_TLS_KEY_FILE: path.join(tlsDir, "server.key"),
    },
  });
}, 60_000);

afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
  await closeDb();
  if (tlsDir) fs.rmSync(path.dirname(tlsDir), { recursive: true, force: true });
});

function closedWithin(c: MqttClient, ms: number): Promise<boolean> {
  return new Promise((resolve) => {
    if (!c.connected) return resolve(true);
    const t = setTimeout(() => resolve(false), ms);
    c.once("close", () => {
      clearTimeout(t);
      resolve(true);
    });
  });
}

function rawSocket(port: number): Promise<net.Socket> {
  return new Promise((resolve, reject) => {
    const s = net.connect({ host: "127.0.0.1", port }, () => resolve(s));
    s.once("error", reject);
  });
}

function socketClosedWithin(s: net.Socket, ms: number): Promise<boolean> {
  return new Promise((resolve) => {
    if (s.destroyed || s.readyState === "closed") return resolve(true);
    const t = setTimeout(() => resolve(false), ms);
    s.once("close", () => {
      clearTimeout(t);
      resolve(true);
    });
    s.on("error", () => undefined);
  });
}

describe("service accounts split by duty", () => {
  it("the app's account cannot publish device readings or live snapshots; nothing reaches the worker's side", async () => {
    const watcher = await connectService(stack, "svc-test-watch", "worker");
    const seen: string[] = [];
    watcher.on("message", (t) => seen.push(t));
    await new Promise<void>((r) => watcher.subscribe("stillfield/d/#", { qos: 1 }, () => r()));
    const before = (await stack.brokerStats()).refused.publish;
    for (const topic of [deviceTopics.readings(A), internalTopics.liveLine(1)]) {
      const app = await connectService(stack, "svc-test-app", "app");
      const gone = closedWithin(app, 3000);
      app.publish(topic, JSON.stringify({ ts: Date.now(), values: { charge_kv: 0.1 } }), { qos: 1 });
      expect(await gone).toBe(true);
      app.end(true);
    }
    await new Promise((r) => setTimeout(r, 300));
    expect(seen).toEqual([]);
    expect((await stack.brokerStats()).refused.publish - before).toBe(2);
    // its one job still works: an alert change
    const app = await connectService(stack, "svc-test-app2", "app");
    await publishAsync(app, internalTopics.alerts, JSON.stringify({ alertId: 1, state: "acknowledged", ts: Date.now() }));
    await endClient(app);
    await endClient(watcher);
  });

  it("the worker's account cannot pose as a device either", async () => {
    const worker = await connectService(stack, "svc-test-worker", "worker");
    const gone = closedWithin(worker, 3000);
    worker.publish(deviceTopics.readings(A), JSON.stringify({ ts: Date.now(), values: { charge_kv: 0.1 } }), { qos: 1 });
    expect(await gone).toBe(true);
    worker.end(true);
  });
});

describe("the service accounts' names", () => {
  it("a device named with the reserved prefix cannot sign in, whatever its secret", async () => {
    await tdb.pool.query("INSERT INTO devices (code, kind, label, secret_hash, created_at) VALUES ('svc-fake', 'field_meter', 'x', ?, ?)", [hashDeviceSecret("fake-secret-123"), Date.now()]);
    const before = (await stack.brokerStats()).refused.auth;
    await expect(connectClient(stack.mqttPort, { clientId: "svc-fake", username: "svc-fake", password: "fake-secret-123" })).rejects.toThrow(/Bad username|Not authorized|refused/i);
    await expect(connectClient(stack.mqttPort, { clientId: "SVC-worker", username: "SVC-worker", password: "x" })).rejects.toThrow(/Bad username|Not authorized|refused/i);
    expect((await stack.brokerStats()).refused.auth - before).toBe(2);
  });

  it("the Devices page refuses a name with the reserved prefix", async () => {
    const admin = DEMO_PEOPLE.find((p) => p.role === "admin")!;
    const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, admin.email)))[0];
    const session = { personId: row.id, role: admin.role, name: admin.name, email: admin.email };
    for (const code of ["svc-worker", "SVC-Line-3"]) {
      const r = await createDeviceAction.run(session, { code, kind: "field_meter", label: "Sneaky" });
      expect(r).toMatchObject({ ok: false, fieldErrors: { code: [expect.stringContaining("reserved")] } });
    }
  });
});

describe("limits while the bytes stream in", () => {
  it("closes a connection whose packet header announces 100 MB, before the body is sent", async () => {
    const before = (await stack.brokerStats()).refused.oversized;
    const s = await rawSocket(stack.mqttPort);
    // PUBLISH, remaining length 100,000,000 as an MQTT variable-length integer, then a few bytes
    let n = 100_000_000;
    const len: number[] = [];
    do {
      let b = n % 128;
      n = Math.floor(n / 128);
      if (n > 0) b |= 0x80;
      len.push(b);
    } while (n > 0);
    s.write(Buffer.from([0x30, ...len, 0x00, 0x05, ...Buffer.from("a/b/c")]));
    expect(await socketClosedWithin(s, 2000)).toBe(true);
    expect((await stack.brokerStats()).refused.oversized - before).toBe(1);
  });

  it("refuses connections past MQTT_MAX_CONNECTIONS and serves again once they close", async () => {
    const before = (await stack.brokerStats()).refused.connections;
    const sockets: net.Socket[] = [];
    for (let i = 0; i < 16; i++) sockets.push(await rawSocket(stack.mqttPort));
    const closed = await Promise.all(sockets.map((s) => socketClosedWithin(s, 1000)));
    expect(closed.filter(Boolean).length).toBeGreaterThanOrEqual(4);
    expect((await stack.brokerStats()).refused.connections - before).toBeGreaterThanOrEqual(4);
    for (const s of sockets) s.destroy();
    await new Promise((r) => setTimeout(r, 300));
    const dev = await connectDevice(stack, A, secrets[A]);
    await endClient(dev);
  });

  it("remembers at most BROKER_UNKNOWN_CODES_KEPT unknown device names", async () => {
    for (let i = 0; i < 12; i++) {
      const code = `fm-made-up-${i}`;
      await expect(connectClient(stack.mqttPort, { clientId: code, username: code, password: "nope" })).rejects.toThrow();
    }
    const health = (await (await fetch(`http://127.0.0.1:${stack.brokerHealthPort}/health`)).json()) as { unknownCodesRemembered: number };
    expect(health.unknownCodesRemembered).toBeGreaterThan(0);
    expect(health.unknownCodesRemembered).toBeLessThanOrEqual(5);
  });
});

describe("revoking a device", () => {
  it("closes a disabled device's connection within about a second (default check interval)", async () => {
    const code = "th-labelling-room";
    const dev = await connectDevice(stack, code, secrets[code]);
    const gone = closedWithin(dev, 2500);
    await tdb.pool.query("UPDATE devices SET enabled = 0 WHERE code = ?", [code]);
    expect(await gone).toBe(true);
    dev.end(true);
    await tdb.pool.query("UPDATE devices SET enabled = 1 WHERE code = ?", [code]);
  });
});

describe("MQTT over TLS", () => {
  const tlsConnect = (opts: { ca?: Buffer }) =>
    new Promise<MqttClient>((resolve, reject) => {
      const c = mqtt.connect({
        protocol: "mqtts",
        host: "127.0.0.1",
        port: tlsPort,
        protocolVersion: 4,
        clientId: A,
        username: A,
        password: secrets[A],
        reconnectPeriod: 0,
        connectTimeout: 5000,
        ...(opts.ca ? { ca: opts.ca } : {}),
        rejectUnauthorized: true,
      });
      c.once("connect", () => resolve(c));
      c.once("error", (err) => {
        c.end(true);
        reject(err);
      });
    });

  it("a device that trusts this install's CA signs in and publishes", async () => {
    const c = await tlsConnect({ ca: fs.readFileSync(path.join(tlsDir, "ca.crt")) });
    await publishAsync(c, deviceTopics.readings(A), JSON.stringify({ ts: Date.now(), values: { charge_kv: -1.5 } }));
    await endClient(c);
  });

  it("a client without the CA refuses the broker's certificate", async () => {
    await expect(tlsConnect({})).rejects.toThrow(/self[- ]signed|unable to verify|certificate/i);
  });
});
