// Scale benchmark on the Mosquitto profile (npm run bench:scale; not part of npm test). Starts a
// private MariaDB, the private Mosquitto (ingest/mosquitto/run.ts) and ingest workers (the
// production entry points, as child processes) against a seeded scratch database, and measures:
//   (a) the bare broker: 8 publishers → one subscriber, QoS 1, one reading per message;
//   (b) end to end with 1, 2 and 3 workers (MQTT 5 shared subscription, one reading per message,
//       QoS 1): readings/s until all are committed, and CPU µs per reading of each process;
//   (c) drill: 2 workers; kill -9 one of them at 30 % of the stream (restarted 2 s later, as the
//       supervisor would) and restart Mosquitto at 60 % (BENCH_DRILL=kill|restart for one of
//       them; BENCH_RESTART_AT=0.3,0.6,… for more restarts): every reading the broker
//       acknowledged is stored once (lost: acknowledged but not stored, told apart by when the
//       broker acknowledged it; duplicated: rollup counts above the raw rows);
//   (d) drill: kill -9 the alert owner during a charge excursion: the new owner's delay, the
//       excursion's alert raised once and its first e-mail queued once per on-call person.
//   (e) drill: stop the read replica (a primary and GTID replica of their own,
//       scripts/bench-scale-replica.ts): the 7-day chart still answers, from the primary.
// Last line:
//   scale: 1 worker <N>/s, 2 workers <N>/s, 3 workers <N>/s, bare <N>/s, lost <n>, duplicated <n>, duplicate alerts <n>, owner failover <S> s
// Options: --messages (200000 per round, after a tenth as much untimed) --bare (60000) --drill (30000)
import { parseArgs } from "node:util";
import mqtt, { type MqttClient } from "mqtt";
import { z } from "zod";
import { getAlertingSettings, saveAlertingSettings } from "../db/queries/oncall";
import { readDeviceSecrets } from "../db/seed";
import { hashDeviceSecret } from "../lib/device-secrets";
import { createTestDatabase } from "../tests/helpers/test-db";
import { getJson, waitFor } from "../tests/integration/ingest-support/processes";
import { startPrivateMariadb, withDbPort, type PrivateMariadb } from "../tests/integration/ingest-support/private-mariadb";
import { ensureMosquitto, startMosquittoStack, type MosquittoStack } from "../tests/integration/mosquitto-support/stack";
import { cpuMs, describeLost, publishStream, type Ack, type Publisher, type RestartWindow } from "./bench-scale-parts";
import { replicaDrill } from "./bench-scale-replica";

const { values: argv } = parseArgs({ options: { messages: { type: "string" }, bare: { type: "string" }, drill: { type: "string" } }, strict: true });
const opts = z
  .object({ messages: z.coerce.number().int().min(1000).default(200_000), bare: z.coerce.number().int().min(1000).default(60_000), drill: z.coerce.number().int().min(1000).default(30_000) })
  .parse({ messages: argv.messages, bare: argv.bare, drill: argv.drill });
const log = (s: string) => process.stdout.write(`${s}\n`);
const DEVICES = 8;
const LEASE = { ALERTS_OWNER: "lease", ALERTS_SNAPSHOT_EVERY_MS: "2000", LOG_LEVEL: process.env.BENCH_VERBOSE ? "info" : "warn" };

/** Readings the workers say they committed (stored or found stored already), summed. */
async function committed(s: MosquittoStack, ids: number[]): Promise<number> {
  const stats = await Promise.all(ids.map((i) => s.workerStats(i)));
  return stats.reduce((n, st) => n + st.committed.readings + st.committed.duplicates, 0);
}

async function main() {
  if (!ensureMosquitto()) throw new Error("mosquitto is not installed (scripts/ensure-system.sh --mosquitto)");
  let mdb: PrivateMariadb | null = null;
  let stack: MosquittoStack | null = null;
  const publishers: MqttClient[] = [];
  const cleanup = async () => {
    await Promise.all(publishers.map((c) => c.endAsync().catch(() => undefined)));
    await stack?.stop().catch(() => undefined);
    await mdb?.destroy().catch(() => undefined);
  };
  process.once("SIGINT", () => void cleanup().then(() => process.exit(130)));
  try {
    log("bench:scale: a private MariaDB, the private Mosquitto and ingest workers …");
    mdb = await startPrivateMariadb("scale", { bufferPoolMb: 512 });
    const tdb = await withDbPort(mdb.port, () => createTestDatabase("scale", { seed: true }));
    const q = async (sql: string, args: unknown[] = []) => (await tdb.pool.query<import("mysql2").RowDataPacket[]>(sql, args))[0];
    // e-mails for medium alerts a few seconds after they are raised (the drill waits for them)
    await saveAlertingSettings(tdb.db, { ...(await getAlertingSettings(tdb.db)), notifyAfterS: 5 }, null);
    const lineId = Number((await q("SELECT id FROM `lines` ORDER BY id LIMIT 1"))[0].id);
    const devices = Array.from({ length: DEVICES }, (_, i) => ({ code: `bench-scale-${i + 1}`, secret: `bench-scale-secret-${i + 1}-0123456789` }));
    for (const d of devices) {
      await q("INSERT INTO devices (code, kind, label, secret_hash, line_id, created_at) VALUES (?, 'field_meter', ?, ?, ?, ?)", [d.code, d.code, hashDeviceSecret(d.secret), lineId, Date.now()]);
    }
    stack = await startMosquittoStack("scale", { ...tdb.env, DB_PORT: String(mdb.port), DB_USER: "stillfield", DB_PASSWORD: "stillfield-local" }, { env: { ...LEASE, DB_POOL_SIZE: "10" } });
    const s = stack;
    const brokerPid = Number(((await getJson(`http://127.0.0.1:${s.brokerHealthPort}/health`)) as { pid: number }).pid);
    // refused at sign-in (for a moment after a broker restart: ingest/mosquitto/device-gate.ts), a device tries again
    const connectDevice = (d: (typeof devices)[number]) =>
      mqtt.connectAsync({ host: "127.0.0.1", port: s.mqttPort, username: d.code, password: d.secret, clientId: d.code, protocolVersion: 5, reconnectPeriod: 500, clean: true, reconnectOnConnackError: true });
    for (const d of devices) publishers.push(await connectDevice(d));
    const pubs: Publisher[] = devices.map((d, i) => ({ client: publishers[i], code: d.code }));
    let nextTs = Date.now() - 6 * 3600_000; // unique reading times across rounds, well inside retention
    const takeTs = (n: number) => {
      const from = nextTs;
      nextTs += n * 10 + 1000;
      return from;
    };
    const benchIds = `(SELECT id FROM devices WHERE code LIKE 'bench-scale-%')`;
    const stored = async () => Number((await q(`SELECT COUNT(*) AS n FROM readings WHERE device_id IN ${benchIds}`))[0].n);

    // (a) bare broker: a plain subscriber (svc-worker), no workers
    const sub = await mqtt.connectAsync({ host: "127.0.0.1", port: s.mqttPort, username: "svc-worker", password: s.env.MQTT_WORKER_PASSWORD, clientId: "bench-bare", protocolVersion: 5, clean: true });
    let got = 0;
    sub.on("message", () => got++);
    await sub.subscribeAsync("stillfield/d/+/readings", { qos: 1 });
    const cpu0 = cpuMs(brokerPid);
    const bareStart = Date.now();
    await publishStream(pubs, opts.bare, takeTs(opts.bare / DEVICES), () => undefined);
    await waitFor("the bare subscriber", async () => got >= opts.bare, 60_000, 20);
    const bareRate = opts.bare / ((Date.now() - bareStart) / 1000);
    log(`(a) bare broker, ${DEVICES} publishers → 1 subscriber, QoS 1: ${Math.round(bareRate)} msgs/s; mosquitto ${Math.round(((cpuMs(brokerPid) - cpu0) * 1000) / opts.bare)} µs CPU per message`);
    await sub.endAsync();
    // the bare round's readings are not in the database: only what the workers store is counted below
    await new Promise((r) => setTimeout(r, 500));

    // (b) 1, 2, 3 workers
    const rates: number[] = [];
    for (const workers of [1, 2, 3]) {
      for (let i = 1; i <= workers; i++) if (!s.workers.get(i) || s.workers.get(i)!.child.exitCode !== null) await s.startWorker(i, LEASE);
      // a warm-up stream first, not timed: a worker just started has its subscription in place
      // and its code compiled before the clock runs (a cold worker costs twice the CPU per reading)
      const warm = Math.round(opts.messages / 10);
      const beforeWarm = await stored();
      await publishStream(pubs, warm, takeTs(warm / DEVICES), () => undefined);
      await waitFor("the warm-up stored", async () => (await stored()) - beforeWarm >= warm, 180_000, 100);
      const before = beforeWarm + warm;
      // timed by the workers' own commit counters, polled every 20 ms: counting rows in MariaDB
      // while it is being written to would load it more in each later round
      const ids = [...Array(workers).keys()].map((k) => k + 1);
      const committedBefore = await committed(s, ids);
      const pids = [...s.workers.entries()].filter(([i]) => i <= workers).map(([i, p]) => ({ name: `worker-${i}`, pid: p.child.pid }));
      const procs = [{ name: "mosquitto", pid: brokerPid }, { name: "mariadb", pid: mdb.pid() }, ...pids];
      const cpuBefore = procs.map((p) => cpuMs(p.pid));
      const t0 = Date.now();
      await publishStream(pubs, opts.messages, takeTs(opts.messages / DEVICES), () => undefined);
      await waitFor("every reading committed", async () => (await committed(s, ids)) - committedBefore >= opts.messages, 180_000, 20);
      const rate = opts.messages / ((Date.now() - t0) / 1000);
      rates.push(rate);
      const inDb = (await stored()) - before;
      if (inDb !== opts.messages) throw new Error(`round of ${workers} workers: ${opts.messages} readings sent, ${inDb} in the database`);
      const cpu = procs.map((p, k) => `${p.name} ${Math.round(((cpuMs(p.pid) - cpuBefore[k]) * 1000) / opts.messages)}`).join(", ");
      log(`(b) ${workers} worker${workers > 1 ? "s" : ""}: ${Math.round(rate)} readings/s end to end (${opts.messages} messages, one reading each, QoS 1); CPU µs per reading: ${cpu}`);
    }
    // back to 2 workers: the third's session is ended so the broker stops routing a share to it
    await s.workers.get(3)!.stop("SIGTERM");
    const drop = await mqtt.connectAsync({ host: "127.0.0.1", port: s.mqttPort, username: "svc-worker", password: s.env.MQTT_WORKER_PASSWORD, clientId: "mq-scale-3", protocolVersion: 5, clean: true, properties: { sessionExpiryInterval: 0 } });
    await drop.endAsync();

    // (c) kill -9 a worker and restart Mosquitto mid-stream
    const acks = new Map<string, Ack>(); // "<device>|<ts>" → when and how the broker acknowledged it
    const windows: RestartWindow[] = [];
    const drillFrom = takeTs(opts.drill / DEVICES);
    let killed = false;
    // BENCH_RESTART_AT: where Mosquitto is restarted, as fractions of the acknowledged stream
    const restartAt = (process.env.BENCH_RESTART_AT ?? "0.6").split(",").map(Number);
    let restarting = false;
    // BENCH_OBSERVE=1: a plain (not shared) subscriber tells a reading the broker routed nowhere
    // from one lost after it (it also hides "no matching subscribers": there always is one)
    const seen = new Set<string>();
    const observer = process.env.BENCH_OBSERVE !== "1" ? null : await mqtt.connectAsync({ host: "127.0.0.1", port: s.mqttPort, username: "svc-worker", password: s.env.MQTT_WORKER_PASSWORD, clientId: "bench-observer", protocolVersion: 5, clean: false, reconnectPeriod: 300, properties: { sessionExpiryInterval: 3600 } });
    if (observer) {
      const oneReading = z.object({ ts: z.number() });
      observer.on("message", (topic, payload) => {
        const r = oneReading.safeParse(JSON.parse(payload.toString()));
        if (r.success) seen.add(`${topic.split("/")[2]}|${r.data.ts}`);
      });
      await observer.subscribeAsync("stillfield/d/+/readings", { qos: 1 });
      publishers.push(observer);
    }
    const before = await stored();
    const drill = publishStream(pubs, opts.drill, drillFrom, (code, ts, reasonCode) => acks.set(`${code}|${ts}`, { at: Date.now(), reasonCode }), async (sent) => {
      if (!killed && process.env.BENCH_DRILL !== "restart" && sent >= opts.drill * 0.3) {
        killed = true;
        s.workers.get(1)!.child.kill("SIGKILL");
        log("(c) kill -9 worker 1 at 30 % of the stream; restarted in 2 s");
        setTimeout(() => void s.startWorker(1, LEASE), 2000);
      }
      if (!restarting && windows.length < restartAt.length && process.env.BENCH_DRILL !== "kill" && acks.size >= opts.drill * restartAt[windows.length]) {
        restarting = true;
        log(`(c) restarting Mosquitto at ${Math.round(restartAt[windows.length] * 100)} % of the stream`);
        const w: RestartWindow = { begin: Date.now(), back: Infinity };
        windows.push(w);
        await s.restartBroker();
        w.back = Date.now(); // the runner's first credential sync: after the repair, devices let in
        restarting = false;
      }
    });
    const { unacked, errors, lastError } = await drill;
    if (errors) log(`(c) ${errors} publishes failed and were sent again (last: ${lastError})`);
    if (unacked) log(`(c) ${unacked} readings never acknowledged by the broker (the stream stalled)`);
    await waitFor("the drill's readings", async () => (await stored()) - before >= acks.size, 120_000, 200).catch(() => undefined);
    await new Promise((r) => setTimeout(r, 2000));
    const rows = await q(`SELECT d.code, r.ts FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.code LIKE 'bench-scale-%' AND r.ts >= ?`, [drillFrom]);
    const have = new Set(rows.map((r) => `${String(r.code)}|${Number(r.ts)}`));
    const missing = [...acks.keys()].filter((k) => !have.has(k));
    const lost = missing.length;
    for (const [i, w] of windows.entries()) {
      const when = process.env.BENCH_VERBOSE ? ` (${new Date(w.begin).toISOString()} → ${new Date(w.back).toISOString()})` : "";
      log(`(c) restart ${i + 1}: devices let in again after ${((w.back - w.begin) / 1000).toFixed(1)} s${when}`);
    }
    log(`(c) ${describeLost(missing, acks, windows, observer ? seen : null)}`);
    if (lost && process.env.BENCH_VERBOSE) {
      for (const k of missing.slice(0, 20)) log(`(c)   not stored ${k}: acknowledged ${new Date(acks.get(k)!.at).toISOString()}, reason ${acks.get(k)!.reasonCode}, seen ${seen.has(k)}`);
      log(`--- broker ---\n${s.broker.output().slice(-4000)}`);
      for (const [i, w] of s.workers) log(`--- worker ${i} ---\n${w.output().slice(-4000)}`);
    }
    const [raw] = await q(`SELECT COUNT(*) AS n FROM readings WHERE device_id IN ${benchIds}`);
    const [roll] = await q(`SELECT SUM(count) AS n FROM rollup_1m WHERE device_id IN ${benchIds}`);
    const duplicated = Number(roll.n) - Number(raw.n);
    log(`(c) ${acks.size} readings acknowledged by the broker: ${lost} not stored, ${duplicated} counted twice in the rollups`);

    // (d) kill -9 the alert owner during an excursion (lib/rules/defaults.ts rule 1: above 12 kV for 10 s while the line runs)
    const secrets = readDeviceSecrets(tdb.name);
    const gwCode = String((await q("SELECT code FROM devices WHERE kind = 'speed_gateway' AND line_id = ? LIMIT 1", [lineId]))[0].code);
    const meterCode = String((await q("SELECT code FROM devices WHERE kind = 'field_meter' AND line_id = ? AND code NOT LIKE 'bench-%' LIMIT 1", [lineId]))[0].code);
    const gw = await mqtt.connectAsync({ host: "127.0.0.1", port: s.mqttPort, username: gwCode, password: secrets[gwCode], clientId: gwCode, protocolVersion: 5, reconnectPeriod: 500 });
    const meter = await mqtt.connectAsync({ host: "127.0.0.1", port: s.mqttPort, username: meterCode, password: secrets[meterCode], clientId: meterCode, protocolVersion: 5, reconnectPeriod: 500 });
    publishers.push(gw, meter);
    const lease = async () => (await q("SELECT holder, token FROM service_leases WHERE name = 'alerts'"))[0] as { holder: string | null; token: number } | undefined;
    // a live owner (the lease of a worker killed in (c) may not have run out yet)
    const livePids = () => [...s.workers.values()].filter((w) => w.child.exitCode === null && w.child.signalCode === null).map((w) => `#${w.child.pid}`);
    const first = await waitFor("a live alert owner", async () => {
      const l = await lease();
      return l?.holder && livePids().some((p) => l.holder!.endsWith(p)) ? l : null;
    }, 30_000, 200);
    const t0 = Date.now() - 60_000;
    const excursion = async (fromS: number, toS: number) => {
      const span = Array.from({ length: toS - fromS }, (_, k) => t0 + (fromS + k) * 1000);
      await gw.publishAsync(`stillfield/d/${gwCode}/readings`, JSON.stringify({ batch: span.map((ts) => ({ ts, values: { running: 1, speed_mpm: 200 } })) }), { qos: 1 });
      await new Promise((r) => setTimeout(r, 1500)); // the line's running state is stored first
      await meter.publishAsync(`stillfield/d/${meterCode}/readings`, JSON.stringify({ batch: span.map((ts) => ({ ts, values: { charge_kv: 14.5 } })) }), { qos: 1 });
    };
    const ruleAlerts = () => q("SELECT id FROM alerts WHERE rule_id = 1");
    await excursion(0, 25);
    const raised = await waitFor("the excursion's alert", async () => ((await ruleAlerts()).length ? ruleAlerts() : null), 30_000, 200);
    const ownerIndex = String(first!.holder).includes("mq-scale-1@") ? 1 : 2;
    const killedAt = Date.now();
    s.workers.get(ownerIndex)!.child.kill("SIGKILL");
    const next = await waitFor("a new alert owner", async () => {
      const l = await lease();
      return l?.holder && Number(l.token) > Number(first!.token) ? l : null;
    }, 30_000, 100);
    const failoverS = (Date.now() - killedAt) / 1000;
    log(`(d) owner worker-${ownerIndex} killed; ${String(next.holder)} took over after ${failoverS.toFixed(1)} s`);
    await s.startWorker(ownerIndex, LEASE);
    await excursion(25, 55);
    await excursion(0, 25); // re-sent
    const alertId = Number(raised[0].id);
    const mails = await waitFor("the alert's first e-mail", async () => {
      const m = await q("SELECT dedupe_key FROM outbox WHERE dedupe_key LIKE ?", [`alert:${alertId}:order:1:%`]);
      return m.length ? m : null;
    }, 60_000, 500).catch(() => []);
    await new Promise((r) => setTimeout(r, 5000));
    const duplicateAlerts = (await ruleAlerts()).length - 1;
    const onCall = Number((await q("SELECT COUNT(*) AS n FROM oncall_shifts WHERE escalation_order = 1 AND start_ts <= ? AND end_ts > ?", [Date.now(), Date.now()]))[0].n);
    log(`(d) alerts for the excursion: ${duplicateAlerts + 1}; first e-mails queued: ${mails.length} (on call at order 1: ${onCall})`);
    // (e) stop the replica: charts still answer, from the primary
    const rep = await replicaDrill(log);
    if (rep.afterPort !== rep.primaryPort || rep.afterPoints !== rep.beforePoints) log("(e) WARNING — the chart did not answer the same from the primary");
    log(`scale: 1 worker ${Math.round(rates[0])}/s, 2 workers ${Math.round(rates[1])}/s, 3 workers ${Math.round(rates[2])}/s, bare ${Math.round(bareRate)}/s, lost ${lost}, duplicated ${duplicated}, duplicate alerts ${duplicateAlerts}, owner failover ${failoverS.toFixed(1)} s`);
    await tdb.close();
  } finally {
    await cleanup();
  }
}

main().then(
  () => process.exit(0),
  (err: unknown) => {
    console.error(err instanceof Error ? (err.stack ?? err.message) : err);
    process.exit(1);
  },
);
