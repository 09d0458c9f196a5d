// Pieces of scripts/bench-scale.ts: CPU time of a process, and a stream of one-reading QoS 1
// messages from several device connections at once, each with a window of unacknowledged ones.
import fs from "node:fs";
import type { MqttClient } from "mqtt";

/** CPU time (user + system) a process has used so far, ms (/proc/<pid>/stat fields 14 and 15, 100 ticks/s). */
export function cpuMs(pid: number | undefined): number {
  if (!pid) return NaN;
  try {
    const fields = fs.readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return NaN;
  }
}

export type Publisher = { client: MqttClient; code: string };

/**
 * Sends `total` messages spread over the publishers (reading times fromTs, fromTs + 10 ms, … per
 * device), `window` unacknowledged per publisher. onAck gets each message the broker
 * acknowledged; onProgress the count sent so far (for drills). Resolves when every message is
 * acknowledged, or when nothing has been acknowledged for 60 s (it says how many were not).
 */
export function publishStream(
  pubs: Publisher[],
  total: number,
  fromTs: number,
  onAck: (code: string, ts: number) => void,
  onProgress?: (sent: number) => void | Promise<void>,
  window = 200,
): Promise<{ unacked: number }> {
  const perDevice = Math.ceil(total / pubs.length);
  let sent = 0;
  let acked = 0;
  let lastAckTs = Date.now();
  return new Promise((resolve) => {
    const state = pubs.map(() => ({ next: 0, inFlight: 0 }));
    const finish = () => resolve({ unacked: total - acked });
    const watchdog = setInterval(() => {
      if (Date.now() - lastAckTs > 60_000) {
        clearInterval(watchdog);
        finish();
      }
    }, 1000);
    const pump = (d: number) => {
      const st = state[d];
      const { client, code } = pubs[d];
      while (st.inFlight < window && st.next < perDevice && sent < total) {
        const ts = fromTs + st.next * 10;
        st.next++;
        st.inFlight++;
        sent++;
        if (onProgress) void onProgress(sent);
        client.publish(`stillfield/d/${code}/readings`, `{"ts":${ts},"values":{"charge_kv":${((st.next % 50) / 10).toFixed(1)}}}`, { qos: 1 }, (err) => {
          st.inFlight--;
          if (!err) {
            acked++;
            lastAckTs = Date.now();
            onAck(code, ts);
          }
          if (acked >= total) {
            clearInterval(watchdog);
            finish();
          } else pump(d);
        });
      }
    };
    pubs.forEach((_, d) => pump(d));
  });
}
