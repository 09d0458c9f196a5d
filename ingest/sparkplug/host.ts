// The Sparkplug B host application inside the ingest worker (Sparkplug 3.0, "Operational
// Behavior"): its own MQTT connection (clean session, as the specification asks of a host) with
// a retained STATE birth on spBv1.0/STATE/<host id> and the matching STATE death as its will;
// subscribes to every group; decodes each message with sparkplug-payload; lets the pure state
// machine (lib/sparkplug/host-state.ts) judge it; then does what it says: mapped readings to the
// same writer as the JSON devices (acknowledged once committed), births, deaths and last values
// to the gateway tables, NCMD rebirth requests, refusals kept and counted per gateway. A node's
// death marks the Stillfield devices its metrics feed offline at once (their points go silent).
import mqtt, { type IPublishPacket, type MqttClient } from "mqtt";
import type { Db } from "../../db/client";
import type { Env } from "../../db/env";
import { listHostEdgeNodes, type HostEdgeNode } from "../../db/queries/gateways-auth";
import {
  countNodeEvents,
  insertGatewayRejections,
  listMappedMetrics,
  recordBirth,
  recordLastValues,
  recordNodeSkew,
  recordOffline,
  type NewGatewayRejection,
} from "../../db/queries/gateways-write";
import type { ReadingRow } from "../../db/queries/readings-write";
import { metricKey, SparkplugHostState, type DeviceClock, type HostEffects, type MetricMapping } from "../../lib/sparkplug/host-state";
import { hostStatePayload, hostStateSchema, parseSparkplugTopic, sparkplugTopics, type SpbMessageType } from "../../lib/sparkplug/topics";
import { DeferredAcks } from "../deferred-acks";
import type { Logger } from "../log";
import { describeError } from "../log";
import type { ReadingWriter } from "../writer";
import type { ClockSkewTracker } from "../../lib/clock-skew";
import { decodeSparkplug, encodeRebirthCommand } from "./decode";
import { LatestValues } from "./latest-values";

export type SparkplugHostDeps = {
  env: Env;
  db: Db;
  log: Logger;
  writer: ReadingWriter;
  clientId: string;
  /** the worker's service account (the host needs its rights on the Sparkplug namespace) */
  username: string;
  password: string;
  hostId: string;
  maxPayloadBytes: number;
  refreshMs: number;
  clocks: ClockSkewTracker;
  clockOf(deviceId: number): DeviceClock;
  oldestAcceptedMs(now: number): number;
  /** a Stillfield device fed by a gateway goes online or offline */
  setDeviceOnline(deviceId: number, online: boolean, now: number): void;
  countReadings(nodeCode: string, readings: number, now: number, deviceIds: Iterable<number>): void;
};

export type SparkplugHostStats = { messages: number; readings: number; rejected: number; rebirthRequests: number; seqGaps: number; staleDeaths: number };

const nodeKeyOf = (groupId: string, nodeId: string) => `${groupId}/${nodeId}`;

export async function startSparkplugHost(deps: SparkplugHostDeps) {
  const { db, log, env } = deps;
  const state = new SparkplugHostState();
  const stats: SparkplugHostStats = { messages: 0, readings: 0, rejected: 0, rebirthRequests: 0, seqGaps: 0, staleDeaths: 0 };
  let nodes = new Map<string, HostEdgeNode>();
  /** Stillfield devices fed by each node ("group/node") and by each of its devices ("group/node\0device") */
  let fedDevices = new Map<string, Set<number>>();
  let closing = false;

  async function reload(): Promise<void> {
    const [list, mapped] = await Promise.all([listHostEdgeNodes(db), listMappedMetrics(db)]);
    nodes = new Map(list.map((n) => [nodeKeyOf(n.groupId, n.nodeId), n]));
    const byId = new Map(list.map((n) => [n.id, n]));
    const mappings = new Map<string, MetricMapping>();
    const fed = new Map<string, Set<number>>();
    for (const m of mapped) {
      const n = byId.get(m.edgeNodeId);
      if (!n) continue;
      const key = nodeKeyOf(n.groupId, n.nodeId);
      mappings.set(metricKey(key, m.deviceName, m.name), m.mapping);
      for (const k of [key, `${key}\u0000${m.deviceName}`]) {
        let s = fed.get(k);
        if (!s) fed.set(k, (s = new Set()));
        s.add(m.mapping.targetDeviceId);
      }
    }
    state.setMappings(mappings);
    fedDevices = fed;
  }
  for (let attempt = 0; ; attempt++) {
    try {
      await reload();
      break;
    } catch (err) {
      if (attempt % 10 === 0) log.warn("sparkplug host waiting for the database", { error: describeError(err) });
      await new Promise((r) => setTimeout(r, 1000));
    }
  }

  // ---- writes, in order per node (a birth lands before the values that follow it) ----
  const chains = new Map<string, Promise<void>>();
  function inOrder(key: string, job: () => Promise<void>): void {
    const next = (chains.get(key) ?? Promise.resolve()).then(job).catch((err: unknown) => log.warn("could not record a gateway event", { node: key, error: describeError(err) }));
    chains.set(key, next);
    void next.then(() => {
      if (chains.get(key) === next) chains.delete(key);
    });
  }
  let pendingRejections: NewGatewayRejection[] = [];
  const pendingValues = new LatestValues();
  const pendingCounts = new Map<number, { rebirths: number; gaps: number; lastSeenTs: number }>();

  // ---- MQTT ----
  const stateTs = Date.now();
  const stateTopic = sparkplugTopics.state(deps.hostId);
  const client: MqttClient = mqtt.connect({
    host: env.MQTT_HOST,
    port: env.MQTT_PORT,
    protocolVersion: 4,
    clientId: deps.clientId,
    clean: true,
    username: deps.username,
    password: deps.password,
    keepalive: 30,
    reconnectPeriod: 1000,
    connectTimeout: 10_000,
    queueQoSZero: false,
    // mqtt.js's trace calls allocate their arguments even when off (as in ingest/worker.ts)
    log: () => undefined,
    will: { topic: stateTopic, payload: Buffer.from(hostStatePayload(false, stateTs)), qos: 1, retain: true },
  });
  const acks = new DeferredAcks(client);
  // PUBACKs of messages whose last share was released: one write per tick for all of them (a
  // commit releases the shares of hundreds of messages at once), never before the commit
  let ackQueue: Array<ReturnType<DeferredAcks["token"]>> = [];
  function ackLater(token: ReturnType<DeferredAcks["token"]>) {
    if (ackQueue.push(token) === 1) {
      process.nextTick(() => {
        const tokens = ackQueue;
        ackQueue = [];
        acks.ack(tokens);
      });
    }
  }

  function reject(node: HostEdgeNode | undefined, topic: string, reason: NewGatewayRejection["reason"], detail: string, now: number) {
    stats.rejected++;
    pendingRejections.push({ ts: now, edgeNodeId: node?.id ?? null, topic, reason, detail });
    if (pendingRejections.length > 1000) pendingRejections.splice(0, pendingRejections.length - 1000);
  }

  function askRebirth(t: { groupId: string; nodeId: string }, node: HostEdgeNode, now: number) {
    stats.rebirthRequests++;
    const c = pendingCounts.get(node.id) ?? { rebirths: 0, gaps: 0, lastSeenTs: now };
    c.rebirths++;
    pendingCounts.set(node.id, c);
    client.publish(sparkplugTopics.node(t.groupId, "NCMD", t.nodeId), Buffer.from(encodeRebirthCommand(now)), { qos: 0 });
    log.info("asked an edge node for a rebirth", { node: `${t.groupId}/${t.nodeId}` });
  }

  function apply(t: { groupId: string; nodeId: string; type: SpbMessageType }, topic: string, node: HostEdgeNode, fx: HostEffects, packet: IPublishPacket, now: number) {
    const key = nodeKeyOf(t.groupId, t.nodeId);
    for (const r of fx.rejections) reject(node, topic, r.reason, r.detail, now);
    if (fx.seqGap) {
      stats.seqGaps++;
      const c = pendingCounts.get(node.id) ?? { rebirths: 0, gaps: 0, lastSeenTs: now };
      c.gaps++;
      pendingCounts.set(node.id, c);
    }
    if (fx.staleDeath) {
      stats.staleDeaths++;
      log.info("ignored a death that does not match the node's session (bdSeq)", { node: key });
    }
    if (fx.rebirth) askRebirth(t, node, now);
    const c = pendingCounts.get(node.id) ?? { rebirths: 0, gaps: 0, lastSeenTs: now };
    c.lastSeenTs = now;
    pendingCounts.set(node.id, c);
    const bdSeq = state.bdSeqOf(key);
    for (const b of fx.births) inOrder(key, () => recordBirth(db, node.id, b.deviceName, b.metrics, now, bdSeq));
    for (const o of fx.online) {
      if (!o.online) inOrder(key, () => recordOffline(db, node.id, o.deviceName, now));
      const fed = fedDevices.get(o.deviceName === "" ? key : `${key}\u0000${o.deviceName}`);
      // a birth brings the node's (or device's) points back; a death silences them at once
      if (fed) for (const id of fed) deps.setDeviceOnline(id, o.online, now);
    }
    for (const v of fx.lastValues) pendingValues.set(node.id, v);
    if (fx.nodeOffsetMs !== null) deps.clocks.add(`node:${node.id}`, now, now - fx.nodeOffsetMs);
    for (const o of fx.deviceOffsets) deps.clocks.add(o.deviceId, now, now - o.offsetMs);

    const token = acks.token(packet);
    if (fx.readings.length === 0) {
      acks.ack([token]);
      return;
    }
    const byDevice = new Map<number, ReadingRow[]>();
    for (const r of fx.readings) {
      let rows = byDevice.get(r.deviceId);
      if (!rows) byDevice.set(r.deviceId, (rows = []));
      rows.push(r.historical ? { deviceId: r.deviceId, channel: r.channel, ts: r.ts, value: r.value, historical: true } : { deviceId: r.deviceId, channel: r.channel, ts: r.ts, value: r.value });
    }
    stats.readings += fx.readings.length;
    deps.countReadings(node.code, fx.readings.length, now, byDevice.keys());
    const shares = deps.writer.shareAck(byDevice.size, () => ackLater(token));
    let i = 0;
    for (const [deviceId, rows] of byDevice) deps.writer.add(deviceId, rows, shares[i++]);
  }

  function handlePacket(packet: IPublishPacket) {
    if (closing) return;
    const now = Date.now();
    const t = parseSparkplugTopic(packet.topic);
    const payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
    if (!t) return acks.ack([acks.token(packet)]);
    if (t.kind === "state") {
      // another session of ours (or a stale will) said we are offline while we are here: say otherwise
      if (t.hostId === deps.hostId) {
        const parsed = (() => {
          try {
            return hostStateSchema.safeParse(JSON.parse(payload.toString("utf8")));
          } catch {
            return null;
          }
        })();
        if (parsed?.success && !parsed.data.online) client.publish(stateTopic, hostStatePayload(true, stateTs), { qos: 1, retain: true });
      }
      return acks.ack([acks.token(packet)]);
    }
    if (t.type === "NCMD" || t.type === "DCMD") return acks.ack([acks.token(packet)]);
    stats.messages++;
    const key = nodeKeyOf(t.groupId, t.nodeId);
    const node = nodes.get(key);
    if (!node || !node.enabled) {
      reject(node, packet.topic, "unknown_edge_node", node ? "edge node disabled" : `no edge node "${key.slice(0, 100)}" registered`, now);
      return acks.ack([acks.token(packet)]);
    }
    if (payload.length > deps.maxPayloadBytes) {
      reject(node, packet.topic, "malformed_payload", `${payload.length} bytes, over the limit`, now);
      return acks.ack([acks.token(packet)]);
    }
    const decoded = decodeSparkplug(payload);
    if (!decoded.ok) {
      reject(node, packet.topic, "malformed_payload", decoded.error, now);
      return acks.ack([acks.token(packet)]);
    }
    const fx = state.handle(key, t.type, t.deviceId ?? "", decoded.payload, {
      arrivalMs: now,
      oldestAcceptedMs: deps.oldestAcceptedMs(now),
      clockOf: deps.clockOf,
    });
    apply(t, packet.topic, node, fx, packet, now);
  }

  client.handleMessage = (packet, callback) => {
    try {
      handlePacket(packet);
    } catch (err) {
      log.error("unexpected error handling a Sparkplug message", { topic: packet.topic, error: describeError(err) });
    }
    if (deps.writer.overBound(1)) deps.writer.waitForRoom(5000).then(() => callback());
    else callback();
  };
  client.on("connect", () => {
    log.info("sparkplug host connected", { hostId: deps.hostId });
    // subscribe first (every group, our own STATE included), then announce ourselves
    client.subscribe({ [sparkplugTopics.all]: { qos: 1 } }, (err) => {
      if (err) return log.error("sparkplug subscribe failed", { error: describeError(err) });
      client.publish(stateTopic, hostStatePayload(true, stateTs), { qos: 1, retain: true });
    });
  });
  client.on("error", (err) => log.error("sparkplug MQTT error", { error: describeError(err) }));

  // ---- periodic writes and reloads ----
  let busy = false;
  let failedFlushes = 0;
  async function flush(): Promise<void> {
    if (busy) return;
    busy = true;
    try {
      const rej = pendingRejections;
      pendingRejections = [];
      try {
        await insertGatewayRejections(db, rej);
      } catch (err) {
        pendingRejections = rej.concat(pendingRejections).slice(-1000);
        throw err;
      }
      const values = pendingValues.take();
      try {
        await Promise.all([...chains.values()]);
        await recordLastValues(db, values);
      } catch (err) {
        pendingValues.restore(values); // for the next flush, unless newer values came in meanwhile
        throw err;
      }
      const counts = [...pendingCounts];
      pendingCounts.clear();
      for (const [id, c] of counts) await countNodeEvents(db, id, c);
      for (const n of nodes.values()) {
        const skew = deps.clocks.skewMs(`node:${n.id}`);
        if (skew !== null) await recordNodeSkew(db, n.id, skew, Date.now());
      }
      failedFlushes = 0;
    } catch (err) {
      // a moment's refusal (the database restarting) is normal; one that lasts is said out loud
      failedFlushes += 1;
      if (failedFlushes === 5) log.warn("gateway state has not been stored for 5 s", { error: describeError(err) });
      else log.debug("could not store gateway state yet", { error: describeError(err) });
    } finally {
      busy = false;
    }
  }
  const flushTimer = setInterval(() => void flush(), 1000);
  const reloadTimer = setInterval(() => {
    reload().catch((err: unknown) => log.debug("could not reload edge nodes and mappings", { error: describeError(err) }));
  }, deps.refreshMs);

  return {
    stats,
    async stop(): Promise<void> {
      closing = true;
      clearInterval(flushTimer);
      clearInterval(reloadTimer);
      await Promise.race([flush(), new Promise((r) => setTimeout(r, 1000).unref())]);
      // a clean disconnect sends no will: say we are going offline ourselves
      await new Promise<void>((resolve) => {
        const t = setTimeout(resolve, 1500).unref();
        if (!client.connected) {
          client.end(true, {}, () => resolve());
          return;
        }
        client.publish(stateTopic, hostStatePayload(false, stateTs), { qos: 1, retain: true }, () => {
          client.end(false, {}, () => {
            clearTimeout(t);
            resolve();
          });
        });
      });
    },
  };
}
