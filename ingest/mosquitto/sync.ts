// Keeps Mosquitto's dynamic-security plugin in step with the devices and edge_nodes tables and
// the two service accounts: at start (repairing any drift, and saying what it changed) and then
// whenever the tables' sign-in signature changes (checked every BROKER_DEVICE_CHECK_MS). A device
// added, re-keyed, disabled or deleted on its page is thus added, re-keyed (its session kicked),
// disabled (kicked) or deleted in the broker within about a second. The plan is pure
// (lib/broker/dynsec-plan.ts); this module reads both sides and sends the commands.
import type { Db } from "../../db/client";
import { deviceCredentialsSignature, listDeviceCredentials } from "../../db/queries/devices-auth";
import { listEdgeNodeCredentials } from "../../db/queries/gateways-auth";
import {
  credentialFingerprint,
  deviceRole,
  deviceRoleName,
  edgeNodeRole,
  edgeNodeRoleName,
  planDynsecSync,
  serviceClients,
  serviceRoles,
  type ActualClient,
  type ActualRole,
  type DesiredClient,
} from "../../lib/broker/dynsec-plan";
import { unsealDeviceSecret } from "../../lib/device-secrets";
import type { Logger } from "../log";
import { DynsecClient } from "./dynsec-client";

export type SyncSettings = { sealKey: string | null | undefined; workerPassword: string; appPassword: string; adminUsername: string };
export type SyncReport = { changes: string[]; problems: string[]; commands: number };

async function desiredState(db: Db, s: SyncSettings) {
  const [devices, nodes] = await Promise.all([listDeviceCredentials(db), listEdgeNodeCredentials(db)]);
  const clients: DesiredClient[] = serviceClients({ workerPassword: s.workerPassword, appPassword: s.appPassword });
  const roles = serviceRoles();
  for (const d of devices) {
    clients.push({
      username: d.code,
      clientid: d.code,
      password: unsealDeviceSecret(d.secretHash, s.sealKey),
      fingerprint: credentialFingerprint(d.secretHash),
      disabled: !d.enabled,
      rolename: deviceRoleName(d.code),
      what: "device",
    });
    roles.push(deviceRole(d.code));
  }
  for (const n of nodes) {
    clients.push({
      username: n.code,
      clientid: n.code,
      password: unsealDeviceSecret(n.secretHash, s.sealKey),
      fingerprint: credentialFingerprint(n.secretHash),
      disabled: !n.enabled,
      rolename: edgeNodeRoleName(n.code),
      what: "edge node",
    });
    roles.push(edgeNodeRole(n.code, n.groupId, n.nodeId));
  }
  return { clients, roles };
}

async function actualState(dynsec: DynsecClient) {
  const [clientsAnswer, rolesAnswer] = await dynsec.run([
    { command: "listClients", verbose: true },
    { command: "listRoles", verbose: true },
  ]);
  const clients = (clientsAnswer.data?.clients ?? []) as ActualClient[];
  const roles = (rolesAnswer.data?.roles ?? []) as ActualRole[];
  return { clients, roles };
}

/** One pass: read both sides, send what differs. */
export async function syncDynsec(db: Db, dynsec: DynsecClient, s: SyncSettings): Promise<SyncReport> {
  const [desired, actual] = await Promise.all([desiredState(db, s), actualState(dynsec)]);
  const plan = planDynsecSync(desired, actual, s.adminUsername);
  const commands = plan.commands;
  // "already exists"/"not found" mean another pass got there first: the end state is the same
  if (commands.length) await dynsec.run(commands, /already exists|not found/i);
  return { changes: plan.changes, problems: plan.problems, commands: commands.length };
}

/** Syncs at start, then on every change of the sign-in signature; returns a stop function. */
export async function keepDynsecInStep(db: Db, dynsec: DynsecClient, s: SyncSettings, everyMs: number, log: Logger, onReport?: (r: SyncReport) => void) {
  let signature = "";
  let busy = false;
  const pass = async (why: string) => {
    if (busy) return;
    busy = true;
    try {
      const sig = await signatureOf(db);
      if (why !== "start" && sig === signature) return;
      const report = await syncDynsec(db, dynsec, s);
      signature = sig;
      if (why === "start") log.info(`broker credentials checked against the devices table: ${report.changes.length ? report.changes.join("; ") : "nothing to repair"}`);
      else for (const c of report.changes) log.info(`broker credentials: ${c}`);
      for (const p of report.problems) log.warn(`broker credentials: ${p}`);
      onReport?.(report);
    } catch (err) {
      log.warn("could not bring the broker's credentials in step; will retry", { error: err instanceof Error ? err.message : String(err) });
    } finally {
      busy = false;
    }
  };
  await pass("start");
  const timer = setInterval(() => void pass("change"), everyMs);
  return () => clearInterval(timer);
}

async function signatureOf(db: Db): Promise<string> {
  const nodes = await listEdgeNodeCredentials(db);
  const nodeSig = nodes.map((n) => `${n.code}|${n.enabled}|${n.secretHash}|${n.groupId}|${n.nodeId}`).join(",");
  return `${await deviceCredentialsSignature(db)}#${credentialFingerprint(nodeSig)}`;
}
