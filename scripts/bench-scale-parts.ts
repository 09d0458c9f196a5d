// Pieces of scripts/bench-scale.ts: CPU time of a process, a stream of one-reading QoS 1
// messages from several device connections at once, each with a window of unacknowledged ones,
// and the drill's account of readings acknowledged but not stored.
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
 * device), `window` unacknowledged per publisher. A message whose publish fails (the client
 * gave it up, e.g. its connection was refused) is sent again 200 ms later, as a device keeps a
 * reading until it is acknowledged. onAck gets each message the broker acknowledged; onProgress
 * the count sent so far (for drills). Resolves when every message is acknowledged, or when
 * nothing has been acknowledged for 60 s (it says how many were not, and the publish errors).
 */
export function publishStream(
  pubs: Publisher[],
  total: number,
  fromTs: number,
  onAck: (code: string, ts: number, reasonCode: number) => void,
  onProgress?: (sent: number) => void | Promise<void>,
  window = 200,
): Promise<{ unacked: number; errors: number; lastError: string }> {
  const perDevice = Math.ceil(total / pubs.length);
  let sent = 0;
  let acked = 0;
  let errors = 0;
  let lastError = "";
  let lastAckTs = Date.now();
  return new Promise((resolve) => {
    const state = pubs.map(() => ({ next: 0, inFlight: 0, again: [] as number[] }));
    const finish = () => resolve({ unacked: total - acked, errors, lastError });
    const watchdog = setInterval(() => {
      if (Date.now() - lastAckTs > 60_000) {
        clearInterval(watchdog);
        finish();
      }
    }, 1000);
    const send = (d: number, ts: number) => {
      const st = state[d];
      const { client, code } = pubs[d];
      st.inFlight++;
      client.publish(`stillfield/d/${code}/readings`, `{"ts":${ts},"values":{"charge_kv":${((((ts - fromTs) / 10) % 50) / 10).toFixed(1)}}}`, { qos: 1 }, (err, packet) => {
        st.inFlight--;
        if (err) {
          errors++;
          lastError = err.message;
          setTimeout(() => (st.again.push(ts), pump(d)), 200);
          return;
        }
        acked++;
        lastAckTs = Date.now();
        // MQTT 5: 16 = "no matching subscribers" (mqtt.js counts it as a success)
        onAck(code, ts, packet && "reasonCode" in packet ? Number(packet.reasonCode ?? 0) : 0);
        if (acked >= total) {
          clearInterval(watchdog);
          finish();
        } else pump(d);
      });
    };
    const pump = (d: number) => {
      const st = state[d];
      while (st.inFlight < window && st.again.length) send(d, st.again.shift()!);
      while (st.inFlight < window && st.next < perDevice && sent < total) {
        const ts = fromTs + st.next * 10;
        st.next++;
        sent++;
        if (onProgress) void onProgress(sent);
        send(d, ts);
      }
    };
    pubs.forEach((_, d) => pump(d));
  });
}

/** When the broker acknowledged a reading, and its PUBACK reason (MQTT 5 §3.4.2.1). */
export type Ack = { at: number; reasonCode: number };
/** A broker restart: from the stop to the runner's first credential sync (devices let in). */
export type RestartWindow = { begin: number; back: number };

/**
 * One line on the readings acknowledged but not stored, by when the broker acknowledged them:
 * before a restart (they waited in a worker's session), while a restarted broker was starting
 * (before the workers' sessions were repaired), or after; with how many a plain subscriber saw
 * (the broker routed them; when there is one) and how many were acknowledged "no matching
 * subscribers" (16).
 */
export function describeLost(missing: string[], acks: Map<string, Ack>, windows: RestartWindow[], seen: Set<string> | null): string {
  let before = 0;
  let starting = 0;
  let after = 0;
  for (const k of missing) {
    const at = acks.get(k)?.at ?? 0;
    if (windows.some((w) => at >= w.begin && at <= w.back)) starting++;
    else if (windows.length === 0 || at < windows[0].begin) before++;
    else after++;
  }
  const routed = seen ? `seen by a plain subscriber ${missing.filter((k) => seen.has(k)).length}; ` : "";
  const noSubscribers = [...acks.values()].filter((a) => a.reasonCode === 16).length;
  return (
    `not stored ${missing.length}, acknowledged: before the first restart ${before}, while a restarted broker was starting ${starting}, after ${after}; ` +
    `${routed}acknowledged "no matching subscribers" ${noSubscribers} of ${acks.size}`
  );
}
