// Starts Stillfield's processes in order, waits for each to be ready, prefixes their output,
// restarts one that stops on its own (with a growing delay: 1 s, 2 s, 4 s … 30 s; the others,
// the app too, stay up), and stops them all (in reverse order) on Ctrl-C / SIGTERM. Which broker
// and how many workers: scripts/stack-processes.ts (BROKER, WORKERS). Used by `npm run demo` (with the
// simulators) and by `npm test` (without them). Written here rather than with `concurrently`
// because start-up must be ordered by readiness (broker before worker before app) and a busy
// port must give a clear message before anything starts.
//   STACK_ONLY=smtp,broker,worker,mailer   start only the named processes (names as in the log;
//     a worker is "worker", or "worker-1" … with WORKERS > 1); an unknown name stops with a
//     message. The supervision drill (tests/integration/supervision.test.ts) runs the back end
//     this way, without the app, which needs a `next build`.
// Each start and restart is logged with the process id ("[stack] worker ready (pid 123)"), and each
// unexpected stop with its signal or code and the delay before the restart.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { getSettings } from "../lib/settings";
import { brokerAndWorkers, nextCrashCount, restartDelayMs } from "./stack-processes";

type Service = {
  name: string;
  /** file that must exist for the service to be part of the stack */
  needs?: string;
  cmd: string[];
  port?: number;
  readyTimeoutMs?: number;
  env?: Record<string, string>;
};

const root = path.resolve(import.meta.dirname, "..");
const mode = process.argv[2] === "demo" ? "demo" : "test";
const env = process.env;
const num = (v: string | undefined, d: number) => (v ? Number(v) : d);
const tsx = [process.execPath, "--import", "tsx"];

const services: Service[] = [
  { name: "smtp", needs: "ingest/smtp-sink.ts", cmd: [...tsx, "ingest/smtp-sink.ts"], port: num(env.SMTP_PORT, 2525) },
  ...brokerAndWorkers(getSettings(), tsx, env),
  { name: "mailer", needs: "ingest/mailer.ts", cmd: [...tsx, "ingest/mailer.ts"] },
  // local fakes of the hosted SMS, push and weather services (the SDKs are pointed at them), and the notifier
  { name: "sms-fake", needs: "ingest/sms-fake.ts", cmd: [...tsx, "ingest/sms-fake.ts"], port: num(env.SMS_FAKE_PORT, 9466) },
  { name: "notifier", needs: "ingest/notifier.ts", cmd: [...tsx, "ingest/notifier.ts"] },
  { name: "weather-fake", needs: "ingest/weather-fake.ts", cmd: [...tsx, "ingest/weather-fake.ts"], port: num(env.WEATHER_FAKE_PORT, 9468) },
  {
    name: "app",
    // our own server around Next: it hands the socket address to the sign-in throttle
    cmd: [process.execPath, "scripts/app-server.mjs", "-H", "127.0.0.1", "-p", String(num(env.APP_PORT, 3000))],
    port: num(env.APP_PORT, 3000),
    readyTimeoutMs: 60_000,
  },
];
if (mode === "demo") {
  // Labeller LB1 comes through the simulated Sparkplug edge node, with its network outages (simulators/sparkplug-line.ts)
  services.push({ name: "plant", needs: "simulators/plant.ts", cmd: [...tsx, "simulators/plant.ts"], env: { SIM_SPARKPLUG_LINE: env.SIM_SPARKPLUG_LINE ?? "on" } });
}

const only = (env.STACK_ONLY ?? "").split(",").map((n) => n.trim()).filter(Boolean);

const colours = ["36", "35", "33", "32", "34", "31", "90"];
const running: { svc: Service; child: ChildProcess; startedTs: number; crashes: number }[] = [];
let stopping = false;

function portOpen(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect({ host: "127.0.0.1", port });
    s.once("connect", () => {
      s.destroy();
      resolve(true);
    });
    s.once("error", () => resolve(false));
  });
}

/** A child killed by a signal keeps exitCode null: it has ended when either is set. */
const ended = (child: ChildProcess) => child.exitCode !== null || child.signalCode !== null;

async function waitForPort(svc: Service, child: ChildProcess): Promise<void> {
  const deadline = Date.now() + (svc.readyTimeoutMs ?? 30_000);
  while (Date.now() < deadline) {
    if (ended(child)) throw new Error(`${svc.name} exited (${child.signalCode ?? `code ${child.exitCode}`}) before it was ready`);
    if (await portOpen(svc.port!)) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${svc.name} did not open 127.0.0.1:${svc.port} in time`);
}

function pipe(stream: NodeJS.ReadableStream | null, prefix: string) {
  if (!stream) return;
  let buf = "";
  stream.setEncoding("utf8");
  stream.on("data", (chunk: string) => {
    buf += chunk;
    let i;
    while ((i = buf.indexOf("\n")) >= 0) {
      process.stdout.write(`${prefix} ${buf.slice(0, i)}\n`);
      buf = buf.slice(i + 1);
    }
  });
}

async function stopAll(code: number) {
  if (stopping) return;
  stopping = true;
  for (const { svc, child } of [...running].reverse()) {
    // a process that crashed and waits for its restart has nothing to stop
    if (ended(child)) continue;
    child.kill("SIGTERM");
    const done = await Promise.race([
      new Promise<boolean>((r) => child.once("exit", () => r(true))),
      new Promise<boolean>((r) => setTimeout(() => r(false), 8000)),
    ]);
    if (!done) {
      console.log(`[stack] ${svc.name} did not stop in 8 s; killing it`);
      child.kill("SIGKILL");
    }
  }
  process.exit(code);
}

async function main() {
  const unknown = only.filter((n) => !services.some((s) => s.name === n));
  if (unknown.length) {
    console.error(`[stack] STACK_ONLY names no process called ${unknown.join(", ")} (there are: ${services.map((s) => s.name).join(", ")}).`);
    process.exit(2);
  }
  const active = services.filter((s) => (!s.needs || fs.existsSync(path.join(root, s.needs))) && (only.length === 0 || only.includes(s.name)));
  for (const svc of active) {
    if (svc.port && (await portOpen(svc.port))) {
      console.error(
        `[stack] Port ${svc.port} on 127.0.0.1 (for ${svc.name}) is already in use by another program. ` +
          `Stop it (is another Stillfield running?) or pick other ports, e.g. APP_PORT=3001 MQTT_PORT=1885 npm run demo.`,
      );
      process.exit(3);
    }
  }
  let started = false;
  const launch = (entry: (typeof running)[number], i: number) => {
    const { svc } = entry;
    const child = spawn(svc.cmd[0], svc.cmd.slice(1), { cwd: root, env: { ...env, ...svc.env }, stdio: ["ignore", "pipe", "pipe"] });
    entry.child = child;
    entry.startedTs = Date.now();
    const prefix = `\x1b[${colours[i % colours.length]}m[${svc.name}]\x1b[0m`;
    pipe(child.stdout, prefix);
    pipe(child.stderr, prefix);
    child.on("exit", (code, signal) => {
      if (stopping) return;
      if (!started) {
        console.error(`[stack] ${svc.name} stopped unexpectedly while starting (${signal ?? `code ${code}`}); stopping everything.`);
        void stopAll(1);
        return;
      }
      entry.crashes = nextCrashCount(entry.crashes, Date.now() - entry.startedTs);
      const delay = restartDelayMs(entry.crashes);
      console.error(`[stack] ${svc.name} stopped unexpectedly (${signal ?? `code ${code}`}); restarting it in ${delay / 1000} s (crash ${entry.crashes} in a row)`);
      // not unref'd: when every process has crashed, this timer is what keeps the runner alive
      setTimeout(() => {
        if (stopping) return;
        launch(entry, i);
        console.log(`[stack] ${svc.name} restarted (pid ${entry.child.pid})`);
      }, delay);
    });
    return child;
  };
  for (const [i, svc] of active.entries()) {
    // a Ctrl-C / SIGTERM during the start: start nothing more (stopAll stops what it saw)
    if (stopping) return;
    const entry = { svc, child: null as unknown as ChildProcess, startedTs: 0, crashes: 0 };
    running.push(entry);
    const child = launch(entry, i);
    if (svc.port) await waitForPort(svc, child);
    console.log(`[stack] ${svc.name} ready${svc.port ? ` on 127.0.0.1:${svc.port}` : ""} (pid ${child.pid})`);
  }
  if (stopping) return;
  started = true;
  console.log("[stack] all services ready");
  if (process.env.STACK_READY_FILE) fs.writeFileSync(process.env.STACK_READY_FILE, String(Date.now()));
}

process.on("SIGINT", () => void stopAll(0));
process.on("SIGTERM", () => void stopAll(0));
main().catch((err) => {
  console.error(`[stack] ${err instanceof Error ? err.message : err}`);
  void stopAll(1);
});
