// How an ingest worker connects and subscribes, by broker (BROKER in lib/settings.ts):
// - embedded (aedes, MQTT 3.1.1): one worker, plain subscriptions.
// - mosquitto / external (MQTT 5): each worker subscribes through the shared subscription
//   $share/<INGEST_SHARE_GROUP>/…, so the broker hands every message to exactly one of the
//   workers; each keeps a persistent session (its own client id, a long session expiry), so what
//   a stopped or killed worker had not acknowledged waits for it and is sent again when it returns.
import type { IClientOptions, ISubscriptionGrant, MqttClient } from "mqtt";
import { ALL_DEVICE_READINGS, ALL_DEVICE_STATUS } from "../lib/contract/topics";
import type { Settings } from "../lib/settings";

/** a week: a worker down for longer than that loses its queued messages */
export const WORKER_SESSION_EXPIRY_S = 7 * 24 * 3600;

/**
 * How the worker connects. On MQTT 5 the receive maximum is the broker's send window to the
 * worker, which acknowledges only after commit (one flush every INGEST_FLUSH_MS): the window
 * must hold what arrives during a flush and its commit. At 1,000 one worker on Mosquitto
 * managed 34,000–36,000 readings/s with Mosquitto queueing the rest (13 µs of its CPU per
 * message); at 5,000, 60,000/s and 8–9 µs (`npm run bench:scale`). INGEST_MAX_UNACKED (20,000)
 * still bounds what a worker holds.
 */
export function ingestProtocol(s: Pick<Settings, "BROKER">): Pick<IClientOptions, "protocolVersion" | "properties"> {
  if (s.BROKER === "embedded") return { protocolVersion: 4 };
  return { protocolVersion: 5, properties: { sessionExpiryInterval: WORKER_SESSION_EXPIRY_S, receiveMaximum: 5000 } };
}

export function ingestSubscriptions(s: Pick<Settings, "BROKER" | "INGEST_SHARE_GROUP">): string[] {
  const topics = [ALL_DEVICE_READINGS, ALL_DEVICE_STATUS];
  if (s.BROKER === "embedded") return topics;
  return topics.map((t) => `$share/${s.INGEST_SHARE_GROUP}/${t}`);
}

/**
 * Subscribes a worker's connection. Mosquitto 2.0.11 restores a persistent session's shared
 * subscription after a restart in a state that delivers nothing, and subscribing again to the
 * same filter does not repair it; unsubscribing first does (renewIngestSubscriptions). But while
 * a shared subscription is unsubscribed and no other member of the group is subscribed, the
 * broker still acknowledges device messages (PUBACK reason 0, not 16 "no matching
 * subscribers") and drops them: two workers reconnecting together after a broker restart both
 * renew at once, and each renewal opens such a gap while devices are already sending.
 * - mosquitto: our broker process renews every worker session right after a start, while devices
 *   are held back (ingest/mosquitto/session-repair.ts, device-gate.ts), so a worker only
 *   subscribes (a no-op on a working subscription; a fresh one if the renewal was cut short).
 * - external: nobody else repairs; a worker that finds its session present renews it itself.
 */
export function subscribeIngest(
  client: MqttClient,
  s: Pick<Settings, "BROKER" | "INGEST_SHARE_GROUP">,
  sessionPresent: boolean,
  done: (err: Error | null, granted?: ISubscriptionGrant[]) => void,
): void {
  if (s.BROKER === "external" && sessionPresent) return renewIngestSubscriptions(client, s, done);
  subscribeAt1(client, ingestSubscriptions(s), done);
}

function subscribeAt1(client: MqttClient, topics: string[], done: (err: Error | null, granted?: ISubscriptionGrant[]) => void): void {
  client.subscribe(Object.fromEntries(topics.map((t) => [t, { qos: 1 as const }])), (err, granted) => done(err ?? null, granted));
}

/** Unsubscribes, then subscribes again: repairs a shared subscription Mosquitto restored broken. */
export function renewIngestSubscriptions(client: MqttClient, s: Pick<Settings, "BROKER" | "INGEST_SHARE_GROUP">, done: (err: Error | null, granted?: ISubscriptionGrant[]) => void): void {
  const topics = ingestSubscriptions(s);
  // an answer "no subscription existed" (a renewal cut short earlier) is fine: subscribe all the same
  client.unsubscribe(topics, () => subscribeAt1(client, topics, done));
}
