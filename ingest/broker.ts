// The MQTT broker (aedes) in its own process on 127.0.0.1:MQTT_PORT.
// - Devices sign in with their code (username, also the client id) and secret, checked against
//   the hashed secrets in `devices`. The credentials are cached and reloaded every
//   BROKER_DEVICE_REFRESH_MS; a device disabled (or whose secret was rotated) since is refused
//   from then on and its open connection is closed, so it is out within that interval.
// - Topic rules in broker-acl.ts; a foreign or internal publish closes the connection, a
//   foreign subscription is refused on its own (SUBACK 0x80).
// - Messages over MQTT_MAX_PAYLOAD_BYTES are refused. Every refusal is counted; counters are on
//   GET http://127.0.0.1:BROKER_HEALTH_PORT/health and in `ingest_status` (row BROKER_ID).
// - When a device disconnects cleanly its last will is not sent, so the broker publishes
//   {"online":false} on the device's status topic itself (the worker ignores repeats).
// SIGTERM/SIGINT: stop listening, close clients (with a time limit), exit.
import { timingSafeEqual } from "node:crypto";
import net from "node:net";
import path from "node:path";
import { Aedes, type AuthenticateError, type Client } from "aedes";
import { closeDb, getDb } from "../db/client";
import { getEnv } from "../db/env";
import { findDeviceCredential, listDeviceCredentials, type DeviceCredential } from "../db/queries/devices-auth";
import { upsertIngestStatus } from "../db/queries/ingest-diagnostics";
import { DEVICE_CODE_PATTERN, deviceTopics } from "../lib/contract/topics";
import { verifyDeviceSecret } from "../lib/device-secrets";
import { mayPublish, maySubscribe, type Principal } from "./broker-acl";
import { indexOutgoingQueues } from "./broker-outgoing-index";
import { getIngestConfig } from "./config";
import { startHealthServer } from "./health-server";
import { createLogger, describeError } from "./log";

const log = createLogger("broker");

function authError(message: string, returnCode: 2 | 3 | 4 | 5): AuthenticateError {
  return Object.assign(new Error(message), { returnCode });
}

function sameSecret(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

export async function startBroker() {
  const env = getEnv();
  const cfg = getIngestConfig();
  const db = getDb();
  const startedTs = Date.now();

  const stats = {
    refused: { auth: 0, publish: 0, subscribe: 0, oversized: 0 },
    kicked: 0,
    messagesIn: 0,
    bytesIn: 0,
    credentialsLoadedTs: null as number | null,
    credentialsError: null as string | null,
  };

  // ---- device credentials cache ----
  let credentials = new Map<string, DeviceCredential>();
  const lastLookup = new Map<string, number>();
  async function reloadCredentials(): Promise<void> {
    try {
      const rows = await listDeviceCredentials(db);
      credentials = new Map(rows.map((r) => [r.code, r]));
      stats.credentialsLoadedTs = Date.now();
      stats.credentialsError = null;
    } catch (err) {
      stats.credentialsError = describeError(err);
      log.warn("could not reload device credentials; keeping the cached ones", { error: stats.credentialsError });
      return;
    }
    // close connections of devices that were disabled, removed or re-keyed since they signed in
    for (const [client, p] of principals) {
      if (p.kind !== "device") continue;
      const cred = credentials.get(p.code);
      if (!cred || !cred.enabled || cred.secretHash !== p.secretHash) {
        log.info("closing the connection of a device that may no longer sign in", { code: p.code });
        stats.kicked++;
        // its will (if any) and the offline backstop still go out as it closes
        client.close();
      }
    }
  }
  /** A device added after the last reload may sign in at once (one look-up per code per 5 s). */
  async function credentialFor(code: string): Promise<DeviceCredential | null> {
    const cached = credentials.get(code);
    if (cached) return cached;
    const last = lastLookup.get(code) ?? 0;
    if (Date.now() - last < 5000) return null;
    lastLookup.set(code, Date.now());
    try {
      const found = await findDeviceCredential(db, code);
      if (found) credentials.set(code, found);
      return found;
    } catch (err) {
      log.warn("device look-up failed", { code, error: describeError(err) });
      return null;
    }
  }

  type Session = Principal & { secretHash?: string };
  const principals = new Map<Client, Session>();

  const broker = await Aedes.createBroker({
    id: cfg.BROKER_ID,
    maxClientsIdLength: 64,
    authenticate(client, username, password, done) {
      const secret = password ? password.toString("utf8") : "";
      if (username === env.MQTT_SERVICE_USER) {
        if (sameSecret(secret, env.MQTT_SERVICE_PASSWORD)) {
          principals.set(client, { kind: "service" });
          return done(null, true);
        }
        stats.refused.auth++;
        log.warn("service account sign-in refused: wrong password", { clientId: client.id });
        return done(authError("Bad user name or password", 4), null);
      }
      const code = username ?? "";
      if (!DEVICE_CODE_PATTERN.test(code) || client.id !== code) {
        stats.refused.auth++;
        log.warn("sign-in refused: the client id must be the device code", { clientId: client.id, username: code.slice(0, 64) });
        return done(authError("Client id must equal the device code", 2), null);
      }
      credentialFor(code).then(
        (cred) => {
          if (!cred || !verifyDeviceSecret(secret, cred.secretHash)) {
            stats.refused.auth++;
            log.warn("device sign-in refused: unknown device or wrong secret", { code });
            return done(authError("Bad user name or password", 4), null);
          }
          if (!cred.enabled) {
            stats.refused.auth++;
            log.warn("device sign-in refused: device disabled", { code });
            return done(authError("Device disabled", 5), null);
          }
          principals.set(client, { kind: "device", code, secretHash: cred.secretHash });
          done(null, true);
        },
        (err: unknown) => {
          stats.refused.auth++;
          log.error("device sign-in check failed", { code, error: describeError(err) });
          done(authError("Server unavailable", 3), null);
        },
      );
    },
    authorizePublish(client, packet, done) {
      if (!client) {
        // wills of clients of another broker instance: only device status topics
        return done(packet.topic.endsWith("/status") ? null : new Error("not allowed"));
      }
      const p = principals.get(client);
      if (!p) {
        stats.refused.publish++;
        return done(new Error("not signed in"));
      }
      const size = packet.payload ? packet.payload.length : 0;
      if (size > cfg.MQTT_MAX_PAYLOAD_BYTES) {
        stats.refused.oversized++;
        log.warn("message refused: too large", { clientId: client.id, bytes: size, topic: packet.topic.slice(0, 120) });
        return done(new Error("message too large"));
      }
      if (!mayPublish(p, packet.topic)) {
        stats.refused.publish++;
        log.warn("publish refused: topic not allowed", { clientId: client.id, topic: packet.topic.slice(0, 120) });
        return done(new Error("topic not allowed"));
      }
      stats.messagesIn++;
      stats.bytesIn += size;
      done(null);
    },
    authorizeSubscribe(client, sub, done) {
      const p = principals.get(client);
      if (p && maySubscribe(p, sub.topic)) return done(null, sub);
      stats.refused.subscribe++;
      log.warn("subscription refused", { clientId: client.id, topic: sub.topic.slice(0, 120) });
      done(null, null);
    },
  });

  indexOutgoingQueues(Reflect.get(broker, "persistence"));

  broker.on("clientDisconnect", (client) => {
    const p = principals.get(client);
    principals.delete(client);
    if (!p || p.kind !== "device") return;
    // a reconnect with the same id is replacing this connection (it signed in before the old
    // one is closed): the device is still online
    for (const other of principals.values()) if (other.kind === "device" && other.code === p.code) return;
    broker.publish(
      { cmd: "publish", topic: deviceTopics.status(p.code), payload: Buffer.from('{"online":false}'), qos: 1, retain: false, dup: false },
      (err) => {
        if (err) log.warn("could not publish a device's offline status", { code: p.code, error: describeError(err) });
      },
    );
  });
  broker.on("clientError", (client, err) => log.debug("client error", { clientId: client.id, error: describeError(err) }));
  broker.on("connectionError", (_client, err) => log.debug("connection error", { error: describeError(err) }));

  await reloadCredentials();
  const refreshTimer = setInterval(() => void reloadCredentials(), cfg.BROKER_DEVICE_REFRESH_MS);

  const snapshot = () => ({
    kind: "broker" as const,
    brokerId: cfg.BROKER_ID,
    startedTs,
    nowTs: Date.now(),
    clients: broker.connectedClients,
    devicesConnected: [...principals.values()].filter((p) => p.kind === "device").length,
    ...stats,
  });
  const statusTimer = setInterval(() => {
    upsertIngestStatus(db, cfg.BROKER_ID, Date.now(), snapshot()).catch((err: unknown) =>
      log.debug("could not write broker status", { error: describeError(err) }),
    );
  }, 10_000);

  const server = net.createServer(broker.handle);
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(env.MQTT_PORT, "127.0.0.1", () => resolve());
  });
  const health = await startHealthServer(cfg.BROKER_HEALTH_PORT, () => snapshot());
  log.info(`listening on 127.0.0.1:${env.MQTT_PORT} (health on 127.0.0.1:${cfg.BROKER_HEALTH_PORT}), ${credentials.size} devices known`);

  let stopping = false;
  async function stop(): Promise<void> {
    if (stopping) return;
    stopping = true;
    clearInterval(refreshTimer);
    clearInterval(statusTimer);
    server.close();
    health.close();
    // aedes can hang on attached clients: give it 3 s, then end their sockets ourselves
    const closed = new Promise<void>((resolve) => broker.close(() => resolve()));
    const timeout = new Promise<void>((resolve) => setTimeout(resolve, 3000).unref());
    await Promise.race([closed, timeout]);
    for (const client of principals.keys()) client.conn.destroy();
    await upsertIngestStatus(db, cfg.BROKER_ID, Date.now(), snapshot()).catch(() => undefined);
    await closeDb().catch(() => undefined);
  }
  return { broker, stop, stats };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  startBroker()
    .then(({ stop }) => {
      const onSignal = (sig: string) => {
        log.info(`${sig}: stopping`);
        stop()
          .then(() => process.exit(0))
          .catch((err: unknown) => {
            log.error("stop failed", { error: describeError(err) });
            process.exit(1);
          });
      };
      process.on("SIGTERM", () => onSignal("SIGTERM"));
      process.on("SIGINT", () => onSignal("SIGINT"));
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
