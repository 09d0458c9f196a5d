// Which broker and how many ingest workers scripts/run-stack.ts starts (lib/settings.ts):
//   BROKER=embedded   ingest/broker.ts (aedes), one worker (MQTT 3.1.1 has no shared subscriptions)
//   BROKER=mosquitto  ingest/mosquitto/run.ts (Debian's mosquitto, private), WORKERS workers
//   BROKER=external   no broker of ours; WORKERS workers against MQTT_HOST:MQTT_PORT
// Worker i (1-based) gets its own client id (its persistent session), health port (the first
// one's + 100·(i−1)) and spill folder; only the first runs the Sparkplug host. With more than
// one worker the alert owner is chosen by lease (ALERTS_OWNER=lease), unless set otherwise.
// Also the supervisor's restart delay and crash count (pure).
import type { Settings } from "../lib/settings";

export type StackProcess = { name: string; needs?: string; cmd: string[]; port?: number; env?: Record<string, string>; readyTimeoutMs?: number };

export function brokerAndWorkers(s: Settings, tsx: string[], env: NodeJS.ProcessEnv): StackProcess[] {
  const out: StackProcess[] = [];
  if (s.BROKER === "embedded") out.push({ name: "broker", needs: "ingest/broker.ts", cmd: [...tsx, "ingest/broker.ts"], port: s.MQTT_PORT });
  if (s.BROKER === "mosquitto") out.push({ name: "broker", needs: "ingest/mosquitto/run.ts", cmd: [...tsx, "ingest/mosquitto/run.ts"], port: s.MQTT_PORT, readyTimeoutMs: 20_000 });
  const workers = s.BROKER === "embedded" ? 1 : s.WORKERS;
  const baseId = s.INGEST_CLIENT_ID.replace(/-\d+$/, "");
  for (let i = 1; i <= workers; i++) {
    const extra: Record<string, string> = {};
    if (workers > 1) {
      extra.INGEST_CLIENT_ID = `${baseId}-${i}`;
      extra.WORKER_HEALTH_PORT = String(s.WORKER_HEALTH_PORT + 100 * (i - 1));
      if (i > 1) extra.SPARKPLUG_HOST = "off";
      if (!env.ALERTS_OWNER) extra.ALERTS_OWNER = "lease";
      // the owner's save is small (changed rows and its journal position): save often, so a
      // successor has little to read again
      if (!env.ALERTS_SNAPSHOT_EVERY_MS) extra.ALERTS_SNAPSHOT_EVERY_MS = "2000";
    }
    out.push({
      name: workers > 1 ? `worker-${i}` : "worker",
      needs: "ingest/worker.ts",
      cmd: [tsx[0], ...WORKER_NODE_ARGS, ...tsx.slice(1), "ingest/worker.ts"],
      port: Number(extra.WORKER_HEALTH_PORT ?? s.WORKER_HEALTH_PORT),
      env: extra,
    });
  }
  return out;
}

/**
 * Node options of every ingest worker (also in scripts/systemd/stillfield-worker@.service). The
 * worker keeps little between batches, and V8's default 16 MB semi-spaces kept its resident
 * memory near 190 MB at 2,000 readings/s; with 2 MB it stays near 135 MB at the same rate and
 * throughput (npm run bench:ingest, (d2)).
 */
export const WORKER_NODE_ARGS = ["--max-semi-space-size=2"];

/** Restart delay after the n-th crash in a row: 1 s, 2 s, 4 s … at most 30 s. */
export function restartDelayMs(crashesInARow: number): number {
  return Math.min(30_000, 1000 * 2 ** Math.max(0, crashesInARow - 1));
}

/** A process that ran this long before it crashed starts its count again. */
export const STABLE_AFTER_MS = 60_000;

/** The crash count after a crash, from the count before and how long the process had run. */
export function nextCrashCount(before: number, ranMs: number): number {
  return ranMs > STABLE_AFTER_MS ? 1 : before + 1;
}
