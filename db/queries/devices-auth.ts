// What the broker and the ingest worker need to know about devices: who may sign in (hashed
// secret, enabled) and where each device's readings belong (line, area). Also the two writes
// the worker makes on devices: online/offline and last seen. Explicit columns only; the secret
// hash goes to the broker's sign-in check and nowhere else.
import { eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { devices } from "../schema";
import type { DeviceKind } from "../../lib/contract/readings-payload";

export type IngestDevice = {
  id: number;
  code: string;
  kind: DeviceKind;
  enabled: boolean;
  online: boolean;
  lineId: number | null;
  areaId: number | null;
  pointId: number | null;
};

export type DeviceCredential = { id: number; code: string; kind: DeviceKind; enabled: boolean; secretHash: string };

const ingestColumns = {
  id: devices.id,
  code: devices.code,
  kind: devices.kind,
  enabled: devices.enabled,
  online: devices.online,
  lineId: devices.lineId,
  areaId: devices.areaId,
  pointId: devices.pointId,
};

export async function listIngestDevices(db: Db): Promise<IngestDevice[]> {
  return db.select(ingestColumns).from(devices);
}

export async function findIngestDevice(db: Db, code: string): Promise<IngestDevice | null> {
  const rows = await db.select(ingestColumns).from(devices).where(eq(devices.code, code)).limit(1);
  return rows[0] ?? null;
}

/** Sign-in data of every device (for the broker's cache). */
export async function listDeviceCredentials(db: Db): Promise<DeviceCredential[]> {
  return db
    .select({ id: devices.id, code: devices.code, kind: devices.kind, enabled: devices.enabled, secretHash: devices.secretHash })
    .from(devices);
}

/**
 * A cheap signature of every device's sign-in data (count and a sum of checksums, computed by the
 * database): the broker polls it each second and reloads credentials only when it changes, so a
 * disabled or re-keyed device is cut off at once.
 */
export async function deviceCredentialsSignature(db: Db): Promise<string> {
  const rows = await db
    .select({
      n: sql<number>`COUNT(*)`,
      sum: sql<string>`COALESCE(SUM(CRC32(CONCAT_WS('|', ${devices.code}, ${devices.enabled}, ${devices.secretHash}))), 0)`,
    })
    .from(devices);
  return `${rows[0]?.n ?? 0}:${rows[0]?.sum ?? 0}`;
}

export async function findDeviceCredential(db: Db, code: string): Promise<DeviceCredential | null> {
  const rows = await db
    .select({ id: devices.id, code: devices.code, kind: devices.kind, enabled: devices.enabled, secretHash: devices.secretHash })
    .from(devices)
    .where(eq(devices.code, code))
    .limit(1);
  return rows[0] ?? null;
}

export async function setDeviceOnline(db: Db, deviceId: number, online: boolean): Promise<void> {
  await db.update(devices).set({ online }).where(eq(devices.id, deviceId));
}

/** Moves each device's last-seen time forward (never back), in one statement. */
export async function recordDevicesLastSeen(db: Db, lastSeen: ReadonlyMap<number, number>): Promise<void> {
  if (lastSeen.size === 0) return;
  const ids = [...lastSeen.keys()];
  const cases = sql.join(
    ids.map((id) => sql`WHEN ${id} THEN ${Math.round(lastSeen.get(id)!)}`),
    sql` `,
  );
  await db
    .update(devices)
    .set({ lastSeenTs: sql`GREATEST(COALESCE(${devices.lastSeenTs}, 0), CASE ${devices.id} ${cases} END)` })
    .where(inArray(devices.id, ids));
}
