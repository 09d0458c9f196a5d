// What Mosquitto's dynamic-security plugin should hold for Stillfield, and the commands that
// take what it holds there (pure: ingest/mosquitto/sync.ts reads both sides and sends them).
//
// Clients and roles (names starting "sf-" are ours; the plugin admin is left alone):
//   device <code>       client id = code, role sf-dev-<code>: publish stillfield/d/<code>/readings
//                       and …/status, subscribe …/cmd (Mosquitto 2.0.11 does not expand %c in
//                       a role's publish ACLs, so each device gets a role of its own)
//   edge node <code>    client id = code, role sf-node-<code>: publish spBv1.0/<group>/+/<node>/#
//                       except commands, subscribe its NCMD/DCMD and spBv1.0/STATE/+
//   svc-worker          role sf-worker: device topics through shared subscriptions (and plain
//                       ones), the Sparkplug namespace; writes internal topics, device commands,
//                       Sparkplug STATE and commands
//   svc-app             role sf-app: reads internal topics, writes alert changes only
// Each client's text description carries a fingerprint of its credential, so a rotated secret
// is seen (the plugin never shows a password back).
import { createHash } from "node:crypto";
import { ALL_DEVICE_READINGS, ALL_DEVICE_STATUS, DEVICE_PREFIX, INTERNAL_PREFIX, internalTopics } from "../contract/topics";
import { SPB_NAMESPACE } from "../sparkplug/topics";
import { SERVICE_ACCOUNTS } from "../settings";

export type AclType = "publishClientSend" | "publishClientReceive" | "subscribePattern" | "subscribeLiteral" | "unsubscribePattern";
export type Acl = { acltype: AclType; topic: string; allow: boolean; priority: number };
export type DesiredRole = { rolename: string; acls: Acl[] };
export type DesiredClient = {
  username: string;
  clientid: string | null;
  /** null: the secret cannot be opened (no sealed copy): the client cannot be (re)keyed */
  password: string | null;
  fingerprint: string;
  disabled: boolean;
  rolename: string;
  what: string;
};
export type ActualClient = { username: string; clientid?: string; textdescription?: string; disabled?: boolean; roles?: Array<{ rolename: string }> };
export type ActualRole = { rolename: string; acls?: Array<{ acltype: string; topic: string; allow: boolean; priority?: number }> };
export type DynsecCommand = { command: string } & Record<string, unknown>;

export const ROLE_PREFIX = "sf-";
const DESCRIPTION_PREFIX = "stillfield ";

const allow = (acltype: AclType, topic: string, priority = 0): Acl => ({ acltype, topic, allow: true, priority });
const deny = (acltype: AclType, topic: string, priority = 1): Acl => ({ acltype, topic, allow: false, priority });

export function credentialFingerprint(credential: string): string {
  return createHash("sha256").update(credential).digest("hex").slice(0, 16);
}

export const deviceRoleName = (code: string) => `${ROLE_PREFIX}dev-${code}`;
export const edgeNodeRoleName = (code: string) => `${ROLE_PREFIX}node-${code}`;

export function serviceRoles(): DesiredRole[] {
  const share = (filter: string) => `$share/+/${filter}`;
  return [
    {
      rolename: `${ROLE_PREFIX}worker`,
      acls: [
        // Mosquitto 2.0 checks a shared subscription against its full $share/<group>/… filter
        allow("subscribePattern", share(ALL_DEVICE_READINGS)),
        allow("subscribePattern", share(ALL_DEVICE_STATUS)),
        allow("subscribePattern", ALL_DEVICE_READINGS),
        allow("subscribePattern", ALL_DEVICE_STATUS),
        allow("subscribePattern", `${SPB_NAMESPACE}/#`),
        allow("subscribePattern", `${INTERNAL_PREFIX}#`),
        allow("publishClientSend", `${INTERNAL_PREFIX}#`),
        allow("publishClientSend", `${DEVICE_PREFIX}+/cmd`),
        allow("publishClientSend", `${SPB_NAMESPACE}/STATE/#`),
        allow("publishClientSend", `${SPB_NAMESPACE}/+/NCMD/#`),
        allow("publishClientSend", `${SPB_NAMESPACE}/+/DCMD/#`),
      ],
    },
    {
      rolename: `${ROLE_PREFIX}app`,
      acls: [allow("subscribePattern", `${INTERNAL_PREFIX}#`), allow("publishClientSend", internalTopics.alerts)],
    },
  ];
}

export function deviceRole(code: string): DesiredRole {
  const own = `${DEVICE_PREFIX}${code}`;
  return {
    rolename: deviceRoleName(code),
    acls: [allow("publishClientSend", `${own}/readings`), allow("publishClientSend", `${own}/status`), allow("subscribePattern", `${own}/cmd`)],
  };
}

export function edgeNodeRole(code: string, groupId: string, nodeId: string): DesiredRole {
  const ns = `${SPB_NAMESPACE}/${groupId}`;
  return {
    rolename: edgeNodeRoleName(code),
    acls: [
      allow("publishClientSend", `${ns}/+/${nodeId}/#`),
      // an edge node never sends commands, not even to itself
      deny("publishClientSend", `${ns}/NCMD/${nodeId}/#`),
      deny("publishClientSend", `${ns}/DCMD/${nodeId}/#`),
      allow("subscribePattern", `${ns}/NCMD/${nodeId}/#`),
      allow("subscribePattern", `${ns}/DCMD/${nodeId}/#`),
      allow("subscribePattern", `${SPB_NAMESPACE}/STATE/+`),
    ],
  };
}

const aclKey = (a: { acltype: string; topic: string; allow: boolean; priority?: number }) => `${a.acltype}|${a.topic}|${a.allow}|${a.priority ?? 0}`;

export type SyncPlan = { commands: DynsecCommand[]; changes: string[]; problems: string[] };

/** Commands that turn `actual` into `desired`; `adminUsername` is never touched. */
export function planDynsecSync(
  desired: { clients: DesiredClient[]; roles: DesiredRole[] },
  actual: { clients: ActualClient[]; roles: ActualRole[] },
  adminUsername: string,
): SyncPlan {
  const commands: DynsecCommand[] = [];
  const changes: string[] = [];
  const problems: string[] = [];
  const roleNow = new Map(actual.roles.map((r) => [r.rolename, r]));
  const wantedRoles = new Set(desired.roles.map((r) => r.rolename));

  for (const role of desired.roles) {
    const now = roleNow.get(role.rolename);
    if (!now) {
      commands.push({ command: "createRole", rolename: role.rolename, acls: role.acls });
      continue;
    }
    const have = new Map((now.acls ?? []).map((a) => [aclKey(a), a]));
    const want = new Set(role.acls.map(aclKey));
    let changed = false;
    for (const [k, a] of have) {
      if (want.has(k)) continue;
      commands.push({ command: "removeRoleACL", rolename: role.rolename, acltype: a.acltype, topic: a.topic });
      changed = true;
    }
    for (const a of role.acls) {
      if (have.has(aclKey(a))) continue;
      commands.push({ command: "addRoleACL", rolename: role.rolename, ...a });
      changed = true;
    }
    if (changed) changes.push(`role ${role.rolename}: topic rights repaired`);
  }

  const clientNow = new Map(actual.clients.map((c) => [c.username, c]));
  for (const want of desired.clients) {
    const now = clientNow.get(want.username);
    const description = `${DESCRIPTION_PREFIX}${want.fingerprint}`;
    if (!now) {
      if (want.password === null) {
        problems.push(`${want.what} ${want.username}: no sealed secret to give the broker; issue a new secret on its page`);
        continue;
      }
      commands.push({
        command: "createClient",
        username: want.username,
        password: want.password,
        ...(want.clientid ? { clientid: want.clientid } : {}),
        textdescription: description,
        roles: [{ rolename: want.rolename }],
      });
      if (want.disabled) commands.push({ command: "disableClient", username: want.username });
      changes.push(`${want.what} ${want.username}: added${want.disabled ? " (disabled)" : ""}`);
      continue;
    }
    const rotated = now.textdescription !== description;
    if (rotated) {
      if (want.password === null) problems.push(`${want.what} ${want.username}: its secret changed but cannot be opened; issue a new secret on its page`);
      else {
        commands.push({ command: "setClientPassword", username: want.username, password: want.password });
        commands.push({ command: "modifyClient", username: want.username, textdescription: description });
        changes.push(`${want.what} ${want.username}: new secret`);
      }
    }
    if ((now.clientid ?? null) !== want.clientid) {
      commands.push({ command: "modifyClient", username: want.username, clientid: want.clientid ?? "" });
      changes.push(`${want.what} ${want.username}: client id repaired`);
    }
    const roles = (now.roles ?? []).map((r) => r.rolename);
    if (roles.length !== 1 || roles[0] !== want.rolename) {
      commands.push({ command: "modifyClient", username: want.username, roles: [{ rolename: want.rolename }] });
      changes.push(`${want.what} ${want.username}: role repaired`);
    }
    const disabledNow = now.disabled === true;
    if (want.disabled && !disabledNow) {
      commands.push({ command: "disableClient", username: want.username });
      changes.push(`${want.what} ${want.username}: disabled`);
    } else if (!want.disabled && (disabledNow || (rotated && want.password !== null))) {
      // disabling kicks the open session, so a rotated secret stops working at once
      if (!disabledNow) commands.push({ command: "disableClient", username: want.username });
      commands.push({ command: "enableClient", username: want.username });
      if (disabledNow) changes.push(`${want.what} ${want.username}: enabled`);
    }
  }
  const wantedClients = new Set(desired.clients.map((c) => c.username));
  for (const c of actual.clients) {
    if (c.username === adminUsername || wantedClients.has(c.username)) continue;
    commands.push({ command: "deleteClient", username: c.username });
    changes.push(`client ${c.username}: removed (not in the devices, edge nodes or service accounts)`);
  }
  for (const r of actual.roles) {
    if (!r.rolename.startsWith(ROLE_PREFIX) || wantedRoles.has(r.rolename)) continue;
    commands.push({ command: "deleteRole", rolename: r.rolename });
  }
  return { commands, changes, problems };
}

export type ServiceCredentials = { workerPassword: string; appPassword: string };

export function serviceClients(c: ServiceCredentials): DesiredClient[] {
  return [
    { username: SERVICE_ACCOUNTS.worker, clientid: null, password: c.workerPassword, fingerprint: credentialFingerprint(c.workerPassword), disabled: false, rolename: `${ROLE_PREFIX}worker`, what: "service account" },
    { username: SERVICE_ACCOUNTS.app, clientid: null, password: c.appPassword, fingerprint: credentialFingerprint(c.appPassword), disabled: false, rolename: `${ROLE_PREFIX}app`, what: "service account" },
  ];
}
