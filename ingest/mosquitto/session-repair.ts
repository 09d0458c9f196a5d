// Right after the private Mosquitto starts: repair the shared subscriptions of the workers'
// persistent sessions (ingest/ingest-subscriptions.ts says why), while devices are still held
// back (device-gate.ts), so nothing a device sends after a restart goes to a subscription that
// delivers nothing. The workers' client ids are those that report to ingest_status. A session
// the broker does not have is not created (ended at once with a session expiry of 0).
import mqtt from "mqtt";
import { getIngestStatus } from "../../db/queries/ingest-diagnostics";
import type { Db } from "../../db/client";
import type { Settings } from "../../lib/settings";
import { SERVICE_ACCOUNTS } from "../../lib/settings";
import { DeferredAcks } from "../deferred-acks";
import { ingestProtocol, renewIngestSubscriptions } from "../ingest-subscriptions";
import type { Logger } from "../log";
import { describeError } from "../log";

/** Renews one worker session's shared subscriptions; "absent" when the broker has no such session. */
async function repairOne(clientId: string, s: Settings): Promise<"repaired" | "absent"> {
  const c = mqtt.connect({
    host: "127.0.0.1",
    port: s.MQTT_PORT,
    ...ingestProtocol(s),
    clientId,
    clean: false,
    username: SERVICE_ACCOUNTS.worker,
    password: s.MQTT_WORKER_PASSWORD,
    reconnectPeriod: 0,
    connectTimeout: 3000,
    // one queued message in flight at most, never acknowledged (see below)
    properties: { sessionExpiryInterval: ingestProtocol(s).properties?.sessionExpiryInterval, receiveMaximum: 1 },
  });
  c.on("error", () => undefined); // reported through the promises below
  // messages the session had queued arrive here: their PUBACKs are held back for ever (the
  // ack() of DeferredAcks is never called), so the broker keeps them for the worker
  new DeferredAcks(c);
  const timer = setTimeout(() => c.end(true), 5000);
  const present = await new Promise<boolean>((resolve, reject) => {
    c.once("connect", (connack) => resolve(connack.sessionPresent));
    c.once("error", reject);
    c.once("close", () => reject(new Error("closed before it was repaired")));
  }).finally(() => clearTimeout(timer));
  if (!present) {
    await c.endAsync(false, { properties: { sessionExpiryInterval: 0 } });
    return "absent";
  }
  const stop = setTimeout(() => c.end(true), 5000);
  try {
    await new Promise<void>((resolve, reject) => {
      renewIngestSubscriptions(c, s, (err) => (err ? reject(err) : resolve()));
      // e.g. the worker came back meanwhile and took its session over: tried again
      c.once("close", () => reject(new Error("closed before it was repaired")));
    });
  } finally {
    clearTimeout(stop);
    // leave without acknowledging anything: what was sent here is sent to the worker again
    c.end(true);
  }
  return "repaired";
}

export async function repairWorkerSessions(db: Db, s: Settings, log: Logger): Promise<string[]> {
  const rows = await getIngestStatus(db);
  const ids = rows.map((r) => r.workerId).filter((id) => !id.startsWith("broker") && !id.includes("@"));
  const repaired: string[] = [];
  for (const clientId of ids) {
    for (let attempt = 1; ; attempt++) {
      try {
        if ((await repairOne(clientId, s)) === "repaired") repaired.push(clientId);
        break;
      } catch (err) {
        // a worker only subscribes on the Mosquitto profile (ingest-subscriptions.ts): left broken, its session would deliver nothing
        if (attempt >= 3) {
          log.warn("could not repair a worker session; its share of device messages may go nowhere until the broker process restarts", { clientId, error: describeError(err) });
          break;
        }
        await new Promise((r) => setTimeout(r, 200));
      }
    }
  }
  return repaired;
}
