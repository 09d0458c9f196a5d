// The plan that keeps Mosquitto's dynamic-security plugin in step with the devices table
// (lib/broker/dynsec-plan.ts). Command names and fields: Mosquitto's dynamic-security plugin
// documentation (createClient, setClientPassword, disableClient, enableClient, deleteClient,
// createRole, addRoleACL, removeRoleACL, modifyClient).
import { describe, expect, it } from "vitest";
import { credentialFingerprint, deviceRole, planDynsecSync, serviceClients, serviceRoles, type ActualClient, type DesiredClient } from "../../../lib/broker/dynsec-plan";
import { nextCrashCount, restartDelayMs, STABLE_AFTER_MS } from "../../../scripts/stack-processes";

const dev = (code: string, over: Partial<DesiredClient> = {}): DesiredClient => ({
  username: code, clientid: code, password: `${code}-secret`, fingerprint: credentialFingerprint(`hash-${code}`), disabled: false, rolename: `sf-dev-${code}`, what: "device", ...over,
});
const asActual = (d: DesiredClient, over: Partial<ActualClient> = {}): ActualClient => ({
  username: d.username, clientid: d.clientid ?? undefined, textdescription: `stillfield ${d.fingerprint}`, roles: [{ rolename: d.rolename }], ...over,
});
const roles = (codes: string[]) => [...serviceRoles(), ...codes.map(deviceRole)];
const services = serviceClients({ workerPassword: "w-secret-0123456789", appPassword: "a-secret-0123456789" });

describe("planDynsecSync", () => {
  it("changes nothing when the broker already holds what the tables say", () => {
    const clients = [...services, dev("fm-1")];
    const plan = planDynsecSync({ clients, roles: roles(["fm-1"]) }, { clients: [...clients.map((c) => asActual(c)), { username: "stillfield-admin" }], roles: roles(["fm-1"]) }, "stillfield-admin");
    expect(plan).toEqual({ commands: [], changes: [], problems: [] });
  });

  it("adds a new device with its own role, pinned to its client id, disabled when the table says so", () => {
    const d = dev("fm-2", { disabled: true });
    const plan = planDynsecSync({ clients: [d], roles: [deviceRole("fm-2")] }, { clients: [], roles: [] }, "admin");
    expect(plan.commands).toEqual([
      { command: "createRole", rolename: "sf-dev-fm-2", acls: deviceRole("fm-2").acls },
      { command: "createClient", username: "fm-2", password: "fm-2-secret", clientid: "fm-2", textdescription: `stillfield ${d.fingerprint}`, roles: [{ rolename: "sf-dev-fm-2" }] },
      { command: "disableClient", username: "fm-2" },
    ]);
    expect(deviceRole("fm-2").acls.map((a) => `${a.acltype} ${a.topic}`)).toEqual([
      "publishClientSend stillfield/d/fm-2/readings",
      "publishClientSend stillfield/d/fm-2/status",
      "subscribePattern stillfield/d/fm-2/cmd",
    ]);
  });

  it("re-keys a rotated secret and kicks the open session (disable, enable)", () => {
    const d = dev("fm-3");
    const plan = planDynsecSync({ clients: [d], roles: [deviceRole("fm-3")] }, { clients: [asActual(d, { textdescription: "stillfield 0000" })], roles: [deviceRole("fm-3")] }, "admin");
    expect(plan.commands.map((c) => c.command)).toEqual(["setClientPassword", "modifyClient", "disableClient", "enableClient"]);
    expect(plan.changes).toEqual(["device fm-3: new secret"]);
  });

  it("disables, removes strays (never the admin) and reports a device whose secret cannot be opened", () => {
    const off = dev("fm-4", { disabled: true });
    const sealedless = dev("fm-5", { password: null });
    const plan = planDynsecSync(
      { clients: [off, sealedless], roles: [deviceRole("fm-4"), deviceRole("fm-5")] },
      { clients: [asActual(off), { username: "stray" }, { username: "admin" }], roles: [deviceRole("fm-4"), deviceRole("fm-5"), { rolename: "sf-dev-gone", acls: [] }, { rolename: "admin", acls: [] }] },
      "admin",
    );
    expect(plan.commands).toEqual([
      { command: "disableClient", username: "fm-4" },
      { command: "deleteClient", username: "stray" },
      { command: "deleteRole", rolename: "sf-dev-gone" },
    ]);
    expect(plan.problems).toEqual(["device fm-5: no sealed secret to give the broker; issue a new secret on its page"]);
  });

  it("repairs a role whose topic rights were changed by hand", () => {
    const drifted = { rolename: "sf-dev-fm-6", acls: [{ acltype: "publishClientSend", topic: "stillfield/d/#", allow: true, priority: 0 }] };
    const plan = planDynsecSync({ clients: [], roles: [deviceRole("fm-6")] }, { clients: [], roles: [drifted] }, "admin");
    expect(plan.commands[0]).toEqual({ command: "removeRoleACL", rolename: "sf-dev-fm-6", acltype: "publishClientSend", topic: "stillfield/d/#" });
    expect(plan.commands.filter((c) => c.command === "addRoleACL")).toHaveLength(3);
    expect(plan.changes).toEqual(["role sf-dev-fm-6: topic rights repaired"]);
  });
});

describe("supervisor restart delay", () => {
  it("doubles from 1 s per crash in a row up to 30 s", () => {
    expect([1, 2, 3, 4, 5, 6, 7].map(restartDelayMs)).toEqual([1000, 2000, 4000, 8000, 16_000, 30_000, 30_000]);
  });

  it("counts crashes in a row, and starts again at 1 after a minute of running", () => {
    expect(nextCrashCount(0, 500)).toBe(1);
    expect(nextCrashCount(3, STABLE_AFTER_MS)).toBe(4);
    expect(nextCrashCount(5, STABLE_AFTER_MS + 1)).toBe(1);
    expect(restartDelayMs(nextCrashCount(5, 90_000))).toBe(1000);
  });
});
