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
import { ingestProtocol, subscribeIngest } from "../ingest-subscriptions";
import type { Logger } from "../log";
import { describeError } from "../log";

export async function repairWorkerSessions(db: Db, s: Settings, log: Logger): Promise<string[]> {
  const rows = await getIngestStatus(db);
  const ids = rows.map((r) => r.workerId).filter((id) => !id.startsWith("broker") && !id.includes("@"));
  const repaired: string[] = [];
  for (const clientId of ids) {
    try {
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
      // messages the session had queued arrive here: their PUBACKs are held back for ever (the
      // ack() of DeferredAcks is never called), so the broker keeps them for the worker
      new DeferredAcks(c);
      const timer = setTimeout(() => c.end(true), 5000);
      const present = await new Promise<boolean>((resolve, reject) => {
        c.once("connect", (connack) => resolve(connack.sessionPresent));
        c.once("error", reject);
        c.once("close", () => reject(new Error("closed before it was repaired")));
      }).finally(() => clearTimeout(timer));
      if (present) {
        const stop = setTimeout(() => c.end(true), 5000);
        await new Promise<void>((resolve, reject) => {
          subscribeIngest(c, s, true, (err) => (err ? reject(err) : resolve()));
          c.once("close", () => reject(new Error("closed before it was repaired")));
        }).finally(() => clearTimeout(stop));
        repaired.push(clientId);
        // leave without acknowledging anything: what was sent here is sent to the worker again
        c.end(true);
      } else {
        await c.endAsync(false, { properties: { sessionExpiryInterval: 0 } });
      }
    } catch (err) {
      log.debug("could not repair a worker session", { clientId, error: describeError(err) });
    }
  }
  return repaired;
}
