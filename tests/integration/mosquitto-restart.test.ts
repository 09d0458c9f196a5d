// A Mosquitto restart on the Mosquitto profile (ingest/mosquitto/device-gate.ts): Mosquitto
// 2.0.11 restores a worker session's shared subscription in a state that delivers nothing, so a
// device that signs in before the broker process has repaired the workers' sessions would have
// its readings acknowledged and dropped. Devices are refused until the repair is done; a device
// publishing through the restart has every acknowledged reading stored. And a worker coming back
// with its session present does not renew its subscription by unsubscribing first: with no
// other member in the share group, Mosquitto acknowledges and drops what arrives meanwhile.
// The repair is held up on purpose by a write lock on ingest_status (the repair reads the
// workers' client ids from it), so the moment between "broker up" and "sessions repaired" lasts
// long enough to be looked at.
import mqtt, { type MqttClient } from "mqtt";
import type { PoolConnection, RowDataPacket } from "mysql2/promise";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readDeviceSecrets } from "../../db/seed";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { waitFor } from "./ingest-support/processes";
import { ensureMosquitto, signInCode, startMosquittoStack, type MosquittoStack } from "./mosquitto-support/stack";

const STREAMER = "fm-flexo-2-unwind";
const PROBE = "fm-laminator-1-rewind";
let tdb: TestDatabase;
let stack: MosquittoStack;
let secrets: Record<string, string>;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const probe = (v: 4 | 5) => signInCode(stack.mqttPort, { username: PROBE, password: secrets[PROBE], clientId: PROBE, protocolVersion: v, connectTimeout: 1000 });

/** A device publishing readings of STREAMER (QoS 1, up to `perTick` every `pauseMs`, `window` unacknowledged), retrying when refused, as devices do. */
async function streamReadings(t0: number, window: number, perTick: number, pauseMs: number) {
  const client: MqttClient = await mqtt.connectAsync({
    host: "127.0.0.1",
    port: stack.mqttPort,
    username: STREAMER,
    password: secrets[STREAMER],
    clientId: STREAMER,
    protocolVersion: 5,
    reconnectPeriod: 50,
    reconnectOnConnackError: true,
  });
  client.on("error", () => undefined); // refusals and refused connections while the broker restarts
  const acked: number[] = [];
  let i = 0;
  let inFlight = 0;
  let streaming = true;
  const loop = (async () => {
    while (streaming) {
      for (let k = 0; k < perTick && inFlight < window; k++) {
        const ts = t0 + i++ * 10;
        inFlight++;
        client.publish(`stillfield/d/${STREAMER}/readings`, JSON.stringify({ ts, values: { charge_kv: 2.5 } }), { qos: 1 }, (err) => {
          inFlight--;
          if (!err) acked.push(ts);
        });
      }
      await sleep(pauseMs);
    }
  })();
  return {
    acked,
    async stop() {
      streaming = false;
      await loop;
      await waitFor("nothing left in flight", async () => Object.keys(client.outgoing).length === 0, 15_000);
      await client.endAsync();
    },
  };
}

/** Every reading the broker acknowledged for STREAMER since t0 is in the readings table. */
async function notStored(t0: number, acked: number[]): Promise<number[]> {
  const stored = async () => {
    const [rows] = await tdb.pool.query<RowDataPacket[]>(`SELECT ts FROM readings WHERE device_id = (SELECT id FROM devices WHERE code = ?) AND channel = 'charge_kv' AND ts >= ?`, [STREAMER, t0]);
    return new Set(rows.map((r) => Number(r.ts)));
  };
  // a reading not stored by now never will be: the caller's assertion names it
  await waitFor("every acknowledged reading stored", async () => (await stored()).size >= acked.length, 20_000, 250).catch(() => undefined);
  const have = await stored();
  return acked.filter((ts) => !have.has(ts));
}

describe.skipIf(!ensureMosquitto())("Mosquitto profile: a broker restart", () => {
  beforeAll(async () => {
    tdb = await createTestDatabase("mq_restart", { seed: true });
    secrets = readDeviceSecrets(tdb.name);
    stack = await startMosquittoStack("restart", tdb.env, { env: { INGEST_FLUSH_MS: "100" } });
    await Promise.all([stack.startWorker(1), stack.startWorker(2)]);
  });
  afterAll(async () => {
    await stack?.stop();
    await tdb?.close();
  });

  it("refuses devices until the workers' sessions are repaired, and stores every reading acknowledged across the restart", async () => {
    // the repair finds the workers by their status rows
    await waitFor("both workers' status rows", async () => {
      const [rows] = await tdb.pool.query<RowDataPacket[]>("SELECT COUNT(*) AS n FROM ingest_status WHERE worker_id LIKE 'mq-restart-%'");
      return Number(rows[0].n) >= 2;
    }, 10_000);

    // a device publishing about one reading every 5 ms
    const t0 = Date.now() - 10 * 60_000;
    const streamer = await streamReadings(t0, 100, 1, 5);
    await sleep(500);

    let lock: PoolConnection | null = await tdb.pool.getConnection();
    const codes: number[] = [];
    let restarted: Promise<void> | null = null;
    try {
      await lock.query("LOCK TABLES ingest_status WRITE");
      restarted = stack.restartBroker();
      const answered = (c: number) => c === 0 || c === 135;
      // first the old broker goes away (no answer at all) …
      await waitFor("the old broker stopped", async () => !answered(await probe(5)), 15_000, 20);
      // … then the new one comes up while the repair waits for the lock: devices are refused
      // (3.1.1 §3.2.2.3: 5 = not authorized; 5.0 §3.2.2.2: 0x87 = 135 not authorized)
      const deadline = Date.now() + 20_000;
      while (codes.length < 6 && Date.now() < deadline) {
        const v5 = await probe(5);
        if (answered(v5)) codes.push(v5, await probe(4));
        await sleep(100);
      }
      expect(codes.length).toBeGreaterThanOrEqual(6);
      expect(codes).toEqual(codes.map((c, k) => (k % 2 === 0 ? 135 : 5)));
      await lock.query("UNLOCK TABLES");
      lock.release();
      lock = null;
      await restarted;
    } finally {
      if (lock) {
        await lock.query("UNLOCK TABLES").catch(() => undefined);
        lock.release();
      }
      // on a failure too: the new broker process belongs to the stack, which stops it after the tests
      await restarted?.catch(() => undefined);
    }
    expect(stack.broker.output()).toMatch(/let \d+ device account\(s\) in, held back until the workers' sessions were repaired/);
    // repaired: devices sign in again, and the streamer's readings flow
    expect(await probe(5)).toBe(0);
    const afterRestart = streamer.acked.length;
    await waitFor("readings acknowledged after the restart", async () => streamer.acked.length > afterRestart + 100, 15_000);
    await streamer.stop();
    expect(streamer.acked.length).toBeGreaterThan(200);
    expect(await notStored(t0, streamer.acked)).toEqual([]);
  });

  it("a worker back with its session (the only one of the share group) loses nothing the devices send meanwhile", async () => {
    // worker 2 leaves for good (its session ended): worker 1 alone holds the shared subscription
    await stack.workers.get(2)!.stop("SIGTERM");
    const end = await mqtt.connectAsync({ host: "127.0.0.1", port: stack.mqttPort, username: "svc-worker", password: stack.env.MQTT_WORKER_PASSWORD, clientId: "mq-restart-2", protocolVersion: 5, clean: true, properties: { sessionExpiryInterval: 0 } });
    await end.endAsync();
    // a device sending as fast as it is acknowledged (up to 200 unacknowledged)
    const t0 = Date.now() - 20 * 60_000;
    const streamer = await streamReadings(t0, 200, 20, 1);
    await sleep(300);
    // killed mid-stream and back: it finds its session present and takes what waited there; had
    // it unsubscribed to renew the subscription, the group would have had no member for a moment
    // and the broker would have acknowledged and dropped what came in (PUBACK reason 0)
    const w1 = stack.workers.get(1)!;
    w1.child.kill("SIGKILL");
    await w1.exit(5000);
    await stack.startWorker(1);
    const back = streamer.acked.length;
    await waitFor("readings acknowledged with the worker back", async () => streamer.acked.length > back + 2000, 20_000);
    await streamer.stop();
    expect(await notStored(t0, streamer.acked)).toEqual([]);
  });
});
