// The ingest worker, its own process. Subscribes (persistent session, QoS 1, service account)
// to every device's readings and status; validates each message against the device contract
// (lib/contract); batches accepted readings into MariaDB with their rollups (writer.ts); and
// acknowledges a message only once its readings are committed or spilled, so a crash loses
// nothing the broker still holds. Also: per-line/hall live snapshots on internal topics, device
// online/offline and last-seen, rejections kept for diagnosis, counters on
// GET http://127.0.0.1:WORKER_HEALTH_PORT/health (?sinceMs= narrows the freshness window) and
// in `ingest_status`, partition maintenance, and the reading sinks of ingest/sinks.ts.
// SIGTERM/SIGINT: stop taking messages, commit or spill what is buffered, then exit.
import path from "node:path";
import mqtt, { type IPublishPacket, type MqttClient } from "mqtt";
import { closeDb, getDb, getPool } from "../db/client";
import { getEnv } from "../db/env";
import { recordDevicesLastSeen, setDeviceOnline, type IngestDevice } from "../db/queries/devices-auth";
import { insertRejections, trimRejections, upsertIngestStatus, REJECTIONS_KEPT, type NewRejection } from "../db/queries/ingest-diagnostics";
import type { ReadingRow } from "../db/queries/readings-write";
import {
  checkReadingSets,
  deviceStatusSchema,
  parseDevicePayload,
  type RejectionReason,
} from "../lib/contract/readings-payload";
import { deviceTopicReader, internalTopics } from "../lib/contract/topics";
import type { DeviceStatusChange } from "../lib/live";
import { SERVICE_ACCOUNTS } from "../lib/settings";
import { getIngestConfig } from "./config";
import { DeferredAcks, type AckToken } from "./deferred-acks";
import { DeviceDirectory } from "./device-directory";
import { ingestProtocol, subscribeIngest } from "./ingest-subscriptions";
import { startHealthServer } from "./health-server";
import { LiveSnapshots } from "./live-snapshots";
import { createLogger, describeError } from "./log";
import { oldestAcceptedMs, runRetention } from "./retention";
import { SinkRunner } from "./sink-runner";
import type { CommittedReading, SinkContext } from "./sinks";
import { sinkFactories } from "./sink-registry";
import { SpillStore } from "./spill";
import { WorkerCounters } from "./stats";
import { ReadingWriter } from "./writer";
import { DeviceClocks } from "./device-clocks";
import { startSparkplugFromEnv } from "./sparkplug/start";

const log = createLogger("worker");
const PAYLOAD_KEPT_CHARS = 500;
const utf8 = new TextDecoder("utf-8");
const noTrace = () => undefined;

export async function startWorker() {
  const env = getEnv();
  const cfg = getIngestConfig();
  const pool = getPool();
  const db = getDb();
  const counters = new WorkerCounters(cfg.INGEST_CLIENT_ID, cfg.ALERTS_RUNNER === "off" ? "off" : cfg.ALERTS_OWNER);
  const directory = new DeviceDirectory(db, log);
  let closing = false;

  // the device list is needed to validate anything: wait for the database at start
  for (let attempt = 0; !(await directory.reload()); attempt++) {
    if (attempt % 10 === 0) log.warn("waiting for the database to load the device list");
    await new Promise((r) => setTimeout(r, 1000));
  }
  // device clocks too: nothing may be awaited between the MQTT client's creation and its handlers
  const clocks = new DeviceClocks();
  await clocks.reload(db).catch((err: unknown) => log.warn("could not load device clocks yet", { error: describeError(err) }));

  try {
    const report = await runRetention(pool, db, { retentionDays: env.RAW_RETENTION_DAYS });
    if (report.created.length || report.dropped.length) log.info("partitions maintained", report);
  } catch (err) {
    log.warn("partition maintenance failed; will retry", { error: describeError(err) });
  }

  // the MQTT connection is made once everything is ready (below); sinks may publish through it
  let client: MqttClient | null = null;
  const publish = (topic: string, payload: string, qos: 0 | 1 = 0) => {
    if (client?.connected) client.publish(topic, payload, { qos });
  };

  // ---- sinks ----
  const sinkCtx: SinkContext = { pool, db, env, log, publish };
  const sinks: SinkRunner[] = [];
  for (const factory of sinkFactories) {
    try {
      const sink = await factory(sinkCtx);
      sinks.push(new SinkRunner(sink, createLogger(`sink:${sink.name}`), counters));
      log.info(`sink ${sink.name} started`);
    } catch (err) {
      log.error("a reading sink failed to start; ingest goes on without it", { error: describeError(err) });
    }
  }

  // ---- MQTT (every handler is attached in this same tick, before any packet can arrive) ----
  client = mqtt.connect({
    host: env.MQTT_HOST,
    port: env.MQTT_PORT,
    ...ingestProtocol(cfg),
    clientId: cfg.INGEST_CLIENT_ID,
    clean: false,
    username: SERVICE_ACCOUNTS.worker,
    password: env.MQTT_WORKER_PASSWORD,
    keepalive: 30,
    reconnectPeriod: 1000,
    connectTimeout: 10_000,
    queueQoSZero: false,
    // mqtt.js's own trace calls (a dozen per message) allocate their arguments even when
    // tracing is off: at tens of thousands of messages a second that was a sixth of all the
    // worker allocated (scripts/bench-ingest.ts, part (b)); our logger says what matters
    log: noTrace,
  });
  const mqttClient = client;
  const acks = new DeferredAcks(mqttClient);

  // ---- writer ----
  const live = new LiveSnapshots(directory);
  // per database and worker: a demo and a test stack may share the data folder
  const spill = new SpillStore(path.resolve(env.DATA_DIR, "spill", env.DB_NAME, cfg.INGEST_CLIENT_ID));
  const writer = new ReadingWriter(
    pool,
    spill,
    {
      flushMs: cfg.INGEST_FLUSH_MS,
      flushRows: cfg.INGEST_FLUSH_ROWS,
      lanes: cfg.INGEST_LANES,
      memoryMaxReadings: cfg.INGEST_MEMORY_MAX_READINGS,
      maxUnacked: cfg.INGEST_MAX_UNACKED,
      retryMaxMs: cfg.INGEST_RETRY_MAX_MS,
      journal: cfg.ALERTS_OWNER === "lease",
    },
    {
      ack: (tokens) => {
        // MQTT acknowledgements of the JSON connection, and shares of Sparkplug ones
        const own: AckToken[] = [];
        for (const t of tokens) {
          if (t === null) continue;
          if ("release" in t) t.release();
          else own.push(t);
        }
        acks.ack(own);
      },
      committed: (rows, source) => onCommitted(rows, source),
      log,
      counters,
    },
  );

  function onCommitted(rows: ReadingRow[], _source: "live" | "replay") {
    live.add(rows);
    if (sinks.length === 0) return;
    const readings: CommittedReading[] = [];
    for (const r of rows) {
      const d = directory.getById(r.deviceId);
      readings.push({ deviceId: r.deviceId, deviceCode: d?.code ?? String(r.deviceId), channel: r.channel, ts: r.ts, value: r.value, historical: r.historical === true });
    }
    // per device in reading-time order (usually already so: skip the sort then)
    const order = (a: CommittedReading, b: CommittedReading) =>
      a.deviceId - b.deviceId || a.ts - b.ts || (a.channel < b.channel ? -1 : a.channel > b.channel ? 1 : 0);
    let sorted = true;
    for (let i = 1; i < readings.length && sorted; i++) if (order(readings[i - 1], readings[i]) > 0) sorted = false;
    if (!sorted) readings.sort(order);
    for (const s of sinks) s.pushBatch(readings);
  }

  // ---- rejections ----
  let pendingRejections: NewRejection[] = [];
  let lastRejectionLog = 0;
  function reject(code: string | null, reason: RejectionReason, detail: string, payload: Uint8Array | string, now: number) {
    counters.countRejection(code, reason, now);
    const text = typeof payload === "string" ? payload : utf8.decode(payload.subarray(0, PAYLOAD_KEPT_CHARS * 4));
    pendingRejections.push({ ts: now, deviceCode: code, reason, detail, payload: text.slice(0, PAYLOAD_KEPT_CHARS) });
    if (pendingRejections.length > REJECTIONS_KEPT) pendingRejections.splice(0, pendingRejections.length - REJECTIONS_KEPT);
    if (now - lastRejectionLog > 2000) {
      lastRejectionLog = now;
      log.info("message rejected", { device: code, reason, detail });
    }
  }

  // ---- devices: online/offline and last seen ----
  const lastSeen = new Map<number, number>();
  const pendingOnline = new Map<number, boolean>();
  function changeOnline(device: IngestDevice, online: boolean, now: number) {
    if (online) lastSeen.set(device.id, now);
    if (device.online === online) return;
    directory.setOnline(device.id, online);
    pendingOnline.set(device.id, online);
    const change: DeviceStatusChange = { v: 1, deviceId: device.id, code: device.code, online, ts: now };
    publish(internalTopics.devices, JSON.stringify(change), 1);
    void writeOnline();
  }
  function handleStatus(code: string, payload: Buffer, now: number) {
    const device = directory.get(code);
    if (!device) return;
    let online: boolean;
    try {
      const parsed = deviceStatusSchema.safeParse(JSON.parse(payload.toString("utf8")));
      if (!parsed.success) {
        reject(code, "invalid_shape", "status: expected {\"online\": true|false}", payload, now);
        return;
      }
      online = parsed.data.online;
    } catch {
      reject(code, "malformed_json", "status message is not valid JSON", payload, now);
      return;
    }
    changeOnline(device, online, now);
  }
  async function writeOnline() {
    for (const [id, online] of [...pendingOnline]) {
      try {
        await setDeviceOnline(db, id, online);
        if (pendingOnline.get(id) === online) pendingOnline.delete(id);
      } catch (err) {
        log.debug("could not record a device's online state yet", { error: describeError(err) });
        return;
      }
    }
  }

  // ---- messages ----
  function acceptReadings(device: IngestDevice, payload: Buffer, ack: AckToken | null, now: number) {
    if (!device.enabled) {
      reject(device.code, "device_disabled", "device is disabled", payload, now);
      acks.ack([ack]);
      return;
    }
    const parsed = parseDevicePayload(payload);
    if (!parsed.ok) {
      reject(device.code, parsed.rejection.reason, parsed.rejection.detail, payload, now);
      acks.ack([ack]);
      return;
    }
    // clock skew from the newest reading; shifted onto the server clock where the engineer chose so
    let newest = -Infinity;
    for (const set of parsed.sets) newest = Math.max(newest, typeof set.ts === "number" ? set.ts : Date.parse(set.ts));
    let sets = parsed.sets;
    if (Number.isFinite(newest)) {
      const timeOf = clocks.observe(device.id, now, newest);
      if (clocks.clockOf(device.id).source === "arrival") sets = sets.map((set) => ({ ...set, ts: timeOf(typeof set.ts === "number" ? set.ts : Date.parse(set.ts)) }));
    }
    const checked = checkReadingSets(sets, {
      deviceKind: device.kind,
      nowMs: now,
      oldestAcceptedMs: oldestAcceptedMs(now, env.RAW_RETENTION_DAYS),
    });
    for (const r of checked.rejections) {
      reject(device.code, r.reason, r.count > 1 ? `${r.detail} (and ${r.count - 1} more)` : r.detail, payload, now);
    }
    if (checked.readings.length === 0) {
      acks.ack([ack]);
      return;
    }
    const rows: ReadingRow[] = new Array(checked.readings.length);
    for (let i = 0; i < rows.length; i++) {
      const r = checked.readings[i];
      rows[i] = { deviceId: device.id, channel: r.channel, ts: r.ts, value: r.value };
    }
    counters.countMessage(device.code, rows.length, now);
    lastSeen.set(device.id, now);
    writer.add(device.id, rows, ack);
  }

  const topicOf = deviceTopicReader();
  function handlePacket(packet: IPublishPacket) {
    const ack = acks.token(packet);
    // while stopping, leave messages unacknowledged: the broker keeps them for the next session
    if (closing) return;
    const now = Date.now();
    const payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
    const topic = topicOf(packet.topic);
    if (!topic || topic.kind === "cmd") {
      acks.ack([ack]);
      return;
    }
    if (topic.kind === "status") {
      handleStatus(topic.code, payload, now);
      acks.ack([ack]);
      return;
    }
    if (payload.length > cfg.MQTT_MAX_PAYLOAD_BYTES) {
      reject(topic.code, "oversized", `${payload.length} bytes`, payload.subarray(0, PAYLOAD_KEPT_CHARS), now);
      acks.ack([ack]);
      return;
    }
    const device = directory.get(topic.code);
    if (device) {
      acceptReadings(device, payload, ack, now);
      return;
    }
    directory.lookup(topic.code).then(
      (found) => {
        if (found) acceptReadings(found, payload, ack, Date.now());
        else {
          reject(topic.code, "unknown_device", "no device with this code", payload, Date.now());
          acks.ack([ack]);
        }
      },
      (err: unknown) => log.error("device look-up failed", { error: describeError(err) }),
    );
  }

  mqttClient.handleMessage = (packet, callback) => {
    try {
      handlePacket(packet);
    } catch (err) {
      // never stop on one message; it stays unacknowledged and comes back on the next session
      log.error("unexpected error handling a message", { topic: packet.topic, error: describeError(err) });
    }
    // back-pressure: while the database is slower than the broker, take the next message only
    // when the writer has room (TCP flow control holds the rest at the broker)
    if (writer.overBound(1)) writer.waitForRoom(5000).then(() => callback());
    else callback();
  };

  let subscribed: () => void = () => undefined;
  const firstSubscription = new Promise<void>((resolve) => (subscribed = resolve));
  const onConnect = (sessionPresent: boolean) => {
    counters.mqttConnected = true;
    log.info(`connected to the broker at ${env.MQTT_HOST}:${env.MQTT_PORT}`, { sessionPresent });
    subscribeIngest(mqttClient, cfg, sessionPresent, (err, granted) => {
      if (err) return log.error("subscribe failed", { error: describeError(err) });
      if (granted?.some((g) => g.qos >= 128)) log.error("the broker refused a subscription", { granted });
      subscribed();
    });
  };
  mqttClient.on("connect", (connack) => {
    // acknowledgements leave right after each commit, not held back by Nagle's algorithm
    (mqttClient.stream as unknown as { setNoDelay?: (on: boolean) => void }).setNoDelay?.(true);
    onConnect(connack.sessionPresent);
  });
  // the client was created before the sinks and the directory were ready: when it signed in
  // meanwhile, its first "connect" has already passed and nobody subscribed
  if (mqttClient.connected) onConnect(false);
  mqttClient.on("close", () => {
    if (counters.mqttConnected && !closing) log.warn("lost the broker connection; reconnecting");
    counters.mqttConnected = false;
  });
  mqttClient.on("error", (err) => log.error("MQTT error", { error: describeError(err) }));

  // ---- timers ----
  const snapshot = (lagSinceTs?: number) =>
    counters.snapshot({ bufferedReadings: writer.bufferedReadings, unackedMessages: writer.unackedMessages, lagSinceTs });

  let rejectionsBusy = false;
  let rejectionsSinceTrim = 0;
  async function flushRejections() {
    if (rejectionsBusy || pendingRejections.length === 0) return;
    rejectionsBusy = true;
    const batch = pendingRejections;
    pendingRejections = [];
    try {
      await insertRejections(db, batch);
      rejectionsSinceTrim += batch.length;
    } catch (err) {
      pendingRejections = batch.concat(pendingRejections).slice(-REJECTIONS_KEPT);
      log.debug("could not store rejections yet", { error: describeError(err) });
    } finally {
      rejectionsBusy = false;
    }
  }

  const liveTimer = setInterval(() => {
    const now = Date.now();
    for (const { topic, snapshot: s } of live.take(now)) publish(topic, JSON.stringify(s));
    for (const s of sinks) s.pushTick(now);
    void flushRejections();
  }, cfg.INGEST_LIVE_INTERVAL_MS);

  let statusBusy = false;
  async function writeStatus() {
    if (statusBusy) return;
    statusBusy = true;
    try {
      const seen = new Map(lastSeen);
      lastSeen.clear();
      try {
        await recordDevicesLastSeen(db, seen);
      } catch (err) {
        for (const [id, ts] of seen) if ((lastSeen.get(id) ?? 0) < ts) lastSeen.set(id, ts);
        throw err;
      }
      await writeOnline();
      await clocks.flush(db, Date.now());
      await upsertIngestStatus(db, cfg.INGEST_CLIENT_ID, Date.now(), snapshot());
      if (rejectionsSinceTrim > 0) {
        rejectionsSinceTrim = 0;
        await trimRejections(db);
      }
    } catch (err) {
      log.debug("could not write status yet", { error: describeError(err) });
    } finally {
      statusBusy = false;
    }
  }
  const statusTimer = setInterval(() => void writeStatus(), cfg.INGEST_STATUS_INTERVAL_MS);

  const refreshTimer = setInterval(async () => {
    if (await directory.reload()) for (const [id, online] of pendingOnline) directory.setOnline(id, online);
    await clocks.reload(db).catch((err: unknown) => log.debug("could not reload device clocks", { error: describeError(err) }));
  }, cfg.INGEST_DEVICE_REFRESH_MS);

  const maintenanceTimer = setInterval(() => {
    runRetention(pool, db, { retentionDays: env.RAW_RETENTION_DAYS })
      .then((report) => {
        if (report.created.length || report.dropped.length) log.info("partitions maintained", report);
      })
      .catch((err: unknown) => log.warn("partition maintenance failed", { error: describeError(err) }));
  }, cfg.INGEST_MAINTENANCE_INTERVAL_MS);

  // ---- Sparkplug B host application (its own connection; same writer, clocks and devices) ----
  const sparkplug = await startSparkplugFromEnv({
    env,
    db,
    log: createLogger("sparkplug"),
    writer,
    ingestClientId: cfg.INGEST_CLIENT_ID,
    // the same service account as the JSON connection
    username: String(mqttClient.options.username ?? ""),
    password: String(mqttClient.options.password ?? ""),
    maxPayloadBytes: cfg.MQTT_MAX_PAYLOAD_BYTES,
    refreshMs: cfg.INGEST_DEVICE_REFRESH_MS,
    clocks,
    oldestAcceptedMs: (now) => oldestAcceptedMs(now, env.RAW_RETENTION_DAYS),
    setDeviceOnline(deviceId, online, now) {
      const d = directory.getById(deviceId);
      if (d) changeOnline(d, online, now);
    },
    countReadings(code, n, now, deviceIds) {
      counters.countMessage(code, n, now);
      for (const id of deviceIds) lastSeen.set(id, now);
    },
  });

  // spill files left by an earlier run
  if (spill.list().length > 0) void writer.replay();

  await firstSubscription;
  const health = await startHealthServer(env.WORKER_HEALTH_PORT, (url) => {
    const since = Number(url.searchParams.get("sinceMs"));
    return snapshot(Number.isFinite(since) && since > 0 ? since : undefined);
  });
  log.info(`ingesting; health on 127.0.0.1:${env.WORKER_HEALTH_PORT}`, { devices: directory.size, sinks: sinks.length });

  async function stop(): Promise<void> {
    if (closing) return;
    closing = true;
    clearInterval(liveTimer);
    clearInterval(statusTimer);
    clearInterval(refreshTimer);
    clearInterval(maintenanceTimer);
    await sparkplug?.stop();
    await writer.drain(5000);
    for (const { topic, snapshot: s } of live.take(Date.now())) publish(topic, JSON.stringify(s));
    await Promise.race([Promise.all([flushRejections(), writeStatus()]), new Promise((r) => setTimeout(r, 1000).unref())]);
    await Promise.all(sinks.map((s) => s.close(1000)));
    await new Promise<void>((resolve) => {
      const t = setTimeout(resolve, 1500).unref();
      mqttClient.end(false, {}, () => {
        clearTimeout(t);
        resolve();
      });
    });
    health.close();
    await closeDb().catch(() => undefined);
    log.info("stopped", { committed: counters.committedReadings, spilled: counters.spilledReadings });
  }

  return { stop, counters, writer };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  let stopRequested = false;
  let stopFn: (() => Promise<void>) | null = null;
  const onSignal = (sig: string) => {
    if (stopRequested) return;
    stopRequested = true;
    log.info(`${sig}: flushing, then stopping`);
    if (!stopFn) process.exit(0);
    stopFn()
      .then(() => process.exit(0))
      .catch((err: unknown) => {
        log.error("stop failed", { error: describeError(err) });
        process.exit(1);
      });
  };
  process.on("SIGTERM", () => onSignal("SIGTERM"));
  process.on("SIGINT", () => onSignal("SIGINT"));
  startWorker()
    .then(({ stop }) => {
      stopFn = stop;
      if (stopRequested) {
        stopRequested = false;
        onSignal("SIGTERM");
      }
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
