// Sensor devices: the list with reading rates and rejections, placing, creating and editing,
// enabling and secret rotation. The secret hash is written here and never selected.
import { and, asc, eq, gte, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { areas, devices, equipmentEvents, lines, points, rollup1m } from "../schema";
import { DAY_MS } from "../../lib/vocabulary";
import type { DeviceKind } from "./equipment-labels";
import { getIngestStatus, listRecentRejections } from "./ingest-diagnostics";
import { CHANNELS } from "../../lib/contract/readings-payload";
import { getPlaceOptions, type PlaceOptions } from "./places";
import { notFound } from "../../lib/errors";

export type DeviceListItem = {
  id: number;
  code: string;
  kind: DeviceKind;
  label: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  placeLabel: string;
  calibratedDistanceMm: number | null;
  mountingDistanceMm: number | null;
  calibrationDue: string | null;
  enabled: boolean;
  online: boolean;
  lastSeenTs: number | null;
  secretRotatedAt: number | null;
  createdAt: number;
  /** readings per minute over the last 10 minutes, from the 1-minute rollups */
  readingsPerMin: number;
  /** messages in the last minute as counted by the ingest workers (null when no worker reports) */
  messagesPerMin: number | null;
  /** rejected messages in the last 24 h (of the rejections the worker keeps) */
  rejections24h: number;
  lastRejection: { ts: number; reason: string; detail: string | null } | null;
};

const deviceColumns = {
  id: devices.id,
  code: devices.code,
  kind: devices.kind,
  label: devices.label,
  pointId: devices.pointId,
  lineId: devices.lineId,
  areaId: devices.areaId,
  calibratedDistanceMm: devices.calibratedDistanceMm,
  mountingDistanceMm: devices.mountingDistanceMm,
  calibrationDue: devices.calibrationDue,
  enabled: devices.enabled,
  online: devices.online,
  lastSeenTs: devices.lastSeenTs,
  secretRotatedAt: devices.secretRotatedAt,
  createdAt: devices.createdAt,
};

const RATE_WINDOW_MIN = 10;

export async function listDevices(db: Db, nowMs = Date.now(), opts: { ids?: number[] } = {}): Promise<DeviceListItem[]> {
  const rows = await db
    .select(deviceColumns)
    .from(devices)
    .where(opts.ids ? inArray(devices.id, opts.ids.length ? opts.ids : [-1]) : undefined)
    .orderBy(asc(devices.kind), asc(devices.code));
  if (!rows.length) return [];
  const places = await getPlaceOptions(db);
  const rateFrom = Math.floor(nowMs / 60_000) * 60_000 - RATE_WINDOW_MIN * 60_000;
  const [rates, rejections, status] = await Promise.all([
    db
      .select({ deviceId: rollup1m.deviceId, n: sql<number>`sum(${rollup1m.count})` })
      .from(rollup1m)
      // every channel named, so the key (device, channel, minute) bounds the read to the window
      .where(and(inArray(rollup1m.deviceId, rows.map((r) => r.id)), inArray(rollup1m.channel, [...CHANNELS]), gte(rollup1m.bucketTs, rateFrom)))
      .groupBy(rollup1m.deviceId),
    // the worker keeps the newest few hundred rejections (ingest diagnostics)
    listRecentRejections(db, { limit: 500 }),
    getIngestStatus(db),
  ]);
  const rate = new Map(rates.map((r) => [r.deviceId, Number(r.n)]));
  const rej = new Map<string, number>();
  const lastRej = new Map<string, { ts: number; reason: string; detail: string | null }>();
  for (const r of rejections) {
    if (!r.deviceCode) continue;
    if (r.ts >= nowMs - DAY_MS) rej.set(r.deviceCode, (rej.get(r.deviceCode) ?? 0) + 1);
    const prev = lastRej.get(r.deviceCode);
    if (!prev || r.ts > prev.ts) lastRej.set(r.deviceCode, { ts: r.ts, reason: r.reason, detail: r.detail });
  }
  // messages in the last minute, summed over the workers that reported within 2 minutes
  const messages = new Map<string, number>();
  let workersReporting = 0;
  for (const w of status) {
    if (!w.stats || w.stats.kind !== "worker" || nowMs - w.updatedTs > 120_000) continue;
    workersReporting++;
    for (const [code, c] of Object.entries(w.stats.devices)) messages.set(code, (messages.get(code) ?? 0) + c.messagesLastMinute);
  }
  return rows.map((r) => ({
    ...r,
    enabled: Boolean(r.enabled),
    online: Boolean(r.online),
    placeLabel: placeLabel(places, r),
    readingsPerMin: Math.round(((rate.get(r.id) ?? 0) / RATE_WINDOW_MIN) * 10) / 10,
    messagesPerMin: workersReporting > 0 ? (messages.get(r.code) ?? 0) : null,
    rejections24h: rej.get(r.code) ?? 0,
    lastRejection: lastRej.get(r.code) ?? null,
  }));
}

function placeLabel(places: PlaceOptions, d: { pointId: number | null; lineId: number | null; areaId: number | null }): string {
  if (d.pointId !== null) return places.points.find((p) => p.id === d.pointId)?.label ?? "Unknown point";
  if (d.lineId !== null) return places.lines.find((l) => l.id === d.lineId)?.name ?? "Unknown line";
  if (d.areaId !== null) return places.areas.find((a) => a.id === d.areaId)?.name ?? "Unknown hall";
  return "Not placed";
}

export async function getDevice(db: Db, id: number, nowMs = Date.now()): Promise<DeviceListItem | null> {
  return (await listDevices(db, nowMs, { ids: [id] }))[0] ?? null;
}

export type DeviceWrite = {
  label: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  calibratedDistanceMm: number | null;
  mountingDistanceMm: number | null;
  calibrationDue: string | null;
};

/** Fills in the line and hall of a device placed at a point (and the hall of one on a line). */
export async function resolvePlacement(db: Db, p: { pointId: number | null; lineId: number | null; areaId: number | null }): Promise<{ pointId: number | null; lineId: number | null; areaId: number | null } | null> {
  if (p.pointId !== null) {
    const row = (await db.select({ lineId: points.lineId, areaId: lines.areaId }).from(points).innerJoin(lines, eq(lines.id, points.lineId)).where(eq(points.id, p.pointId)).limit(1))[0];
    return row ? { pointId: p.pointId, lineId: row.lineId, areaId: row.areaId } : null;
  }
  if (p.lineId !== null) {
    const row = (await db.select({ areaId: lines.areaId }).from(lines).where(eq(lines.id, p.lineId)).limit(1))[0];
    return row ? { pointId: null, lineId: p.lineId, areaId: row.areaId } : null;
  }
  if (p.areaId !== null) {
    const row = (await db.select({ id: areas.id }).from(areas).where(eq(areas.id, p.areaId)).limit(1))[0];
    return row ? { pointId: null, lineId: null, areaId: p.areaId } : null;
  }
  return { pointId: null, lineId: null, areaId: null };
}

export async function createDevice(db: Db, input: DeviceWrite & { code: string; kind: DeviceKind; secretHash: string }, personId: number, nowMs = Date.now()): Promise<number> {
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(devices).values({ ...input, enabled: true, online: false, secretRotatedAt: nowMs, createdAt: nowMs });
    await tx.insert(equipmentEvents).values({ subjectType: "device", subjectId: res.insertId, ts: nowMs, kind: "created", personId, text: `Added ${input.code} and issued its secret.` });
    return res.insertId;
  });
}

export async function updateDevice(db: Db, id: number, input: DeviceWrite, personId: number, nowMs = Date.now()): Promise<{ changed: string[] }> {
  return db.transaction(async (tx) => {
    const before = (await tx.select(deviceColumns).from(devices).where(eq(devices.id, id)).limit(1).for("update"))[0];
    if (!before) throw notFound(`No device ${id}.`);
    const changed = (Object.keys(input) as (keyof DeviceWrite)[]).filter((k) => (before[k] ?? null) !== (input[k] ?? null));
    if (!changed.length) return { changed };
    await tx.update(devices).set(input).where(eq(devices.id, id));
    const moved = changed.some((k) => k === "pointId" || k === "lineId" || k === "areaId");
    const rest = changed.filter((k) => k !== "pointId" && k !== "lineId" && k !== "areaId");
    if (moved) await tx.insert(equipmentEvents).values({ subjectType: "device", subjectId: id, ts: nowMs, kind: "moved", personId, text: "Placement changed." });
    if (rest.length) {
      const words: Record<string, string> = { label: "label", calibratedDistanceMm: "calibrated distance", mountingDistanceMm: "mounting distance", calibrationDue: "calibration due date" };
      await tx.insert(equipmentEvents).values({ subjectType: "device", subjectId: id, ts: nowMs, kind: "edited", personId, text: `Changed ${rest.map((k) => words[k] ?? k).join(", ")}.` });
    }
    return { changed };
  });
}

export async function setDeviceEnabled(db: Db, id: number, enabled: boolean, personId: number, nowMs = Date.now()): Promise<void> {
  await db.transaction(async (tx) => {
    await tx.update(devices).set({ enabled }).where(eq(devices.id, id));
    await tx.insert(equipmentEvents).values({ subjectType: "device", subjectId: id, ts: nowMs, kind: "state_changed", personId, text: enabled ? "Enabled: may sign in and send readings." : "Disabled: refused at sign-in." });
  });
}

/** Stores the hash of a new secret; the old one stops working once the broker re-reads it. */
export async function rotateDeviceSecret(db: Db, id: number, secretHash: string, personId: number, nowMs = Date.now()): Promise<void> {
  await db.transaction(async (tx) => {
    await tx.update(devices).set({ secretHash, secretRotatedAt: nowMs }).where(eq(devices.id, id));
    await tx.insert(equipmentEvents).values({ subjectType: "device", subjectId: id, ts: nowMs, kind: "secret_rotated", personId, text: "Issued a new secret; the old one no longer signs in." });
  });
}

export async function deviceCodeTaken(db: Db, code: string): Promise<boolean> {
  return (await db.select({ id: devices.id }).from(devices).where(eq(devices.code, code)).limit(1)).length > 0;
}
