// Keeps devices out of a freshly started Mosquitto until the workers' sessions are repaired.
//
// Mosquitto 2.0.11 restores a persistent session's shared subscription ($share/<group>/…) in a
// state that delivers nothing (ingest/ingest-subscriptions.ts). A device that signs in before
// the repair (session-repair.ts) publishes into that subscription: the broker acknowledges each
// message (PUBACK, reason 0) and drops it. Measured with bench:scale (BENCH_DRILL=restart): every
// reading lost in a restart was acknowledged by the new broker in the ~0.3–1 s between its
// start and the end of the repair, and seen by a plain (not shared) subscriber.
//
// So, before mosquitto starts from a persistence file, every device's client of the
// dynamic-security plugin (one holding a device role) is marked disabled in the plugin's file: a
// device that comes back early is refused at sign-in (CONNACK "not authorized") and retries;
// nothing it holds is acknowledged and dropped. Service accounts, the admin and Sparkplug edge
// nodes (read by the Sparkplug host's own, not shared, subscription) are not held back. Once the sessions are repaired, the same clients
// are enabled again over $CONTROL, and the credential sync (sync.ts) then repairs any drift from
// the devices table as usual. The names held back are kept in a file beside the plugin's, so a
// start interrupted between the two steps lets them in at the next start.
import fs from "node:fs";
import path from "node:path";
import { z } from "zod";
import { deviceRoleName } from "../../lib/broker/dynsec-plan";
import type { DynsecClient } from "./dynsec-client";

const dynsecClientsSchema = z.looseObject({
  clients: z.array(z.looseObject({ username: z.string(), disabled: z.boolean().optional(), roles: z.array(z.looseObject({ rolename: z.string() })).optional() })).default([]),
});
/** a device's client holds its device role (lib/broker/dynsec-plan.ts) */
const DEVICE_ROLE_PREFIX = deviceRoleName("");
const heldBackSchema = z.array(z.string().max(256)).max(1_000_000);

export type GateFiles = { dir: string; dynsec: string };

export const heldBackFile = (files: GateFiles) => path.join(files.dir, "devices-held-back.json");
/** Mosquitto's persistence file: without it there is no session to restore, and nothing to repair. */
const persistenceFile = (files: GateFiles) => path.join(files.dir, "mosquitto.db");

function readHeldBack(files: GateFiles): string[] {
  const file = heldBackFile(files);
  if (!fs.existsSync(file)) return [];
  try {
    return heldBackSchema.parse(JSON.parse(fs.readFileSync(file, "utf8")));
  } catch {
    return []; // a torn file: the credential sync enables whatever the devices table says
  }
}

/**
 * Before mosquitto starts: disables in the plugin's file every enabled device client, when there
 * are sessions to restore. Returns the names to let in after the repair (those disabled now and
 * those an interrupted start left held back).
 */
export function closeDeviceGate(files: GateFiles): string[] {
  const earlier = readHeldBack(files);
  if (!fs.existsSync(persistenceFile(files)) || !fs.existsSync(files.dynsec)) return earlier;
  const raw: unknown = JSON.parse(fs.readFileSync(files.dynsec, "utf8"));
  const parsed = dynsecClientsSchema.parse(raw);
  const now: string[] = [];
  for (const c of parsed.clients) {
    if (c.disabled === true || !c.roles?.some((r) => r.rolename.startsWith(DEVICE_ROLE_PREFIX))) continue;
    c.disabled = true;
    now.push(c.username);
  }
  const names = [...new Set([...earlier, ...now])];
  // the list first: a crash between the two writes leaves a list that says too much, never too little
  fs.writeFileSync(heldBackFile(files), JSON.stringify(names), { mode: 0o600 });
  if (now.length) fs.writeFileSync(files.dynsec, JSON.stringify({ ...(raw as object), clients: parsed.clients }, null, 2), { mode: 0o600 });
  return names;
}

/** After the workers' sessions are repaired: enables the held-back clients again. */
export async function openDeviceGate(dynsec: DynsecClient, files: GateFiles, names: string[]): Promise<void> {
  if (names.length) await dynsec.run(names.map((username) => ({ command: "enableClient", username })), /not found/i);
  fs.rmSync(heldBackFile(files), { force: true });
}
