// The broker process of the Mosquitto profile (BROKER=mosquitto): Debian's mosquitto run
// privately on 127.0.0.1:MQTT_PORT (and the TLS listener when MQTT_TLS_PORT is set), with its
// configuration, credentials (dynamic-security plugin) and persistence under MOSQUITTO_DIR
// (default DATA_DIR/mosquitto/<DB_NAME>). This process writes the configuration, makes the
// plugin's admin once (`mosquitto_ctrl dynsec init`), starts mosquitto as its child with the
// devices held back until it has repaired the workers' restored sessions (device-gate.ts), keeps
// the plugin's clients and roles in step with the devices table (sync.ts), and serves counters on
// GET 127.0.0.1:BROKER_HEALTH_PORT/health. When mosquitto stops, so does this process (the
// supervisor restarts both); SIGTERM/SIGINT stop mosquitto cleanly (it saves its sessions).
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { closeDb, getDb } from "../../db/client";
import { z } from "zod";
import { getSettings } from "../../lib/settings";
import { startHealthServer } from "../health-server";
import { createLogger, describeError } from "../log";
import { ADMIN_USERNAME, findDynsecPlugin, mosquittoConfig, mosquittoFiles } from "./config";
import { closeDeviceGate, openDeviceGate } from "./device-gate";
import { DynsecClient } from "./dynsec-client";
import { repairWorkerSessions } from "./session-repair";
import { keepDynsecInStep, type SyncReport } from "./sync";

const log = createLogger("mosquitto");
const dynsecFileSchema = z.looseObject({ roles: z.array(z.looseObject({ rolename: z.string(), acls: z.array(z.looseObject({ topic: z.string() })) })) });

function portOpen(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect({ host: "127.0.0.1", port });
    s.once("connect", () => (s.destroy(), resolve(true)));
    s.once("error", () => resolve(false));
  });
}

/** A mosquitto of ours left running by a runner that was killed (kill -9) holds the port: stop it. */
function stopLeftOver(pidFile: string, conf: string): void {
  const pid = Number(fs.existsSync(pidFile) ? fs.readFileSync(pidFile, "utf8").trim() : NaN);
  if (!Number.isInteger(pid) || pid <= 1) return;
  let cmdline = "";
  try {
    cmdline = fs.readFileSync(`/proc/${pid}/cmdline`, "utf8").replaceAll("\0", " ");
  } catch {
    return; // not running
  }
  if (!cmdline.includes("mosquitto") || !cmdline.includes(conf)) return;
  log.warn(`stopping a mosquitto left running by an earlier start (pid ${pid})`);
  process.kill(pid, "SIGTERM");
  execFileSync("sh", ["-c", `for i in $(seq 1 50); do kill -0 ${pid} 2>/dev/null || exit 0; sleep 0.1; done; kill -9 ${pid} 2>/dev/null; exit 0`]);
}

/** the mosquitto being started (stopped with us if a signal comes before the start is done) */
let starting: ChildProcess | null = null;

export async function startMosquitto() {
  const s = getSettings();
  if (!s.MQTT_ADMIN_PASSWORD) throw new Error("MQTT_ADMIN_PASSWORD is not set (scripts/stack-env.sh makes one)");
  const files = mosquittoFiles(s);
  fs.mkdirSync(files.dir, { recursive: true, mode: 0o700 });
  if (!fs.existsSync(files.dynsec)) {
    execFileSync("mosquitto_ctrl", ["dynsec", "init", files.dynsec, ADMIN_USERNAME, s.MQTT_ADMIN_PASSWORD], { stdio: "ignore" });
    // the admin made by init may also read every topic; it needs $CONTROL only (changed here,
    // before the start, because changing a role over $CONTROL disconnects its holders)
    const initial = dynsecFileSchema.parse(JSON.parse(fs.readFileSync(files.dynsec, "utf8")));
    for (const role of initial.roles) if (role.rolename === "admin") role.acls = role.acls.filter((a) => a.topic.startsWith("$CONTROL/"));
    fs.writeFileSync(files.dynsec, JSON.stringify(initial, null, 2), { mode: 0o600 });
    fs.chmodSync(files.dynsec, 0o600);
    log.info(`made the dynamic-security admin ${ADMIN_USERNAME} in ${files.dynsec}`);
  }
  fs.writeFileSync(files.conf, mosquittoConfig(s, files, findDynsecPlugin()), { mode: 0o600 });
  stopLeftOver(files.pid, files.conf);
  if (await portOpen(s.MQTT_PORT)) throw new Error(`127.0.0.1:${s.MQTT_PORT} is taken by another program`);
  // devices stay out until the workers' restored sessions are repaired (device-gate.ts says why)
  const heldBack = closeDeviceGate(files);

  const child = spawn(s.MOSQUITTO_BIN, ["-c", files.conf], { stdio: ["ignore", "pipe", "pipe"] });
  starting = child;
  const forward = (buf: Buffer) => {
    for (const line of buf.toString("utf8").split("\n")) if (line.trim()) log.info(line.trim());
  };
  child.stdout.on("data", forward);
  child.stderr.on("data", forward);
  let stopping = false;
  const exited = new Promise<number>((resolve) => child.once("exit", (code, signal) => resolve(code ?? (signal ? 1 : 0))));
  void exited.then((code) => {
    if (stopping) return;
    log.error(`mosquitto stopped on its own (code ${code}); exiting so the supervisor restarts the broker`);
    process.exit(1);
  });
  const deadline = Date.now() + 15_000;
  while (!(await portOpen(s.MQTT_PORT))) {
    if (Date.now() > deadline) throw new Error("mosquitto did not open its port in 15 s");
    await new Promise((r) => setTimeout(r, 100));
  }

  const db = getDb();
  // before anything else: the workers' shared subscriptions, so no device message goes astray
  const repaired = await repairWorkerSessions(db, s, log).catch((err: unknown) => (log.warn("could not repair the workers' sessions", { error: describeError(err) }), []));
  if (repaired.length) log.info(`renewed the shared subscriptions of ${repaired.length} worker session(s)`, { workers: repaired });
  const dynsec = await DynsecClient.connect({ host: "127.0.0.1", port: s.MQTT_PORT, username: ADMIN_USERNAME, password: s.MQTT_ADMIN_PASSWORD, clientId: `stillfield-dynsec-${process.pid}` });
  if (heldBack.length) {
    await openDeviceGate(dynsec, files, heldBack);
    log.info(`let ${heldBack.length} device account(s) in, held back until the workers' sessions were repaired`);
  }
  let lastReport: (SyncReport & { ts: number }) | null = null;
  const stopSync = await keepDynsecInStep(
    db,
    dynsec,
    { sealKey: s.BROKER_SEAL_KEY, workerPassword: s.MQTT_WORKER_PASSWORD, appPassword: s.MQTT_APP_PASSWORD, adminUsername: ADMIN_USERNAME },
    s.BROKER_DEVICE_CHECK_MS,
    log,
    (r) => (lastReport = { ...r, ts: Date.now() }),
  );
  const startedTs = Date.now();
  const health = await startHealthServer(s.BROKER_HEALTH_PORT, () => ({ kind: "broker", engine: "mosquitto", pid: child.pid, startedTs, nowTs: Date.now(), lastSync: lastReport }));
  log.info(`mosquitto (pid ${child.pid}) on 127.0.0.1:${s.MQTT_PORT}${s.MQTT_TLS_PORT ? `, TLS on ${s.MQTT_TLS_HOST}:${s.MQTT_TLS_PORT}` : ""}; files in ${files.dir}`);

  async function stop(): Promise<void> {
    if (stopping) return;
    stopping = true;
    stopSync();
    health.close();
    await dynsec.close();
    child.kill("SIGTERM");
    const done = await Promise.race([exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), 8000).unref())]);
    if (!done) child.kill("SIGKILL");
    await closeDb().catch(() => undefined);
  }
  return { stop, pid: child.pid };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  let stopFn: (() => Promise<void>) | null = null;
  const onSignal = (sig: string) => {
    log.info(`${sig}: stopping mosquitto`);
    if (!stopFn) {
      // still starting: do not leave a mosquitto behind holding the port
      starting?.kill("SIGTERM");
      process.exit(1);
    }
    stopFn().then(
      () => process.exit(0),
      (err: unknown) => (log.error("stop failed", { error: describeError(err) }), process.exit(1)),
    );
  };
  process.on("SIGTERM", () => onSignal("SIGTERM"));
  process.on("SIGINT", () => onSignal("SIGINT"));
  startMosquitto()
    .then(({ stop }) => {
      stopFn = stop;
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      starting?.kill("SIGTERM");
      process.exit(1);
    });
}
