// The supervision drill: scripts/run-stack.ts started as `npm test` starts it, against this slot's
// own test database, back end only (STACK_ONLY; the app needs a `next build`); its processes are
// killed with SIGKILL. Embedded broker (mail sink, broker, worker, mailer): the worker comes back
// after 1 s, killed again at once after 2 s (scripts/stack-processes.ts), storing what was
// published while it was down and after, and the Health report (db/queries/health.ts) shows the
// gap (its last report stands still, then fresh from a new process); the broker comes back, the
// worker reconnects (the report says it was cut off meanwhile) and readings are stored; a mail
// queued while the mailer was down reaches the SMTP sink; all killed at once all come back; the
// runner never exits, the others keep their process ids, and a SIGTERM while a crashed process
// waits for its restart stops everything at once. Mosquitto profile (two workers, shared
// subscription): the broker process killed comes back and stops the mosquitto it left running,
// both workers get readings again; mosquitto itself killed: its broker process exits, is restarted.
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { enqueueMail } from "../../db/queries/outbox";
import { getHealthReport } from "../../db/queries/health";
import { getIngestStatus } from "../../db/queries/ingest-diagnostics";
import { deviceTopics } from "../../lib/contract/topics";
import { healthVerdict } from "../../lib/health-verdict";
import { readSinkIndex } from "../../ingest/smtp-sink";
import { connectClient, endClient, freePort, getJson, publishAsync, ROOT, spawnTs, waitFor, type Proc } from "./ingest-support/processes";
import { ensureMosquitto } from "./mosquitto-support/stack";

const FM = "fm-laminator-1-primary-unwind";
const WORKER_ID = "ingest-supervision";
const STATUS_MS = 500;
const replica = { configured: false, usable: false, lagS: null, reason: "no replica is configured", checkedTs: null };

let tdb: TestDatabase;
let secrets: Record<string, string>;
let runner: Proc;
let dataDir: string;
let mqttPort: number;
let workerHealthPort: number;

/** The runner's output without colours. */
const log = () => runner.output().replace(/\x1b\[[0-9;]*m/g, "");

/** The process id the runner last started a process with (from "[stack] worker ready … (pid N)"). */
function pidOf(name: string): number {
  const all = [...log().matchAll(new RegExp(`^\\[stack\\] ${name} (?:ready|restarted)\\b[^\\n]*\\(pid (\\d+)\\)$`, "gm"))];
  if (all.length === 0) throw new Error(`no pid of ${name} in the runner's log:\n${log()}`);
  return Number(all[all.length - 1][1]);
}

function portFree(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once("error", () => resolve(false));
    srv.listen(port, "127.0.0.1", () => srv.close(() => resolve(true)));
  });
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/**
 * Kills a process with SIGKILL and waits for the runner to start it again; returns how long the
 * runner took (from the kill to its "restarted" line) and the delay it announced.
 */
async function killAndAwaitRestart<T>(
  name: string,
  whileDown?: () => Promise<T>,
): Promise<{ oldPid: number; newPid: number; tookMs: number; announced: string; killTs: number; during?: Promise<T> }> {
  const oldPid = pidOf(name);
  const restartsBefore = log().split(`[stack] ${name} restarted`).length;
  const killTs = Date.now();
  process.kill(oldPid, "SIGKILL");
  const during = whileDown?.();
  // a rejection is seen when the caller awaits it
  during?.catch(() => undefined);
  await waitFor(`the runner to restart ${name}`, async () => log().split(`[stack] ${name} restarted`).length > restartsBefore, 15_000, 25);
  const tookMs = Date.now() - killTs;
  const lines = log().split("\n").filter((l) => l.startsWith(`[stack] ${name} stopped unexpectedly`));
  return { oldPid, newPid: pidOf(name), tookMs, announced: lines[lines.length - 1] ?? "", killTs, during };
}

/** A device signs in (retrying while the broker starts), publishes one reading at QoS 1 and leaves. */
const publishReading = async () => (await publishReadings(1))[0];
const stored = async (ts: number) => (await storedCount([ts])) === 1;

/** One device connection publishing `n` readings at QoS 1 (each message one reading); their times. */
async function publishReadings(n: number): Promise<number[]> {
  const client = await waitFor("the device's sign-in", () => connectClient(mqttPort, { clientId: FM, username: FM, password: secrets[FM], clean: true }), 20_000, 200);
  const base = Date.now() - n;
  const tss = Array.from({ length: n }, (_, i) => base + i);
  for (const ts of tss) await publishAsync(client, deviceTopics.readings(FM), JSON.stringify({ ts, values: { charge_kv: 1.25 } }));
  await endClient(client);
  return tss;
}

async function storedCount(tss: number[]): Promise<number> {
  const [rows] = await tdb.pool.query("SELECT COUNT(*) AS n FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.code = ? AND r.ts IN (?)", [FM, tss]);
  return Number((rows as Array<{ n: number }>)[0].n);
}

async function workerRow() {
  const r = await getHealthReport(tdb.db, replica);
  const w = r.workers.find((x) => x.id === WORKER_ID);
  if (!w) throw new Error(`no worker ${WORKER_ID} in the Health report`);
  return { report: r, worker: w };
}

async function startedTsOf(id: string): Promise<number | null> {
  const row = (await getIngestStatus(tdb.db)).find((r) => r.workerId === id);
  const s = row?.stats as { startedTs?: unknown } | null | undefined;
  return typeof s?.startedTs === "number" ? s.startedTs : null;
}

/** Starts the runner as scripts/test.sh does and waits for its "all services ready". */
async function startRunner(name: string, extra: Record<string, string>): Promise<Record<string, string>> {
  const slot = process.env.STACK_SLOT ?? "0";
  dataDir = path.join(ROOT, ".data", "test-supervision", `slot${slot}-${name}`);
  fs.rmSync(dataDir, { recursive: true, force: true });
  fs.mkdirSync(dataDir, { recursive: true });
  mqttPort = await freePort();
  // worker i listens on the first one's port + 100·(i−1) (scripts/stack-processes.ts): both free
  workerHealthPort = await waitFor("two free health ports 100 apart", async () => {
    const p = await freePort();
    return p + 100 < 65_536 && (await portFree(p + 100)) ? p : null;
  }, 5000, 0);
  const env: Record<string, string> = {
    ...tdb.env,
    STILLFIELD_MODE: "test",
    STACK_READY_FILE: path.join(dataDir, "stack-ready"),
    DATA_DIR: dataDir,
    MQTT_HOST: "127.0.0.1",
    MQTT_PORT: String(mqttPort),
    MQTT_TLS_PORT: "0",
    WORKER_HEALTH_PORT: String(workerHealthPort),
    BROKER_HEALTH_PORT: String(await freePort()),
    MQTT_WORKER_PASSWORD: `worker-${name}-secret-0123456789`,
    MQTT_APP_PASSWORD: `app-${name}-secret-0123456789`,
    INGEST_STATUS_INTERVAL_MS: String(STATUS_MS),
    DB_POOL_SIZE: "4",
    SPARKPLUG_HOST: "off",
    ...extra,
  };
  runner = spawnTs("stack", "scripts/run-stack.ts", ["test"], env);
  await waitFor("the stack to start", async () => fs.existsSync(env.STACK_READY_FILE) || runner.child.exitCode !== null, 90_000, 200);
  if (!fs.existsSync(env.STACK_READY_FILE)) throw new Error(`the stack did not start:\n${log()}`);
  return env;
}

beforeAll(async () => {
  tdb = await createTestDatabase("supervision", { seed: true });
  secrets = readDeviceSecrets(tdb.name);
});

afterAll(async () => {
  if (runner && runner.child.exitCode === null && runner.child.signalCode === null) await runner.stop("SIGTERM", 20_000);
  await tdb?.close();
});

describe("supervision drill (scripts/run-stack.ts), embedded broker", () => {
  let smtpPid = 0;
  let brokerPid = 0;
  let brokerKillTs = 0;

  beforeAll(async () => {
    await startRunner("embedded", {
      STACK_ONLY: "smtp,broker,worker,mailer",
      BROKER: "embedded",
      WORKERS: "1",
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: String(await freePort()),
      INGEST_CLIENT_ID: WORKER_ID,
      BROKER_ID: "broker-supervision",
      MAILER_POLL_MS: "200",
    });
  });

  it("starts only the processes STACK_ONLY names, and the worker stores a reading", async () => {
    expect(log()).toMatch(/^\[stack\] all services ready$/m);
    expect([...log().matchAll(/^\[stack\] (\S+) ready\b/gm)].map((m) => m[1])).toEqual(["smtp", "broker", "worker", "mailer"]);
    smtpPid = pidOf("smtp");
    brokerPid = pidOf("broker");
    await waitFor("the worker's health endpoint", () => getJson(`http://127.0.0.1:${workerHealthPort}/health`).then(Boolean), 20_000);
    const ts = await publishReading();
    await waitFor("the reading to be stored", () => stored(ts), 15_000);
  });

  it("restarts a killed worker after 1 s; a reading published after is stored; the Health report shows the gap", async () => {
    const before = await waitFor("the worker's first status", async () => (await workerRow()).worker, 10_000);
    const startedBefore = await startedTsOf(WORKER_ID);
    expect(startedBefore).not.toBeNull();

    const r = await killAndAwaitRestart("worker", () => publishReading());
    expect(r.announced).toBe("[stack] worker stopped unexpectedly (SIGKILL); restarting it in 1 s (crash 1 in a row)");
    expect(r.tookMs).toBeGreaterThanOrEqual(1000);
    expect(r.tookMs).toBeLessThan(4000);
    expect(r.newPid).not.toBe(r.oldPid);
    expect(alive(r.oldPid)).toBe(false);

    // while it starts again the last report stands still: written before the kill, ageing
    const during = (await workerRow()).worker;
    expect(during.updatedTs).toBeLessThanOrEqual(r.killTs);
    expect(during.updatedTs).toBeGreaterThanOrEqual(before.updatedTs);
    const gapMs = Date.now() - during.updatedTs;
    expect(gapMs).toBeGreaterThan(1000);

    await waitFor("the restarted worker's health endpoint", () => getJson(`http://127.0.0.1:${workerHealthPort}/health`).then(Boolean), 30_000);
    const ts = await publishReading();
    await waitFor("the reading published after the restart to be stored", () => stored(ts), 15_000);
    // and the one published while it was down, which the broker kept in the worker's session
    expect(await stored(await r.during!)).toBe(true);

    // fresh again, from the new process (its own start time), connected
    const after = await waitFor("a fresh report from the new worker", async () => {
      const { worker } = await workerRow();
      return worker.updatedTs > r.killTs + 1000 && worker.mqttConnected ? worker : null;
    }, 10_000);
    expect(after.stale).toBe(false);
    expect(await startedTsOf(WORKER_ID)).toBeGreaterThan(r.killTs);
    // the Health report shows the restart as a recent start
    expect(after.startedTs).toBeGreaterThan(r.killTs);

    // nothing else was touched, and the runner is still there
    expect(pidOf("smtp")).toBe(smtpPid);
    expect(pidOf("broker")).toBe(brokerPid);
    expect(alive(brokerPid)).toBe(true);
    expect(runner.child.exitCode).toBeNull();
  });

  it("waits 2 s before restarting a worker that crashes again at once", async () => {
    const r = await killAndAwaitRestart("worker");
    expect(r.announced).toBe("[stack] worker stopped unexpectedly (SIGKILL); restarting it in 2 s (crash 2 in a row)");
    expect(r.tookMs).toBeGreaterThanOrEqual(2000);
    expect(r.tookMs).toBeLessThan(5000);
    await waitFor("the restarted worker's health endpoint", () => getJson(`http://127.0.0.1:${workerHealthPort}/health`).then(Boolean), 30_000);
    const ts = await publishReading();
    await waitFor("the reading to be stored", () => stored(ts), 15_000);
    expect(runner.child.exitCode).toBeNull();
  });

  it("restarts a killed broker; the worker reconnects (the Health report shows it was cut off) and readings flow again", async () => {
    const workerPid = pidOf("worker");
    const r = await killAndAwaitRestart("broker");
    brokerKillTs = r.killTs;
    expect(r.announced).toBe("[stack] broker stopped unexpectedly (SIGKILL); restarting it in 1 s (crash 1 in a row)");
    expect(r.tookMs).toBeGreaterThanOrEqual(1000);
    expect(r.tookMs).toBeLessThan(4000);

    // the gap: the worker, still reporting while the broker starts again, says it lost it (the
    // broker is away for at least the 1 s delay; the worker reports every STATUS_MS)
    const cutOff = await waitFor("a report that the worker lost the broker", async () => {
      const { report, worker } = await workerRow();
      return worker.updatedTs > r.killTs && worker.mqttConnected === false ? report : null;
    }, 5000, 50);
    expect(healthVerdict(cutOff).problems).toContain(`Ingest worker ${WORKER_ID} is not connected to the broker.`);
    expect(log()).toMatch(/^\[worker\] .*lost the broker connection; reconnecting$/m);

    const back = await waitFor("a report that the worker is connected again", async () => {
      const { report, worker } = await workerRow();
      return worker.mqttConnected === true && worker.updatedTs > r.killTs + 1000 ? report : null;
    }, 30_000, 200);
    expect(healthVerdict(back).problems.filter((p) => p.includes(WORKER_ID))).toEqual([]);
    const ts = await publishReading();
    await waitFor("a reading after the broker's restart to be stored", () => stored(ts), 20_000);
    // the worker rode it out in the same process
    expect(pidOf("worker")).toBe(workerPid);
    expect(alive(workerPid)).toBe(true);
    expect(pidOf("smtp")).toBe(smtpPid);
    expect(runner.child.exitCode).toBeNull();
  });

  it("restarts a killed mailer and a mail queued while it was down reaches the SMTP sink", async () => {
    const oldPid = pidOf("mailer");
    const killTs = Date.now();
    process.kill(oldPid, "SIGKILL");
    const key = `supervision:${killTs}`;
    await enqueueMail(tdb.db, { dedupeKey: key, toAddress: "lead@harrowfen.example", subject: "Queued while the mailer was down", bodyText: "Sent after the restart." }, killTs);
    const waiting = await getHealthReport(tdb.db, replica);
    expect(waiting.mail.pending).toBeGreaterThanOrEqual(1);

    await waitFor("the runner to restart the mailer", async () => pidOf("mailer") !== oldPid, 15_000, 25);
    expect(log()).toMatch(/^\[stack\] mailer stopped unexpectedly \(SIGKILL\); restarting it in 1 s \(crash 1 in a row\)$/m);
    const entry = await waitFor("the mail in the SMTP sink", async () => readSinkIndex(dataDir).find((e) => e.key === key), 20_000, 200);
    expect(entry).toMatchObject({ to: "lead@harrowfen.example", subject: "Queued while the mailer was down", duplicate: false });
    await waitFor("an empty mail queue", async () => (await getHealthReport(tdb.db, replica)).mail.pending === 0, 10_000, 200);
    expect(runner.child.exitCode).toBeNull();
  });

  it("the broker's own report comes from the new process once it has written one", async () => {
    const started = await waitFor("the restarted broker's status", async () => {
      const s = await startedTsOf("broker-supervision");
      return s !== null && s > brokerKillTs ? s : null;
    }, 20_000, 250);
    expect(started).toBeGreaterThan(0);
    const report = await getHealthReport(tdb.db, replica);
    expect(report.brokers.find((b) => b.id === "broker-supervision")).toMatchObject({ stale: false });
  });

  it("stays up and restarts them all when every process is killed at once", async () => {
    const names = ["smtp", "broker", "worker", "mailer"];
    const restarts = (n: string) => log().split(`[stack] ${n} restarted`).length;
    const before = names.map(restarts);
    const old = names.map(pidOf);
    for (const pid of old) process.kill(pid, "SIGKILL");
    // the longest delay is the worker's, its third crash within a minute: 4 s
    await waitFor("every process restarted (or the runner gone)", async () => runner.child.exitCode !== null || names.every((n, i) => restarts(n) > before[i]), 15_000, 50);
    expect(runner.child.exitCode, "the runner exited").toBeNull();
    expect(log()).toMatch(/^\[stack\] worker stopped unexpectedly \(SIGKILL\); restarting it in 4 s \(crash 3 in a row\)$/m);
    names.forEach((n, i) => expect(pidOf(n)).not.toBe(old[i]));
    await waitFor("the restarted worker's health endpoint", () => getJson(`http://127.0.0.1:${workerHealthPort}/health`).then(Boolean), 30_000);
    const ts = await publishReading();
    await waitFor("a reading after the whole back end restarted", () => stored(ts), 20_000);
  });

  it("stops everything at once on SIGTERM, even while a crashed process waits for its restart", async () => {
    const pids = ["smtp", "broker", "worker"].map(pidOf);
    const crashes = () => log().split("[stack] mailer stopped unexpectedly (SIGKILL)").length;
    const crashesBefore = crashes();
    process.kill(pidOf("mailer"), "SIGKILL");
    await waitFor("the runner to notice the mailer's crash", async () => crashes() > crashesBefore, 5000, 20);
    const restarts = log().split("[stack] mailer restarted").length;
    const t0 = Date.now();
    const code = await runner.stop("SIGTERM", 20_000);
    expect(code).toBe(0);
    expect(Date.now() - t0).toBeLessThan(6000);
    expect(log()).not.toMatch(/did not stop in 8 s/);
    // the pending restart was dropped
    expect(log().split("[stack] mailer restarted").length).toBe(restarts);
    for (const pid of pids) expect(alive(pid)).toBe(false);
  });
});

// The production shape of the broker: ingest/mosquitto/run.ts runs Debian's mosquitto as its child,
// and two workers share the device topics (MQTT 5 shared subscription).
describe.skipIf(!ensureMosquitto())("supervision drill (scripts/run-stack.ts), Mosquitto profile with two workers", () => {
  let brokerHealthPort = 0;
  const mosquittoPid = async () => {
    const h = (await getJson(`http://127.0.0.1:${brokerHealthPort}/health`)) as { pid?: unknown; lastSync?: unknown };
    return typeof h.pid === "number" && h.lastSync ? h.pid : null;
  };
  const committed = async (port: number) => ((await getJson(`http://127.0.0.1:${port}/health`)) as { committed: { readings: number } }).committed.readings;

  beforeAll(async () => {
    const env = await startRunner("mosquitto", {
      STACK_ONLY: "broker,worker-1,worker-2",
      BROKER: "mosquitto",
      WORKERS: "2",
      MQTT_ADMIN_PASSWORD: "admin-mosquitto-secret-0123456789",
      INGEST_CLIENT_ID: "supervision-mq",
      BROKER_DEVICE_CHECK_MS: "300",
    });
    brokerHealthPort = Number(env.BROKER_HEALTH_PORT);
    await waitFor("the broker's first credential sync", mosquittoPid, 30_000, 200);
  });

  it("restarts the killed broker process, which stops the mosquitto left behind; both workers get readings again", async () => {
    const oldMosquitto = (await mosquittoPid())!;
    const workers = [pidOf("worker-1"), pidOf("worker-2")];
    const r = await killAndAwaitRestart("broker");
    expect(r.announced).toBe("[stack] broker stopped unexpectedly (SIGKILL); restarting it in 1 s (crash 1 in a row)");
    expect(r.tookMs).toBeGreaterThanOrEqual(1000);
    expect(r.tookMs).toBeLessThan(4000);
    const newMosquitto = await waitFor("the new broker process's mosquitto", async () => {
      const pid = await mosquittoPid().catch(() => null);
      return pid !== null && pid !== oldMosquitto ? pid : null;
    }, 30_000, 200);
    expect(log()).toContain(`stopping a mosquitto left running by an earlier start (pid ${oldMosquitto})`);
    expect(alive(oldMosquitto)).toBe(false);
    expect(alive(newMosquitto)).toBe(true);

    const before = [await committed(workerHealthPort), await committed(workerHealthPort + 100)];
    const tss = await publishReadings(20);
    await waitFor("the readings published after the restart to be stored", async () => (await storedCount(tss)) === tss.length, 20_000, 200);
    // the shared subscription gives each worker its share again: both committed some
    const after = [await committed(workerHealthPort), await committed(workerHealthPort + 100)];
    expect(after[0]).toBeGreaterThan(before[0]);
    expect(after[1]).toBeGreaterThan(before[1]);
    expect(after[0] - before[0] + (after[1] - before[1])).toBe(tss.length);
    expect([pidOf("worker-1"), pidOf("worker-2")]).toEqual(workers);
    expect(runner.child.exitCode).toBeNull();
  });

  it("restarts the broker process after mosquitto itself is killed (it exits with code 1), 2 s as the second crash in a row", async () => {
    const mosq = (await mosquittoPid())!;
    const wrapper = pidOf("broker");
    const restartsBefore = log().split("[stack] broker restarted").length;
    const killTs = Date.now();
    process.kill(mosq, "SIGKILL");
    await waitFor("the runner to restart the broker process", async () => log().split("[stack] broker restarted").length > restartsBefore, 15_000, 25);
    expect(Date.now() - killTs).toBeGreaterThanOrEqual(2000);
    expect(log()).toMatch(/^\[broker\] .*mosquitto stopped on its own \(code \d+\); exiting so the supervisor restarts the broker$/m);
    expect(log()).toMatch(/^\[stack\] broker stopped unexpectedly \(code 1\); restarting it in 2 s \(crash 2 in a row\)$/m);
    expect(alive(wrapper)).toBe(false);
    await waitFor("the new mosquitto", async () => {
      const pid = await mosquittoPid().catch(() => null);
      return pid !== null && pid !== mosq ? pid : null;
    }, 30_000, 200);
    const tss = await publishReadings(10);
    await waitFor("the readings published after the restart to be stored", async () => (await storedCount(tss)) === tss.length, 20_000, 200);
    expect(runner.child.exitCode).toBeNull();
  });

  it("stops the broker process's mosquitto with the rest on SIGTERM", async () => {
    const mosq = (await mosquittoPid())!;
    const pids = ["broker", "worker-1", "worker-2"].map(pidOf);
    expect(await runner.stop("SIGTERM", 20_000)).toBe(0);
    for (const pid of [mosq, ...pids]) expect(alive(pid)).toBe(false);
  });
});
