// Ingest benchmark (npm run bench:ingest). Starts a private MariaDB, the broker and the ingest
// worker (the production entry points, as child processes) against a scratch database and
// measures in one run:
//   (a) bare broker: one publisher to one subscriber at QoS 1, nothing else (worker not started);
//   (b) end to end, one reading per message: publisher → broker → worker → MariaDB with rollups,
//       counted when the worker reports the rows committed;
//   (c) end to end with gateway-style batches of 10 readings per message;
//   (c2) Sparkplug B DDATA with 10 metrics per message through the same pipeline
//        (scripts/bench-sparkplug.ts), against the rate of (c) (target at least 0.8 of it);
//   (d) publish-to-commit latency (p50/p95) at a steady 2,000 readings/s;
//   (e) the worker's memory while MariaDB is down at 2,000 readings/s (default 60 s;
//       --outage-s 600 for the full 10 minutes), and that every reading arrives afterwards.
// The last line reads:
//   ingest: <N> readings/s end-to-end, <M> msgs/s bare broker, ratio <R>, batched <B> readings/s, sparkplug <S> readings/s (<S/B> of batched)
// Options: --readings (1000000) --batched-readings (1000000) --bare-messages (300000)
//          --latency-s (20) --outage-s (60; 0 skips) --window (500 in-flight messages)
// Needs the MariaDB server binaries (scripts/ensure-system.sh); writes only under .data/.
import fs from "node:fs";
import { parseArgs } from "node:util";
import type { MqttClient } from "mqtt";
import { z } from "zod";
import { createTestDatabase } from "../tests/helpers/test-db";
import { hashDeviceSecret } from "../lib/device-secrets";
import { deviceTopics } from "../lib/contract/topics";
import { SERVICE_ACCOUNTS } from "../lib/settings";
import {
  connectClient,
  spawnTs,
  startIngestStack,
  waitFor,
  type IngestStack,
  type Proc,
} from "../tests/integration/ingest-support/processes";
import { startPrivateMariadb, withDbPort, type PrivateMariadb } from "../tests/integration/ingest-support/private-mariadb";
import { benchSparkplugDdata } from "./bench-sparkplug";
import { WORKER_NODE_ARGS } from "./stack-processes";

const { values: argv } = parseArgs({
  options: {
    role: { type: "string" },
    port: { type: "string" },
    count: { type: "string" },
    user: { type: "string" },
    password: { type: "string" },
    readings: { type: "string" },
    "batched-readings": { type: "string" },
    "bare-messages": { type: "string" },
    "latency-s": { type: "string" },
    "outage-s": { type: "string" },
    window: { type: "string" },
  },
  strict: true,
});

const opts = z
  .object({
    readings: z.coerce.number().int().min(1000).default(1_000_000),
    batchedReadings: z.coerce.number().int().min(1000).default(1_000_000),
    bareMessages: z.coerce.number().int().min(1000).default(300_000),
    latencyS: z.coerce.number().min(5).default(20),
    outageS: z.coerce.number().min(0).default(60),
    window: z.coerce.number().int().min(1).max(10_000).default(500),
  })
  .parse({
    readings: argv.readings,
    batchedReadings: argv["batched-readings"],
    bareMessages: argv["bare-messages"],
    latencyS: argv["latency-s"],
    outageS: argv["outage-s"],
    window: argv.window,
  });

const log = (msg: string) => process.stdout.write(`${msg}\n`);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

// ---- the bare-broker subscriber, run as its own process like the worker ----
async function runSubscriber(): Promise<void> {
  const count = Number(argv.count);
  const c = await connectClient(Number(argv.port), { clientId: "bench-subscriber", username: argv.user, password: argv.password, clean: true });
  let n = 0;
  let first = 0;
  const done = new Promise<void>((resolve) =>
    c.on("message", () => {
      if (n === 0) first = Date.now();
      n++;
      if (n === count) {
        process.stdout.write(`${JSON.stringify({ first, last: Date.now(), n })}\n`);
        c.end(false, {}, () => resolve());
      }
    }),
  );
  await new Promise<void>((r) => c.subscribe("stillfield/d/+/readings", { qos: 1 }, () => r()));
  process.stdout.write("ready\n");
  await done;
}

/** Publishes `count` messages at QoS 1 keeping `window` unacknowledged; optional pacing. */
function publishMany(c: MqttClient, topic: string, count: number, body: (i: number) => string, window: number, perSecond?: number): Promise<{ startTs: number; endTs: number }> {
  return new Promise((resolve, reject) => {
    let sent = 0;
    let acked = 0;
    const startTs = Date.now();
    const pump = () => {
      while (sent < count && sent - acked < window) {
        if (perSecond && sent >= ((Date.now() - startTs) / 1000) * perSecond) {
          setTimeout(pump, 2);
          return;
        }
        const i = sent++;
        c.publish(topic, body(i), { qos: 1 }, (err) => {
          if (err) return reject(err);
          acked++;
          if (acked === count) resolve({ startTs, endTs: Date.now() });
          else if (sent - acked < window / 2) pump();
        });
      }
    };
    pump();
  });
}

function rssMb(pid: number | undefined): number {
  if (!pid) return NaN;
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Math.round(Number(m[1]) / 1024) : NaN;
  } catch {
    return NaN;
  }
}

/** CPU time (user + system) a process has used so far, ms. */
function cpuMs(pid: number | undefined): number {
  if (!pid) return NaN;
  try {
    const fields = fs.readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    // utime and stime are fields 14 and 15 of /proc/<pid>/stat, in clock ticks (100 per second here)
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return NaN;
  }
}

async function waitCommitted(stack: IngestStack, target: number, timeoutMs: number): Promise<number> {
  const s = await waitFor("commits", async () => {
    const st = await stack.workerStats();
    return st.committed.readings + st.committed.duplicates >= target ? st : null;
  }, timeoutMs, 50);
  return s.batch.lastFlushTs ?? Date.now();
}

async function main(): Promise<void> {
  if (argv.role === "subscriber") return runSubscriber();
  const started = Date.now();
  let mdb: PrivateMariadb | null = null;
  let stack: IngestStack | null = null;
  const cleanup = async () => {
    await stack?.stop().catch(() => undefined);
    await mdb?.destroy().catch(() => undefined);
  };
  process.once("SIGINT", () => void cleanup().then(() => process.exit(130)));
  try {
    log("bench: starting a private MariaDB, the broker and the worker …");
    mdb = await startPrivateMariadb("bench", { bufferPoolMb: 512 });
    const server = mdb;
    const tdb = await withDbPort(server.port, () => createTestDatabase("bench"));
    // bench devices: field meters and gateways on line 1 (so live snapshots are built too); the
    // scratch database is not seeded, so hall 1 and line 1 are made here (devices refer to them)
    await tdb.pool.query("INSERT IGNORE INTO areas (id, slug, name) VALUES (1, 'bench-hall', 'Bench hall')");
    await tdb.pool.query("INSERT IGNORE INTO `lines` (id, area_id, slug, name, kind, nominal_speed_mpm) VALUES (1, 1, 'bench-line', 'Bench line', 'laminator', 200)");
    const devices = Array.from({ length: 8 }, (_, i) => ({ code: `bench-fm-${i + 1}`, secret: `bench-secret-${i + 1}-${Date.now()}` }));
    for (const d of devices) {
      await tdb.pool.query(
        "INSERT INTO devices (code, kind, label, secret_hash, line_id, area_id, created_at) VALUES (?, 'field_meter', ?, ?, 1, 1, ?)",
        [d.code, `Bench ${d.code}`, hashDeviceSecret(d.secret), Date.now()],
      );
    }
    stack = await startIngestStack("bench", tdb.env, { startWorker: false, brokerNodeArgs: process.env.BENCH_BROKER_NODE_ARGS?.split(" ").filter(Boolean) });
    const env = stack.env;
    const connect = (d: (typeof devices)[number]) => connectClient(stack!.mqttPort, { clientId: d.code, username: d.code, password: d.secret, clean: true });

    // (a) bare broker
    const sub: Proc = spawnTs("bench-sub", "scripts/bench-ingest.ts", [
      "--role", "subscriber", "--port", String(stack.mqttPort), "--count", String(opts.bareMessages),
      "--user", SERVICE_ACCOUNTS.worker, "--password", env.MQTT_WORKER_PASSWORD,
    ], {});
    await waitFor("the bench subscriber", async () => sub.output().includes("ready"), 30_000);
    const pubA = await connect(devices[0]);
    const t0 = Date.now() - 30 * 60_000;
    const oneReading = (ts: number, v: number) => `{"ts":${ts},"values":{"charge_kv":${v}}}`;
    const cpuA = { broker: cpuMs(stack.broker.child.pid), sub: cpuMs(sub.child.pid), bench: process.cpuUsage() };
    const a = await publishMany(pubA, deviceTopics.readings(devices[0].code), opts.bareMessages, (i) => oneReading(t0 + i, (i % 1000) / 100 - 5), opts.window);
    // the subscriber's CPU is read just before it exits (it prints its result first)
    await waitFor("the bench subscriber's result", async () => sub.output().includes('{"first"'), 300_000, 20);
    const subCpuMs = cpuMs(sub.child.pid) - cpuA.sub;
    const brokerCpuA = cpuMs(stack.broker.child.pid) - cpuA.broker;
    const benchA = process.cpuUsage(cpuA.bench);
    await sub.exit(120_000);
    const subLine = sub.output().split("\n").find((l) => l.startsWith("{"));
    if (!subLine) throw new Error(`the bench subscriber did not finish:\n${sub.output()}`);
    const subOut = z.object({ first: z.number(), last: z.number(), n: z.number() }).parse(JSON.parse(subLine));
    const bareRate = subOut.n / ((subOut.last - a.startTs) / 1000);
    const perMsg = (ms: number) => ((ms * 1000) / subOut.n).toFixed(1);
    log(
      `(a) bare broker, 1 publisher → 1 subscriber, QoS 1: ${Math.round(bareRate)} msgs/s (${subOut.n} messages)\n` +
        `    CPU per message: broker ${perMsg(brokerCpuA)} µs, subscriber ${perMsg(subCpuMs)} µs, publisher ${perMsg((benchA.user + benchA.system) / 1000)} µs (machine load ${fs.readFileSync("/proc/loadavg", "utf8").split(" ")[0]})`,
    );
    pubA.end(true);

    // (b) end to end, one reading per message
    // BENCH_WORKER_NODE_ARGS="--cpu-prof --cpu-prof-dir=.data/prof" profiles the worker
    const workerArgs = process.env.BENCH_WORKER_NODE_ARGS?.split(" ").filter(Boolean) ?? WORKER_NODE_ARGS;
    let worker = await stack.startWorker({}, workerArgs);
    let base = 0;
    const pubB = await connect(devices[1]);
    const cpuB = { worker: cpuMs(worker.child.pid), broker: cpuMs(stack.broker.child.pid), db: cpuMs(server.pid()), bench: process.cpuUsage() };
    const tB = Date.now() - 25 * 60_000;
    const b = await publishMany(pubB, deviceTopics.readings(devices[1].code), opts.readings, (i) => oneReading(tB + i, (i % 1000) / 100 - 5), opts.window);
    const bDone = await waitCommitted(stack, base + opts.readings, 600_000);
    const e2eRate = opts.readings / ((bDone - b.startTs) / 1000);
    base += opts.readings;
    log(`(b) end to end, 1 reading/message: ${Math.round(e2eRate)} readings/s (${opts.readings} readings; publisher done in ${((b.endTs - b.startTs) / 1000).toFixed(1)} s, last commit ${((bDone - b.startTs) / 1000).toFixed(1)} s)`);
    const perReading = (ms: number) => ((ms * 1000) / opts.readings).toFixed(1);
    const benchB = process.cpuUsage(cpuB.bench);
    log(
      `    CPU per reading: worker ${perReading(cpuMs(worker.child.pid) - cpuB.worker)} µs, broker ${perReading(cpuMs(stack.broker.child.pid) - cpuB.broker)} µs, ` +
        `MariaDB ${perReading(cpuMs(server.pid()) - cpuB.db)} µs, publisher ${perReading((benchB.user + benchB.system) / 1000)} µs (machine load ${fs.readFileSync("/proc/loadavg", "utf8").split(" ")[0]})`,
    );
    pubB.end(true);

    // (c) end to end, batches of 10
    const pubC = await connect(devices[2]);
    const tC = Date.now() - 25 * 60_000;
    const messages = Math.ceil(opts.batchedReadings / 10);
    const batchBody = (i: number) => {
      const sets: string[] = [];
      for (let k = 0; k < 10; k++) sets.push(oneReading(tC + i * 10 + k, ((i + k) % 1000) / 100 - 5));
      return `{"batch":[${sets.join(",")}]}`;
    };
    const cpuC = { worker: cpuMs(worker.child.pid), broker: cpuMs(stack.broker.child.pid), db: cpuMs(server.pid()), bench: process.cpuUsage() };
    // built before the clock starts, like the Sparkplug payloads of (c2)
    const batchBodies = Array.from({ length: messages }, (_, i) => batchBody(i));
    const c = await publishMany(pubC, deviceTopics.readings(devices[2].code), messages, (i) => batchBodies[i], Math.max(50, Math.round(opts.window / 5)));
    const cDone = await waitCommitted(stack, base + messages * 10, 600_000);
    const batchedRate = (messages * 10) / ((cDone - c.startTs) / 1000);
    base += messages * 10;
    log(`(c) end to end, batches of 10: ${Math.round(batchedRate)} readings/s (${messages * 10} readings)`);
    const perBatched = (ms: number) => ((ms * 1000) / (messages * 10)).toFixed(1);
    const benchC = process.cpuUsage(cpuC.bench);
    log(
      `    CPU per reading: worker ${perBatched(cpuMs(worker.child.pid) - cpuC.worker)} µs, broker ${perBatched(cpuMs(stack.broker.child.pid) - cpuC.broker)} µs, ` +
        `MariaDB ${perBatched(cpuMs(server.pid()) - cpuC.db)} µs, publisher ${perBatched((benchC.user + benchC.system) / 1000)} µs (machine load ${fs.readFileSync("/proc/loadavg", "utf8").split(" ")[0]})`,
    );
    pubC.end(true);

    // (c2) Sparkplug DDATA, 10 metrics per message, through the worker's Sparkplug host
    const spb = await benchSparkplugDdata(stack, tdb, { readings: opts.batchedReadings, window: opts.window, committedBefore: base, waitCommitted: (t) => waitCommitted(stack!, t, 600_000) }).catch((err: unknown) => {
      log(`(c2) Sparkplug DDATA: not measured (${err instanceof Error ? err.message : String(err)})`);
      return { readings: 0, rate: NaN };
    });
    const spbStats = await stack.workerStats();
    base = spbStats.committed.readings + spbStats.committed.duplicates;
    if (spb.readings > 0) log(`(c2) end to end, Sparkplug DDATA with 10 metrics: ${Math.round(spb.rate)} readings/s (${spb.readings} readings), ${(spb.rate / batchedRate).toFixed(2)} of the JSON batch rate (target 0.8)`);

    // (d) latency at a steady 2,000 readings/s (4 devices × 500/s, stamped at publish time)
    const steady = await Promise.all(devices.slice(3, 7).map(connect));
    const lastTs = new Map<number, number>();
    const stamp = (k: number) => {
      const t = Math.max(Date.now(), (lastTs.get(k) ?? 0) + 1);
      lastTs.set(k, t);
      return t;
    };
    const latencyFrom = Date.now() + 3000;
    const perDevice = Math.round(500 * opts.latencyS);
    const steadyRun = async (value: number) => {
      let rss = 0;
      const rssSampler = setInterval(() => (rss = Math.max(rss, rssMb(worker.child.pid))), 1000);
      await Promise.all(
        steady.map((cl, k) => publishMany(cl, deviceTopics.readings(devices[3 + k].code), perDevice, () => oneReading(stamp(k), value), 100, 500)),
      );
      clearInterval(rssSampler);
      await waitCommitted(stack!, base + perDevice * 4, 60_000);
      base += perDevice * 4;
      return rss;
    };
    const rssAfterBursts = await steadyRun(1.5);
    const dStats = await stack.workerStats(latencyFrom);
    log(
      `(d) at 2,000 readings/s: publish-to-commit p50 ${dStats.freshness.p50Ms?.toFixed(0)} ms, p95 ${dStats.freshness.p95Ms?.toFixed(0)} ms ` +
        `(${dStats.freshness.samples} readings); batch write p50 ${dStats.batch.p50Ms?.toFixed(1)} ms, p95 ${dStats.batch.p95Ms?.toFixed(1)} ms; ` +
        `worker RSS at most ${rssAfterBursts} MB after the full-speed parts above`,
    );
    // (d2) the same rate through a worker that has only ever run at it: V8 keeps the heap the
    // full-speed parts grew, so (d) shows the worst case and this the steady state
    await worker.stop();
    worker = await stack.startWorker({}, workerArgs);
    base = 0; // a new process counts from zero
    await waitFor("the new worker's subscription", async () => (await stack!.workerStats()).mqttConnected === true, 30_000).catch(() => undefined);
    const rssFresh = await steadyRun(1.6);
    log(`(d2) at 2,000 readings/s through a fresh worker: worker RSS at most ${rssFresh} MB (target 150 MB)`);

    // (e) memory while the database is down
    if (opts.outageS > 0) {
      const rssBefore = rssMb(worker.child.pid);
      let peakWorker = rssBefore;
      let peakBroker = rssMb(stack.broker.child.pid);
      let peakBuffered = 0;
      const sampler = setInterval(() => {
        peakWorker = Math.max(peakWorker, rssMb(worker.child.pid));
        peakBroker = Math.max(peakBroker, rssMb(stack!.broker.child.pid));
        stack!.workerStats().then((s) => (peakBuffered = Math.max(peakBuffered, s.buffered.readings)), () => undefined);
      }, 1000);
      const spilledBefore = (await stack.workerStats()).spilled.readings;
      const total = Math.round(2000 * (opts.outageS + 10));
      const perDev = Math.round(total / 4);
      const sending = Promise.all(steady.map((cl, k) => publishMany(cl, deviceTopics.readings(devices[3 + k].code), perDev, () => oneReading(stamp(k), 2.5), 200, 500)));
      await sleep(5000);
      await server.stop();
      log(`(e) MariaDB stopped for ${opts.outageS} s while publishing 2,000 readings/s …`);
      await sleep(opts.outageS * 1000);
      const during = await stack.workerStats();
      const memoryBound = Number(process.env.INGEST_MEMORY_MAX_READINGS ?? 100_000);
      await server.start();
      const backTs = Date.now();
      await sending;
      await waitCommitted(stack, base + perDev * 4, 600_000);
      clearInterval(sampler);
      const after = await stack.workerStats();
      const [rows] = await tdb.pool.query("SELECT COUNT(*) AS n FROM readings WHERE device_id IN (SELECT id FROM devices WHERE code LIKE 'bench-fm-%')");
      const stored = Number((rows as Array<{ n: number }>)[0].n);
      // (a) went to the bench subscriber only; (b), (c), (d), (d2) and (e) were stored
      const expected = opts.readings + messages * 10 + perDevice * 4 * 2 + perDev * 4;
      log(
        `(e) outage ${opts.outageS} s at 2,000 readings/s: worker RSS ${rssBefore} MB before, peak ${peakWorker} MB; broker peak ${peakBroker} MB; ` +
          `peak held in memory ${peakBuffered} readings (memory bound ${memoryBound}), ${during.buffered.readings} at the end of the outage; ` +
          `spilled ${after.spilled.readings - spilledBefore} readings to files; caught up ${((Date.now() - backTs) / 1000).toFixed(1)} s after restart; ` +
          `stored ${stored} of ${expected} readings${stored === expected ? " (none lost)" : " (MISSING SOME)"}`,
      );
    }
    steady.forEach((cl) => cl.end(true));
    await tdb.close().catch(() => undefined);
    log(`bench: done in ${((Date.now() - started) / 1000).toFixed(0)} s`);
    log(`ingest: ${Math.round(e2eRate)} readings/s end-to-end, ${Math.round(bareRate)} msgs/s bare broker, ratio ${(e2eRate / bareRate).toFixed(2)}, batched ${Math.round(batchedRate)} readings/s, sparkplug ${Math.round(spb.rate)} readings/s (${(spb.rate / batchedRate).toFixed(2)} of batched)`);
  } finally {
    await cleanup();
  }
}

main()
  .then(() => process.exit(0))
  .catch((err: unknown) => {
    process.stderr.write(`bench: ${err instanceof Error ? err.stack ?? err.message : String(err)}\n`);
    process.exit(1);
  });
