// The Mosquitto broker profile (README "Broker profiles"): Debian's mosquitto with its
// dynamic-security plugin, kept in step with the devices table by ingest/mosquitto/run.ts.
// Device sign-in, topic rights and refusals for MQTT 5 and MQTT 3.1.1 clients; the service
// accounts' split duties; a rotated secret and a disabled device take effect at once (the open
// session is closed); a deleted device is removed; drift made behind the runner's back is
// repaired at the next start and reported. Refusal codes are those of the MQTT specifications
// (3.1.1 §3.2.2.3: 5 = not authorized; 5.0 §3.2.2.2: 0x87 = 135 not authorized).
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createEdgeNode } from "../../db/queries/gateways";
import { devices } from "../../db/schema";
import { hashDeviceSecret } from "../../lib/device-secrets";
import { ADMIN_USERNAME } from "../../ingest/mosquitto/config";
import { DynsecClient } from "../../ingest/mosquitto/dynsec-client";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { waitFor } from "./ingest-support/processes";
import { connectMqtt, ensureMosquitto, signInCode, startMosquittoStack, type MosquittoStack } from "./mosquitto-support/stack";

const SEAL_KEY = "mosquitto-broker-test-seal-key-0123456789";
const CODE = "fm-mq-probe-1";
const OTHER = "fm-mq-probe-2";
let tdb: TestDatabase;
let stack: MosquittoStack;
const NODE = { code: "spb-mq-probe", nodeId: "probe-node", secret: "edge-node-secret-0123456789" };
const secrets = { [CODE]: "probe-one-secret-0123456789", [OTHER]: "probe-two-secret-0123456789" };

async function addDevice(code: string, secret: string) {
  await tdb.db.insert(devices).values({ code, kind: "field_meter", label: code, secretHash: hashDeviceSecret(secret, undefined, SEAL_KEY), createdAt: Date.now() });
}
const device = (code: string, secret: string, protocolVersion: 4 | 5) => ({ username: code, password: secret, clientId: code, protocolVersion });
const closed = (c: MqttClient) => new Promise<void>((resolve) => (c.disconnected || !c.connected ? resolve() : c.once("close", () => resolve())));

describe.skipIf(!ensureMosquitto())("Mosquitto profile: devices, rights and refusals", () => {
  beforeAll(async () => {
    tdb = await createTestDatabase("mq_broker");
    await addDevice(CODE, secrets[CODE]);
    await addDevice(OTHER, secrets[OTHER]);
    await createEdgeNode(tdb.db, { code: NODE.code, groupId: "harrow-fen", nodeId: NODE.nodeId, label: "Test gateway", secretHash: hashDeviceSecret(NODE.secret, undefined, SEAL_KEY) }, null);
    stack = await startMosquittoStack("broker", tdb.env, { env: { BROKER_SEAL_KEY: SEAL_KEY } });
  });
  afterAll(async () => {
    await stack?.stop();
    await tdb?.close();
  });

  it.each([5, 4] as const)("MQTT %i: a device signs in with its code and secret and is refused otherwise", async (v) => {
    const refused = v === 5 ? 135 : 5;
    expect(await signInCode(stack.mqttPort, device(CODE, secrets[CODE], v))).toBe(0);
    expect(await signInCode(stack.mqttPort, device(CODE, "wrong-secret-0123456789", v))).toBe(refused);
    expect(await signInCode(stack.mqttPort, device("fm-nobody", "whatever-0123456789", v))).toBe(refused);
    // the client id must be the device code
    expect(await signInCode(stack.mqttPort, { ...device(CODE, secrets[CODE], v), clientId: OTHER })).toBe(refused);
    // nobody signs in without a user name, nor as a service account with a device's secret
    expect(await signInCode(stack.mqttPort, { clientId: "anon", protocolVersion: v })).toBe(refused);
    expect(await signInCode(stack.mqttPort, { username: "svc-worker", password: secrets[CODE], clientId: "x", protocolVersion: v })).toBe(refused);
  });

  it("a device publishes only its own topics and reads only its commands; the service accounts keep to their duties", async () => {
    const worker = await connectMqtt(stack.mqttPort, { username: "svc-worker", password: stack.env.MQTT_WORKER_PASSWORD, clientId: "t-worker", protocolVersion: 5 });
    const got: string[] = [];
    worker.on("message", (topic) => got.push(topic));
    const granted = await worker.subscribeAsync(["$share/t/stillfield/d/+/readings", "stillfield/d/+/status"], { qos: 1 });
    expect(granted.map((g) => g.qos)).toEqual([1, 1]);

    const v5 = await connectMqtt(stack.mqttPort, device(CODE, secrets[CODE], 5));
    await v5.publishAsync(`stillfield/d/${CODE}/readings`, '{"ts":1,"values":{"charge_kv":1}}', { qos: 1 });
    expect((await v5.subscribeAsync(`stillfield/d/${CODE}/cmd`, { qos: 1 }))[0].qos).toBe(1);
    await expect(v5.subscribeAsync("stillfield/d/#", { qos: 1 })).rejects.toThrow(/Not authorized/);
    const v4 = await connectMqtt(stack.mqttPort, device(OTHER, secrets[OTHER], 4));
    await v4.publishAsync(`stillfield/d/${OTHER}/status`, '{"online":true}', { qos: 1 });
    // MQTT 3.1.1: SUBACK 0x80 for the refused filter, the other granted (mqtt.js rejects on any 0x80)
    const sub = await v4.subscribeAsync(["stillfield/internal/#", `stillfield/d/${OTHER}/cmd`], { qos: 1 }).catch((err: unknown) => err);
    expect(sub).toMatchObject({ packet: { granted: [128, 1] } });
    await Promise.all([v5.endAsync(), v4.endAsync()]);

    // a publish outside its rights closes the connection (as on the embedded broker); MQTT 5
    // first answers PUBACK 0x87, MQTT 3.1.1 has no refusal code for a publish
    const forbidden: Array<[{ username: string; password: string; clientId: string }, string]> = [
      [device(CODE, secrets[CODE], 5), `stillfield/d/${OTHER}/readings`],
      [device(CODE, secrets[CODE], 5), "stillfield/internal/alerts"],
      [{ username: "svc-app", password: stack.env.MQTT_APP_PASSWORD, clientId: "t-app" }, `stillfield/d/${CODE}/readings`],
      [{ username: "svc-app", password: stack.env.MQTT_APP_PASSWORD, clientId: "t-app" }, "stillfield/internal/live/line/1"],
      [{ username: "svc-worker", password: stack.env.MQTT_WORKER_PASSWORD, clientId: "t-worker-2" }, `stillfield/d/${CODE}/readings`],
    ];
    for (const [who, topic] of forbidden) {
      for (const v of [5, 4] as const) {
        const c = await connectMqtt(stack.mqttPort, { ...who, protocolVersion: v });
        const gone = closed(c);
        const sent = c.publishAsync(topic, "{}", { qos: 1 });
        if (v === 5) await expect(sent).rejects.toThrow(/Not authorized|closed/i);
        else void sent.catch(() => undefined);
        await gone;
        c.end(true);
      }
    }
    const app = await connectMqtt(stack.mqttPort, { username: "svc-app", password: stack.env.MQTT_APP_PASSWORD, clientId: "t-app", protocolVersion: 5 });
    await app.publishAsync("stillfield/internal/alerts", "{}", { qos: 1 });
    await expect(app.subscribeAsync(`stillfield/d/+/readings`, { qos: 1 })).rejects.toThrow(/Not authorized/);
    expect((await app.subscribeAsync("stillfield/internal/#", { qos: 1 }))[0].qos).toBe(1);
    await app.endAsync();

    await waitFor("the device's own messages at the worker", async () => got.length >= 2, 5000);
    await new Promise((r) => setTimeout(r, 300));
    // nothing refused above reached the worker
    expect(got.sort()).toEqual([`stillfield/d/${CODE}/readings`, `stillfield/d/${OTHER}/status`]);
    await worker.endAsync();
  }, 30_000);

  it("a Sparkplug edge node is confined to spBv1.0/<group>/+/<node>/#, commands excepted", async () => {
    const worker = await connectMqtt(stack.mqttPort, { username: "svc-worker", password: stack.env.MQTT_WORKER_PASSWORD, clientId: "t-host", protocolVersion: 4 });
    const got: string[] = [];
    worker.on("message", (topic) => got.push(topic));
    await worker.subscribeAsync("spBv1.0/#", { qos: 1 });
    const node = () => connectMqtt(stack.mqttPort, { username: NODE.code, password: NODE.secret, clientId: NODE.code, protocolVersion: 4 });
    const n = await node();
    await n.publishAsync(`spBv1.0/harrow-fen/NBIRTH/${NODE.nodeId}`, Buffer.from([0]), { qos: 0 });
    await n.publishAsync(`spBv1.0/harrow-fen/DDATA/${NODE.nodeId}/meter-1`, Buffer.from([0]), { qos: 0 });
    expect((await n.subscribeAsync(`spBv1.0/harrow-fen/NCMD/${NODE.nodeId}`, { qos: 1 }))[0].qos).toBe(1);
    expect((await n.subscribeAsync("spBv1.0/STATE/+", { qos: 1 }))[0].qos).toBe(1);
    await waitFor("the edge node's own messages at the host", async () => got.length >= 2, 5000);
    await n.endAsync();
    for (const topic of [`spBv1.0/harrow-fen/NDATA/another-node`, `spBv1.0/other-group/NDATA/${NODE.nodeId}`, `spBv1.0/harrow-fen/NCMD/${NODE.nodeId}`]) {
      const c = await node();
      const gone = closed(c);
      void c.publishAsync(topic, Buffer.from([0]), { qos: 1 }).catch(() => undefined);
      await gone;
      c.end(true);
    }
    await new Promise((r) => setTimeout(r, 300));
    expect(got.sort()).toEqual([`spBv1.0/harrow-fen/DDATA/${NODE.nodeId}/meter-1`, `spBv1.0/harrow-fen/NBIRTH/${NODE.nodeId}`]);
    await worker.endAsync();
  });

  it("a rotated secret stops working at once: the open session is closed and only the new secret signs in", async () => {
    const c = await connectMqtt(stack.mqttPort, device(CODE, secrets[CODE], 5));
    const fresh = "probe-one-rotated-0123456789";
    const t0 = Date.now();
    await tdb.db.update(devices).set({ secretHash: hashDeviceSecret(fresh, undefined, SEAL_KEY) }).where(eq(devices.code, CODE));
    await closed(c);
    expect(Date.now() - t0).toBeLessThan(3000);
    expect(await signInCode(stack.mqttPort, device(CODE, secrets[CODE], 4))).toBe(5);
    expect(await signInCode(stack.mqttPort, device(CODE, fresh, 4))).toBe(0);
    secrets[CODE] = fresh;
  });

  it("a disabled device is disconnected at once and refused; enabled again, it signs in", async () => {
    const c = await connectMqtt(stack.mqttPort, device(OTHER, secrets[OTHER], 4));
    const t0 = Date.now();
    await tdb.db.update(devices).set({ enabled: false }).where(eq(devices.code, OTHER));
    await closed(c);
    expect(Date.now() - t0).toBeLessThan(3000);
    expect(await signInCode(stack.mqttPort, device(OTHER, secrets[OTHER], 5))).toBe(135);
    await tdb.db.update(devices).set({ enabled: true }).where(eq(devices.code, OTHER));
    await waitFor("the device enabled again", async () => (await signInCode(stack.mqttPort, device(OTHER, secrets[OTHER], 5))) === 0, 5000);
  });

  it("a deleted device is removed from the broker; drift made behind the runner's back is repaired at the next start", async () => {
    const c = await connectMqtt(stack.mqttPort, device(OTHER, secrets[OTHER], 5));
    await tdb.db.delete(devices).where(eq(devices.code, OTHER));
    await closed(c);
    expect(await signInCode(stack.mqttPort, device(OTHER, secrets[OTHER], 5))).toBe(135);

    // drift: a stray client and a device's client removed by hand
    const admin = await DynsecClient.connect({ host: "127.0.0.1", port: stack.mqttPort, username: ADMIN_USERNAME, password: stack.env.MQTT_ADMIN_PASSWORD, clientId: "t-admin" });
    await admin.run([
      { command: "createClient", username: "stray-client", password: "stray-secret-0123456789" },
      { command: "deleteClient", username: CODE },
    ]);
    await admin.close();
    expect(await signInCode(stack.mqttPort, device(CODE, secrets[CODE], 5))).toBe(135);
    expect(await signInCode(stack.mqttPort, { username: "stray-client", password: "stray-secret-0123456789", clientId: "stray", protocolVersion: 5 })).toBe(0);

    await stack.restartBroker();
    expect(stack.broker.output()).toMatch(new RegExp(`device ${CODE}: added`));
    expect(stack.broker.output()).toMatch(/client stray-client: removed/);
    expect(await signInCode(stack.mqttPort, device(CODE, secrets[CODE], 5))).toBe(0);
    expect(await signInCode(stack.mqttPort, { username: "stray-client", password: "stray-secret-0123456789", clientId: "stray", protocolVersion: 5 })).toBe(135);
  });
});
