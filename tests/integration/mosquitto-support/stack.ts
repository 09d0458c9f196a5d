// A private Mosquitto (the production entry point ingest/mosquitto/run.ts, Debian's mosquitto
// with the dynamic-security plugin) and ingest workers (ingest/worker.ts) as child processes on
// free ports, for the Mosquitto-profile tests and bench:scale. Nothing is mocked.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import mqtt, { type IClientOptions, type MqttClient } from "mqtt";
import { workerStatsSchema, type WorkerStats } from "../../../db/queries/ingest-diagnostics";
import { freePort, getJson, ROOT, spawnTs, waitFor, type Proc } from "../ingest-support/processes";

/** Installs mosquitto when missing (scripts/ensure-system.sh --mosquitto); true when it is there. */
export function ensureMosquitto(): boolean {
  if (fs.existsSync("/usr/sbin/mosquitto") && spawnSync("sh", ["-c", "command -v mosquitto_ctrl"]).status === 0) return true;
  return spawnSync("bash", [path.join(ROOT, "scripts/ensure-system.sh"), "--mosquitto"], { stdio: "inherit" }).status === 0;
}

export type MosquittoStack = {
  env: Record<string, string>;
  mqttPort: number;
  brokerHealthPort: number;
  dir: string;
  broker: Proc;
  workers: Map<number, Proc>;
  /** starts (or restarts) worker i (1-based) with its own client id, health port and spill folder */
  startWorker(i: number, extraEnv?: Record<string, string>): Promise<Proc>;
  workerHealthPort(i: number): number;
  /** worker i's own figures (its health endpoint), as IngestStack.workerStats gives the embedded profile's */
  workerStats(i: number): Promise<WorkerStats>;
  restartBroker(): Promise<void>;
  stop(): Promise<void>;
};

export async function startMosquittoStack(name: string, dbEnv: Record<string, string>, opts: { env?: Record<string, string> } = {}): Promise<MosquittoStack> {
  const dir = path.join(ROOT, ".data", "test-ingest", `mq-${name}`);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  const [mqttPort, brokerHealthPort] = [await freePort(), await freePort()];
  const healthPorts = [await freePort(), await freePort(), await freePort(), await freePort()];
  const env: Record<string, string> = {
    ...dbEnv,
    BROKER: "mosquitto",
    MQTT_HOST: "127.0.0.1",
    MQTT_PORT: String(mqttPort),
    MQTT_TLS_PORT: "0",
    BROKER_HEALTH_PORT: String(brokerHealthPort),
    MOSQUITTO_DIR: path.join(dir, "mosquitto"),
    MQTT_WORKER_PASSWORD: `worker-${name}-secret-0123456789`,
    MQTT_APP_PASSWORD: `app-${name}-secret-0123456789`,
    MQTT_ADMIN_PASSWORD: `admin-${name}-secret-0123456789`,
    DATA_DIR: dir,
    BROKER_DEVICE_CHECK_MS: "300",
    INGEST_STATUS_INTERVAL_MS: "500",
    DB_POOL_SIZE: "6",
    ...opts.env,
  };
  const startBroker = async () => {
    const p = spawnTs("mosquitto", "ingest/mosquitto/run.ts", [], env);
    await waitFor("the Mosquitto runner's first credential sync", () => getJson(`http://127.0.0.1:${brokerHealthPort}/health`).then((h) => h !== null && typeof h === "object" && "lastSync" in h && h.lastSync !== null), 30_000).catch((err) => {
      throw new Error(`${String(err)}\n--- mosquitto runner output ---\n${p.output()}`);
    });
    return p;
  };
  const stack: MosquittoStack = {
    env,
    mqttPort,
    brokerHealthPort,
    dir,
    broker: await startBroker(),
    workers: new Map(),
    workerHealthPort: (i) => healthPorts[i - 1],
    workerStats: async (i) => workerStatsSchema.parse(await getJson(`http://127.0.0.1:${healthPorts[i - 1]}/health`)),
    async startWorker(i, extraEnv = {}) {
      const p = spawnTs(`worker-${i}`, "ingest/worker.ts", [], {
        ...env,
        INGEST_CLIENT_ID: `mq-${name}-${i}`,
        WORKER_HEALTH_PORT: String(healthPorts[i - 1]),
        SPARKPLUG_HOST: i === 1 ? "on" : "off",
        ...extraEnv,
      });
      stack.workers.set(i, p);
      await waitFor(`worker ${i}'s health endpoint`, () => getJson(`http://127.0.0.1:${healthPorts[i - 1]}/health`).then(Boolean), 60_000).catch((err) => {
        throw new Error(`${String(err)}\n--- worker ${i} output ---\n${p.output()}`);
      });
      return p;
    },
    async restartBroker() {
      await stack.broker.stop("SIGTERM");
      stack.broker = await startBroker();
    },
    async stop() {
      await Promise.all([...stack.workers.values()].map((w) => w.stop("SIGTERM")));
      await stack.broker.stop("SIGTERM");
    },
  };
  return stack;
}

/** An MQTT client; rejects with the broker's refusal (its `code` is the CONNACK reason). */
export function connectMqtt(port: number, opts: IClientOptions): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const c = mqtt.connect({ host: "127.0.0.1", port, reconnectPeriod: 0, connectTimeout: 5000, ...opts });
    c.once("connect", () => resolve(c));
    c.once("error", (err) => {
      c.end(true);
      reject(err);
    });
    c.once("close", () => reject(new Error("closed before CONNACK")));
  });
}

/** The CONNACK refusal code of a sign-in attempt (0 when it was accepted). */
export async function signInCode(port: number, opts: IClientOptions): Promise<number> {
  try {
    const c = await connectMqtt(port, opts);
    await c.endAsync();
    return 0;
  } catch (err) {
    const code = err !== null && typeof err === "object" && "code" in err ? Number(err.code) : -1;
    return code;
  }
}
