// The MQTT broker (aedes) in its own process.
// Listeners: plain MQTT on 127.0.0.1:MQTT_PORT (the local services and simulators; never leaves
// the machine) and, when MQTT_TLS_PORT is set, MQTT over TLS on MQTT_TLS_HOST:MQTT_TLS_PORT for
// devices, with the per-install certificate from scripts/tls.sh (DATA_DIR/tls). Both share one
// connection cap (MQTT_MAX_CONNECTIONS) and a packet-size guard that closes a connection as soon
// as a packet's header announces more than the limit, before its body is read (mqtt-frame-guard.ts).
// - Devices sign in with their code (username, also the client id) and secret, checked against
//   the hashed secrets in `devices`. The broker checks a signature of the devices table every
//   BROKER_DEVICE_CHECK_MS and reloads on a change: a device disabled (or whose secret was
//   rotated) is refused from then on and its open connection is closed within about a second.
// - Two service accounts, svc-worker and svc-app, with per-install passwords and split duties
//   (broker-acl.ts). No other user name may start with "svc-"; the Devices page refuses it too.
// - Topic rules in broker-acl.ts; a foreign or internal publish closes the connection, a
//   foreign subscription is refused on its own (SUBACK 0x80).
// - Messages over MQTT_MAX_PAYLOAD_BYTES are refused. Every refusal is counted; counters are on
//   GET http://127.0.0.1:BROKER_HEALTH_PORT/health and in `ingest_status` (row BROKER_ID).
// - When a device disconnects cleanly its last will is not sent, so the broker publishes
//   {"online":false} on the device's status topic itself (the worker ignores repeats).
// SIGTERM/SIGINT: stop listening, close clients (with a time limit), exit.
import { timingSafeEqual } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import tls from "node:tls";
import { Aedes, type AuthenticateError, type Client } from "aedes";
import { closeDb, getDb } from "../db/client";
import { getEnv } from "../db/env";
import { deviceCredentialsSignature, findDeviceCredential, listDeviceCredentials, type DeviceCredential } from "../db/queries/devices-auth";
import { upsertIngestStatus } from "../db/queries/ingest-diagnostics";
import { DEVICE_CODE_PATTERN, deviceTopics } from "../lib/contract/topics";
import { verifyDeviceSecret } from "../lib/device-secrets";
import { isReservedAccountName, SERVICE_ACCOUNTS, tlsFiles, type ServiceRole } from "../lib/settings";
import { mayPublish, maySubscribe, type Principal } from "./broker-acl";
import { indexOutgoingQueues } from "./broker-outgoing-index";
import { getIngestConfig } from "./config";
import { startHealthServer } from "./health-server";
import { createLogger, describeError } from "./log";
import { guardConnection } from "./mqtt-frame-guard";
import { EdgeNodeSignIn } from "./sparkplug/broker-edge-nodes";
import { isSparkplugWillTopic } from "../lib/sparkplug/topics";
import { RateWindow } from "../lib/rate-window";

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
    refused: { auth: 0, publish: 0, subscribe: 0, oversized: 0, connections: 0 },
    kicked: 0,
    messagesIn: 0,
    bytesIn: 0,
    credentialsLoadedTs: null as number | null,
    credentialsError: null as string | null,
    unknownCodesRemembered: 0,
  };
  const messageRate = new RateWindow(startedTs);

  // ---- device credentials cache ----
  let credentials = new Map<string, DeviceCredential>();
  let signature = "";
  let lastFullLoad = 0;
  async function reloadCredentials(): Promise<void> {
    void reloadEdgeNodes();
    try {
      const sig = await deviceCredentialsSignature(db);
      if (sig === signature && Date.now() - lastFullLoad < cfg.BROKER_DEVICE_REFRESH_MS) return;
      const rows = await listDeviceCredentials(db);
      credentials = new Map(rows.map((r) => [r.code, r]));
      signature = sig;
      lastFullLoad = Date.now();
      stats.credentialsLoadedTs = lastFullLoad;
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
  // Look-ups of codes not in the cache: one per code per 5 s, at most MISS_LOOKUPS_PER_S in all,
  // and a bounded memory of recent misses (oldest forgotten first), so a flood of made-up names
  // neither grows memory nor floods the database.
  const MISS_MEMORY = cfg.BROKER_UNKNOWN_CODES_KEPT;
  const MISS_LOOKUPS_PER_S = 20;
  const lastLookup = new Map<string, number>();
  let lookupWindow = { startTs: 0, count: 0 };
  /** A device added after the last reload may sign in at once. */
  async function credentialFor(code: string): Promise<DeviceCredential | null> {
    const cached = credentials.get(code);
    if (cached) return cached;
    const now = Date.now();
    const last = lastLookup.get(code) ?? 0;
    if (now - last < 5000) return null;
    if (now - lookupWindow.startTs >= 1000) lookupWindow = { startTs: now, count: 0 };
    if (++lookupWindow.count > MISS_LOOKUPS_PER_S) return null;
    lastLookup.delete(code);
    lastLookup.set(code, now);
    while (lastLookup.size > MISS_MEMORY) lastLookup.delete(lastLookup.keys().next().value!);
    stats.unknownCodesRemembered = lastLookup.size;
    try {
      const found = await findDeviceCredential(db, code);
      if (found) credentials.set(code, found);
      return found;
    } catch (err) {
      log.warn("device look-up failed", { code, error: describeError(err) });
      return null;
    }
  }
  const servicePasswords: Record<ServiceRole, string> = { worker: env.MQTT_WORKER_PASSWORD, app: env.MQTT_APP_PASSWORD };
  const serviceRoleOf = (username: string): ServiceRole | null =>
    username === SERVICE_ACCOUNTS.worker ? "worker" : username === SERVICE_ACCOUNTS.app ? "app" : null;

  type Session = Principal & { secretHash?: string };
  const principals = new Map<Client, Session>();
  // Sparkplug edge nodes sign in like devices (ingest/sparkplug/broker-edge-nodes.ts)
  const edgeNodes = new EdgeNodeSignIn(db, log);
  async function reloadEdgeNodes(): Promise<void> {
    const signedIn = [...principals].filter(([, p]) => p.kind === "edge_node");
    const gone = new Set(await edgeNodes.reload(signedIn.map(([, p]) => p as Session & { code: string })));
    for (const [client, p] of signedIn) if (p.kind === "edge_node" && gone.has(p.code)) {
      stats.kicked++;
      client.close();
    }
  }

  const broker = await Aedes.createBroker({
    id: cfg.BROKER_ID,
    maxClientsIdLength: 64,
    connectTimeout: 10_000,
    authenticate(client, username, password, done) {
      const secret = password ? password.toString("utf8") : "";
      const role = serviceRoleOf(username ?? "");
      if (role) {
        if (sameSecret(secret, servicePasswords[role])) {
          principals.set(client, { kind: "service", role });
          return done(null, true);
        }
        stats.refused.auth++;
        log.warn("service account sign-in refused: wrong password", { clientId: client.id, username });
        return done(authError("Bad user name or password", 4), null);
      }
      if (isReservedAccountName(username ?? "")) {
        stats.refused.auth++;
        log.warn("sign-in refused: a reserved service-account name", { clientId: client.id, username: (username ?? "").slice(0, 64) });
        return done(authError("Bad user name or password", 4), null);
      }
      const code = username ?? "";
      if (!DEVICE_CODE_PATTERN.test(code) || client.id !== code) {
        stats.refused.auth++;
        log.warn("sign-in refused: the client id must be the device code", { clientId: client.id, username: code.slice(0, 64) });
        return done(authError("Client id must equal the device code", 2), null);
      }
      if (edgeNodes.has(code)) {
        const r = edgeNodes.check(code, secret);
        if (r.ok) return (principals.set(client, r.principal), done(null, true));
        stats.refused.auth++;
        log.warn("edge-node sign-in refused", { code, disabled: r.disabled });
        return done(r.disabled ? authError("Edge node disabled", 5) : authError("Bad user name or password", 4), null);
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
        return done(packet.topic.endsWith("/status") || isSparkplugWillTopic(packet.topic) ? null : new Error("not allowed"));
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
        if (p.kind === "edge_node") edgeNodes.refused(p, packet.topic);
        return done(new Error("topic not allowed"));
      }
      stats.messagesIn++;
      messageRate.add(1, Date.now());
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
  const refreshTimer = setInterval(() => void reloadCredentials(), cfg.BROKER_DEVICE_CHECK_MS);

  const snapshot = () => ({
    kind: "broker" as const,
    brokerId: cfg.BROKER_ID,
    startedTs,
    nowTs: Date.now(),
    clients: broker.connectedClients,
    devicesConnected: [...principals.values()].filter((p) => p.kind === "device").length,
    ...stats,
    // over the last minute (the Health page)
    rates: { messagesPerS: messageRate.perSecond(Date.now(), startedTs) },
  });
  const statusTimer = setInterval(() => {
    upsertIngestStatus(db, cfg.BROKER_ID, Date.now(), snapshot()).catch((err: unknown) =>
      log.debug("could not write broker status", { error: describeError(err) }),
    );
  }, 10_000);

  // every connection, plain or TLS, goes through the packet-size guard and the connection cap
  const maxRemaining = cfg.MQTT_MAX_PAYLOAD_BYTES + 1024; // payload plus topic and header fields
  const onSocket = (socket: net.Socket) => {
    // small packets (PUBACKs above all) go out at once: with Nagle's algorithm on, each waited
    // for the peer's delayed ACK, and one publisher got ~8,000 QoS 1 messages/s through an idle
    // broker instead of ~40,000 (npm run bench:ingest, part a)
    socket.setNoDelay(true);
    const conn = guardConnection(socket, maxRemaining, (bytes) => {
      stats.refused.oversized++;
      log.warn("connection closed: a packet announced over the size limit", { bytes, limit: maxRemaining });
    });
    broker.handle(conn);
  };
  const onDrop = () => {
    stats.refused.connections++;
    if (stats.refused.connections % 100 === 1) log.warn(`connection refused: ${cfg.MQTT_MAX_CONNECTIONS} connections open (MQTT_MAX_CONNECTIONS)`);
  };
  const servers: net.Server[] = [];
  const listen = async (server: net.Server, port: number, host: string) => {
    server.maxConnections = cfg.MQTT_MAX_CONNECTIONS;
    server.on("drop", onDrop);
    await new Promise<void>((resolve, reject) => {
      server.once("error", reject);
      server.listen(port, host, () => resolve());
    });
    servers.push(server);
  };
  await listen(net.createServer(onSocket), env.MQTT_PORT, "127.0.0.1");
  let tlsNote = "no TLS listener (MQTT_TLS_PORT=0)";
  if (cfg.MQTT_TLS_PORT > 0) {
    const files = tlsFiles(cfg);
    if (!fs.existsSync(files.cert) || !fs.existsSync(files.key)) {
      throw new Error(`MQTT_TLS_PORT is set but the certificate ${files.cert} or its key is missing; run scripts/tls.sh (npm run demo and npm test do)`);
    }
    const tlsServer = tls.createServer(
      { cert: fs.readFileSync(files.cert), key: fs.readFileSync(files.key), minVersion: "TLSv1.2", handshakeTimeout: 10_000 },
      onSocket,
    );
    tlsServer.on("tlsClientError", (err) => log.debug("TLS handshake failed", { error: describeError(err) }));
    await listen(tlsServer, cfg.MQTT_TLS_PORT, cfg.MQTT_TLS_HOST);
    tlsNote = `TLS on ${cfg.MQTT_TLS_HOST}:${cfg.MQTT_TLS_PORT}`;
  }
  const health = await startHealthServer(cfg.BROKER_HEALTH_PORT, () => snapshot());
  log.info(`listening on 127.0.0.1:${env.MQTT_PORT}, ${tlsNote} (health on 127.0.0.1:${cfg.BROKER_HEALTH_PORT}), ${credentials.size} devices known`);

  let stopping = false;
  async function stop(): Promise<void> {
    if (stopping) return;
    stopping = true;
    clearInterval(refreshTimer);
    clearInterval(statusTimer);
    for (const server of servers) server.close();
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
