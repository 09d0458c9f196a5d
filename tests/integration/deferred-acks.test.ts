// The worker's held-back acknowledgements (ingest/deferred-acks.ts) against both real brokers: a
// batch of PUBACKs written as one buffer (the worker's usual path) and a single one through
// mqtt.js. After the client comes back with its session, the broker sends again exactly the
// messages that were never acknowledged: the embedded broker (MQTT 3.1.1) and Mosquitto (MQTT 5,
// where the four-byte PUBACK leaves out the success reason code, §3.4.2.1).
import mqtt, { type IClientOptions, type IPublishPacket, type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readDeviceSecrets } from "../../db/seed";
import { DeferredAcks, type AckToken } from "../../ingest/deferred-acks";
import { deviceTopics } from "../../lib/contract/topics";
import { SERVICE_ACCOUNTS } from "../../lib/settings";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { connectClient, endClient, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";
import { ensureMosquitto, startMosquittoStack, type MosquittoStack } from "./mosquitto-support/stack";

const DEVICE = "fm-gravure-1-unwind";
const SENT = 40;
const BATCH = 25; // messages 0…24 acknowledged as one buffer, 25 on its own, 26…39 never
let tdb: TestDatabase;
let secrets: Record<string, string>;
let embedded: IngestStack | null = null;
let mosquitto: MosquittoStack | null = null;

beforeAll(async () => {
  tdb = await createTestDatabase("deferred_acks", { seed: true });
  secrets = readDeviceSecrets(tdb.name);
});

afterAll(async () => {
  await embedded?.stop();
  await mosquitto?.stop();
  await tdb?.close();
});

type Listener = { client: MqttClient; acks: DeferredAcks; got: Array<{ n: number; token: AckToken | null }> };

async function listen(port: number, opts: IClientOptions): Promise<Listener> {
  // handlers in the same tick as the connect, as the worker does: a broker may send the session's
  // unacknowledged messages right behind its CONNACK
  const client = mqtt.connect({ host: "127.0.0.1", port, clientId: "deferred-acks-test", clean: false, reconnectPeriod: 0, ...opts });
  const acks = new DeferredAcks(client);
  const got: Listener["got"] = [];
  client.on("message", (_topic, payload, packet: IPublishPacket) => {
    got.push({ n: Number(JSON.parse(payload.toString("utf8")).values.charge_kv), token: acks.token(packet) });
  });
  await new Promise<void>((resolve, reject) => {
    client.once("connect", () => resolve());
    client.once("error", reject);
  });
  await client.subscribeAsync(deviceTopics.readings("+"), { qos: 1 });
  return { client, acks, got };
}

async function drill(port: number, protocolVersion: 4 | 5, password: string) {
  const session: IClientOptions = { protocolVersion, username: SERVICE_ACCOUNTS.worker, password, ...(protocolVersion === 5 ? { properties: { sessionExpiryInterval: 300 } } : {}) };
  const first = await listen(port, session);
  const device = await connectClient(port, { clientId: DEVICE, username: DEVICE, password: secrets[DEVICE], clean: true, protocolVersion });
  const ts = Date.now();
  for (let i = 0; i < SENT; i++) await device.publishAsync(deviceTopics.readings(DEVICE), JSON.stringify({ ts: ts + i, values: { charge_kv: i } }), { qos: 1 });
  await waitFor("every message at the listener", async () => first.got.length >= SENT, 10_000, 20);
  const byN = new Map(first.got.map((g) => [g.n, g.token]));
  first.acks.ack(Array.from({ length: BATCH }, (_, i) => byN.get(i) ?? null));
  first.acks.ack([byN.get(BATCH) ?? null]);
  expect(first.acks.sent).toBe(BATCH + 1);
  // let the acknowledgements reach the broker, then leave with the session kept
  await new Promise((r) => setTimeout(r, 500));
  await endClient(first.client);

  const second = await listen(port, session);
  await new Promise((r) => setTimeout(r, 3000));
  console.log("DEBUG second", second.got.map((g) => g.n), "first sent", first.acks.sent, "discarded", first.acks.discarded, mosquitto?.broker.output().slice(-3000));
  await waitFor("the messages never acknowledged, sent again", async () => second.got.length >= SENT - BATCH - 1, 10_000, 20);
  await new Promise((r) => setTimeout(r, 700)); // nothing else follows
  const again = second.got.map((g) => g.n).sort((a, b) => a - b);
  expect(again).toEqual(Array.from({ length: SENT - BATCH - 1 }, (_, i) => BATCH + 1 + i));
  second.acks.ack(second.got.map((g) => g.token));
  await new Promise((r) => setTimeout(r, 300));
  await endClient(second.client);
  await endClient(device);
}

describe("held-back acknowledgements", () => {
  it("the embedded broker (MQTT 3.1.1) sends again only what was never acknowledged", async () => {
    embedded = await startIngestStack("deferred_acks", tdb.env, { startWorker: false });
    await drill(embedded.mqttPort, 4, embedded.env.MQTT_WORKER_PASSWORD);
  });

  it.skipIf(!ensureMosquitto())("Mosquitto (MQTT 5) sends again only what was never acknowledged", async () => {
    mosquitto = await startMosquittoStack("deferred-acks", tdb.env);
    await drill(mosquitto.mqttPort, 5, mosquitto.env.MQTT_WORKER_PASSWORD);
  }, 60_000);
});
