// Seeds the demo plant's Sparkplug B gateway (lib/demo-gateway.ts): the edge node with a secret
// (kept with the devices' secrets in the git-ignored secrets file, for the demo's simulated edge
// node), its devices and metrics as a birth would list them, already mapped onto Labeller LB1's
// meters and speed gateway. Idempotent: an installation seeded before the gateway existed gets it
// on the next seed run; one that has it is left alone.
import fs from "node:fs";
import { eq, inArray } from "drizzle-orm";
import type { Db } from "./client";
import { devices, edgeNodes, gatewayDevices, gatewayMetrics } from "./schema";
import { DEMO_GATEWAY, DEMO_GATEWAY_METRICS } from "../lib/demo-gateway";
import { generateDeviceSecret, hashDeviceSecret } from "../lib/device-secrets";

/** Adds the demo gateway when missing; its plain secret goes into `secrets` (written by the caller) or straight into `secretsFile`. */
export async function seedDemoGateway(db: Db, nowMs: number, out: { secrets?: Record<string, string>; secretsFile?: string }): Promise<boolean> {
  const [existing] = await db.select({ id: edgeNodes.id }).from(edgeNodes).where(eq(edgeNodes.code, DEMO_GATEWAY.code)).limit(1);
  if (existing) return false;
  const codes = DEMO_GATEWAY_METRICS.flatMap((m) => (m.target ? [m.target.code] : []));
  const targets = await db.select({ id: devices.id, code: devices.code }).from(devices).where(inArray(devices.code, codes));
  const idOf = new Map(targets.map((t) => [t.code, t.id]));
  if (targets.length === 0) return false; // not the demo plant
  const secret = generateDeviceSecret();
  await db.transaction(async (tx) => {
    const [res] = await tx.insert(edgeNodes).values({
      code: DEMO_GATEWAY.code,
      groupId: DEMO_GATEWAY.groupId,
      nodeId: DEMO_GATEWAY.nodeId,
      label: DEMO_GATEWAY.label,
      secretHash: hashDeviceSecret(secret),
      createdAt: nowMs,
    });
    const edgeNodeId = res.insertId;
    const deviceNames = [...new Set(DEMO_GATEWAY_METRICS.map((m) => m.deviceName))];
    await tx.insert(gatewayDevices).values(deviceNames.map((deviceName) => ({ edgeNodeId, deviceName, online: false })));
    await tx.insert(gatewayMetrics).values(
      DEMO_GATEWAY_METRICS.map((m) => ({
        edgeNodeId,
        deviceName: m.deviceName,
        name: m.name,
        datatype: m.datatype,
        unit: m.unit,
        lastBirthTs: nowMs,
        targetDeviceId: m.target ? (idOf.get(m.target.code) ?? null) : null,
        targetChannel: m.target && idOf.has(m.target.code) ? m.target.channel : null,
        conversion: m.target?.conversion ?? "none",
        mappedAt: m.target ? nowMs : null,
      })),
    );
  });
  if (out.secrets) out.secrets[DEMO_GATEWAY.code] = secret;
  if (out.secretsFile) {
    const current: unknown = fs.existsSync(out.secretsFile) ? JSON.parse(fs.readFileSync(out.secretsFile, "utf8")) : {};
    const merged = { ...(typeof current === "object" && current !== null ? current : {}), [DEMO_GATEWAY.code]: secret };
    fs.writeFileSync(out.secretsFile, JSON.stringify(merged, null, 2), { mode: 0o600 });
  }
  return true;
}
