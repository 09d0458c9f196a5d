// Starts the real broker and ingest worker as child processes on free ports for the ingest
// integration tests (and the benchmark), plus MQTT clients signed in as devices or as the
// service account. Nothing here mocks anything: the children are the production entry points.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import mqtt, { type IClientOptions, type MqttClient } from "mqtt";
import { workerStatsSchema, type WorkerStats } from "../../../db/queries/ingest-diagnostics";
import { SERVICE_ACCOUNTS, type ServiceRole } from "../../../lib/settings";
import { WORKER_NODE_ARGS } from "../../../scripts/stack-processes";

export const ROOT = path.resolve(import.meta.dirname, "../../..");

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const addr = srv.address();
      const port = typeof addr === "object" && addr ? addr.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

export type Proc = {
  name: string;
  child: ChildProcess;
  output: () => string;
  /** sends the signal and resolves with the exit code once the process has ended */
  stop(signal?: NodeJS.Signals, timeoutMs?: number): Promise<number | null>;
  /** waits for the process to end by itself (killed after the timeout); its exit code */
  exit(timeoutMs: number): Promise<number | null>;
};

export function spawnTs(name: string, file: string, args: string[], env: Record<string, string>, nodeArgs: string[] = []): Proc {
  const child = spawn(process.execPath, [...nodeArgs, "--import", "tsx", file, ...args], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  const keep = (chunk: Buffer) => {
    out += chunk.toString("utf8");
    if (out.length > 400_000) out = out.slice(-200_000);
    if (process.env.INGEST_TEST_VERBOSE) process.stdout.write(`[${name}] ${chunk.toString("utf8")}`);
  };
  child.stdout?.on("data", keep);
  child.stderr?.on("data", keep);
  const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));
  return {
    name,
    child,
    output: () => out,
    async exit(timeoutMs) {
      if (child.exitCode !== null || child.signalCode !== null) return child.exitCode;
      const t = setTimeout(() => child.kill("SIGKILL"), timeoutMs);
      const code = await exited;
      clearTimeout(t);
      return code;
    },
    async stop(signal = "SIGTERM", timeoutMs = 15_000) {
      if (child.exitCode !== null || child.signalCode !== null) return child.exitCode;
      child.kill(signal);
      const t = setTimeout(() => child.kill("SIGKILL"), timeoutMs);
      const code = await exited;
      clearTimeout(t);
      return code;
    },
  };
}

export async function waitFor<T>(what: string, fn: () => Promise<T | null | undefined | false>, timeoutMs = 30_000, everyMs = 100): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let lastErr: unknown;
  while (Date.now() < deadline) {
    try {
      const v = await fn();
      if (v) return v;
    } catch (err) {
      lastErr = err;
    }
    await new Promise((r) => setTimeout(r, everyMs));
  }
  throw new Error(`Timed out waiting for ${what}${lastErr ? `: ${String(lastErr)}` : ""}`);
}

export async function getJson(url: string): Promise<unknown> {
  const res = await fetch(url);
  if (!res.ok) throw new Error(`${url}: HTTP ${res.status}`);
  return res.json();
}

export type IngestStack = {
  env: Record<string, string>;
  mqttPort: number;
  workerHealthPort: number;
  brokerHealthPort: number;
  dataDir: string;
  broker: Proc;
  worker: Proc | null;
  startWorker(extraEnv?: Record<string, string>, nodeArgs?: string[]): Promise<Proc>;
  workerStats(sinceMs?: number): Promise<WorkerStats>;
  brokerStats(): Promise<{ refused: { auth: number; publish: number; subscribe: number; oversized: number; connections: number }; kicked: number; messagesIn: number }>;
  stop(): Promise<void>;
};

/**
 * Broker + worker for one test database. `name` keeps each suite's spill folder and client id
 * apart. Extra env tunes intervals (e.g. INGEST_DEVICE_REFRESH_MS) for short tests.
 */
export async function startIngestStack(
  name: string,
  dbEnv: Record<string, string>,
  opts: { env?: Record<string, string>; startWorker?: boolean; brokerNodeArgs?: string[] } = {},
): Promise<IngestStack> {
  const dataDir = path.join(ROOT, ".data", "test-ingest", name);
  fs.rmSync(dataDir, { recursive: true, force: true });
  fs.mkdirSync(dataDir, { recursive: true });
  const [mqttPort, workerHealthPort, brokerHealthPort] = [await freePort(), await freePort(), await freePort()];
  const env: Record<string, string> = {
    ...dbEnv,
    MQTT_HOST: "127.0.0.1",
    MQTT_PORT: String(mqttPort),
    WORKER_HEALTH_PORT: String(workerHealthPort),
    BROKER_HEALTH_PORT: String(brokerHealthPort),
    MQTT_WORKER_PASSWORD: `worker-${name}-secret`,
    MQTT_APP_PASSWORD: `app-${name}-secret`,
    DATA_DIR: dataDir,
    INGEST_CLIENT_ID: `ingest-test-${name}`,
    BROKER_ID: `broker-test-${name}`,
    INGEST_STATUS_INTERVAL_MS: "500",
    DB_POOL_SIZE: "6",
    // no TLS listener unless a test asks for one (the stack's own port is another's)
    MQTT_TLS_PORT: "0",
    ...opts.env,
  };
  const broker = spawnTs("broker", "ingest/broker.ts", [], env, opts.brokerNodeArgs ?? []);
  await waitFor("the broker's health endpoint", () => getJson(`http://127.0.0.1:${brokerHealthPort}/health`).then(Boolean), 30_000).catch((err) => {
    throw new Error(`${String(err)}\n--- broker output ---\n${broker.output()}`);
  });

  const stack: IngestStack = {
    env,
    mqttPort,
    workerHealthPort,
    brokerHealthPort,
    dataDir,
    broker,
    worker: null,
    async startWorker(extraEnv = {}, nodeArgs = WORKER_NODE_ARGS) {
      const w = spawnTs("worker", "ingest/worker.ts", [], { ...env, ...extraEnv }, nodeArgs);
      stack.worker = w;
      await waitFor("the worker's health endpoint", () => getJson(`http://127.0.0.1:${workerHealthPort}/health`).then(Boolean), 60_000).catch((err) => {
        throw new Error(`${String(err)}\n--- worker output ---\n${w.output()}`);
      });
      return w;
    },
    async workerStats(sinceMs) {
      const raw = await getJson(`http://127.0.0.1:${workerHealthPort}/health${sinceMs ? `?sinceMs=${sinceMs}` : ""}`);
      return workerStatsSchema.parse(raw);
    },
    async brokerStats() {
      const raw = await getJson(`http://127.0.0.1:${brokerHealthPort}/health`);
      const parsed = brokerStatsShape(raw);
      return parsed;
    },
    async stop() {
      if (stack.worker) await stack.worker.stop("SIGTERM");
      await broker.stop("SIGTERM");
    },
  };
  if (opts.startWorker !== false) await stack.startWorker();
  return stack;
}

function brokerStatsShape(raw: unknown) {
  const num = (v: unknown) => (typeof v === "number" ? v : NaN);
  const obj = (v: unknown): Record<string, unknown> => (v && typeof v === "object" ? Object.fromEntries(Object.entries(v)) : {});
  const r = obj(raw);
  const refused = obj(r.refused);
  return {
    refused: { auth: num(refused.auth), publish: num(refused.publish), subscribe: num(refused.subscribe), oversized: num(refused.oversized), connections: num(refused.connections) },
    kicked: num(r.kicked),
    messagesIn: num(r.messagesIn),
  };
}

/** Connects an MQTT client and resolves once connected (rejects on a refused sign-in). */
export function connectClient(port: number, opts: IClientOptions): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const c = mqtt.connect({ host: "127.0.0.1", port, protocolVersion: 4, reconnectPeriod: 0, connectTimeout: 5000, ...opts });
    const onError = (err: Error) => {
      c.end(true);
      reject(err);
    };
    c.once("error", onError);
    c.once("close", () => reject(new Error("connection closed before CONNACK")));
    c.once("connect", () => {
      c.off("error", onError);
      c.on("error", () => undefined);
      resolve(c);
    });
  });
}

export function connectDevice(stack: IngestStack, code: string, secret: string, extra: IClientOptions = {}): Promise<MqttClient> {
  return connectClient(stack.mqttPort, { clientId: code, username: code, password: secret, clean: true, ...extra });
}

/** User name and password of one of the two service accounts (lib/settings.ts, ingest/broker-acl.ts). */
export function serviceAccount(stack: IngestStack, role: ServiceRole): { username: string; password: string } {
  return { username: SERVICE_ACCOUNTS[role], password: role === "worker" ? stack.env.MQTT_WORKER_PASSWORD : stack.env.MQTT_APP_PASSWORD };
}

/** A client signed in as the worker's account (reads device topics, writes internal ones) or the app's. */
export function connectService(stack: IngestStack, clientId: string, role: ServiceRole = "worker"): Promise<MqttClient> {
  return connectClient(stack.mqttPort, { clientId, ...serviceAccount(stack, role), clean: true });
}

export function publishAsync(c: MqttClient, topic: string, payload: string | Buffer, qos: 0 | 1 = 1): Promise<void> {
  return new Promise((resolve, reject) => c.publish(topic, payload, { qos }, (err) => (err ? reject(err) : resolve())));
}

export function endClient(c: MqttClient): Promise<void> {
  return new Promise((resolve) => c.end(false, {}, () => resolve()));
}
