// Equipment records: neutralizers and sensor devices, their history (equipment_events), their
// uploads, and the neutralizer effect computed from line data (charge at the point before it vs
// the point after it, while the line runs). Explicit column selections throughout: a device's
// secret hash never leaves the writes in this module.
import { and, asc, desc, eq, gte, inArray, lt, sql } from "drizzle-orm";
import type { Db } from "../client";
import { areas, devices, equipmentEvents, lines, neutralizers, people, points, rollup1m, uploads } from "../schema";
import { DEVICE_KINDS, NEUTRALIZER_KINDS } from "../schema/plant";
import { DAY_MS, NEUTRALIZER_STATE_WORDS, type NeutralizerState } from "../../lib/vocabulary";
import { lastCompletedShift } from "../../lib/plant-time";
import { EQUIPMENT_EVENT_KINDS } from "../schema/records";
import { effectFraction } from "../../lib/physics/neutralizer";
import { getIngestStatus, listRecentRejections } from "./ingest-diagnostics";
import { getCheckLimits, lastCheckTimes, listChecks, projectDecay, type CheckRow, type DecayProjection, type KindLimits } from "./checks";

export type DeviceKind = (typeof DEVICE_KINDS)[number];
export type EquipmentEventKind = (typeof EQUIPMENT_EVENT_KINDS)[number];

export const DEVICE_KIND_LABELS: Record<DeviceKind, string> = {
  field_meter: "Field meter",
  th_logger: "Temperature/humidity logger",
  speed_gateway: "Line-speed gateway",
};

export const EVENT_KIND_LABELS: Record<EquipmentEventKind, string> = {
  cleaned: "Cleaned",
  check: "Check",
  fault: "Fault",
  moved: "Moved",
  note: "Note",
  upload: "Upload",
  state_changed: "State",
  created: "Created",
  edited: "Edited",
  secret_rotated: "Secret",
};


/** "YYYY-MM-DD" → epoch ms at 00:00 UTC (day-granular due dates). */
export function dateOnlyMs(date: string | null): number | null {
  if (!date) return null;
  const ms = Date.parse(`${date}T00:00:00Z`);
  return Number.isFinite(ms) ? ms : null;
}

// ---------------------------------------------------------------------------------------------
// places (halls → lines → points) for forms and labels

export type PlaceOptions = {
  areas: { id: number; name: string }[];
  lines: { id: number; areaId: number; name: string; solvent: boolean }[];
  points: { id: number; lineId: number; name: string; position: number; label: string }[];
};

export async function getPlaceOptions(db: Db): Promise<PlaceOptions> {
  const [a, l, p] = await Promise.all([
    db.select({ id: areas.id, name: areas.name }).from(areas).orderBy(asc(areas.displayOrder), asc(areas.id)),
    db.select({ id: lines.id, areaId: lines.areaId, name: lines.name, solventName: lines.solventName }).from(lines).orderBy(asc(lines.displayOrder), asc(lines.id)),
    db.select({ id: points.id, lineId: points.lineId, name: points.name, position: points.position }).from(points).orderBy(asc(points.lineId), asc(points.position)),
  ]);
  const lineName = new Map(l.map((x) => [x.id, x.name]));
  const lineOrder = new Map(l.map((x, i) => [x.id, i]));
  return {
    areas: a,
    lines: l.map((x) => ({ id: x.id, areaId: x.areaId, name: x.name, solvent: x.solventName !== null })),
    points: p
      .map((x) => ({ ...x, label: `${lineName.get(x.lineId) ?? "?"} — ${x.position}. ${x.name}` }))
      .sort((x, y) => (lineOrder.get(x.lineId) ?? 0) - (lineOrder.get(y.lineId) ?? 0) || x.position - y.position),
  };
}

// ---------------------------------------------------------------------------------------------
// neutralizers

export type NeutralizerListItem = {
  id: number;
  tag: string;
  kind: (typeof NEUTRALIZER_KINDS)[number];
  state: NeutralizerState;
  lengthMm: number | null;
  powerUnit: string | null;
  outputKv: number | null;
  airAssisted: boolean;
  mountingDistanceMm: number | null;
  pointId: number | null;
  pointName: string | null;
  position: number | null;
  lineId: number | null;
  lineName: string | null;
  solventLine: boolean;
  areaId: number | null;
  areaName: string | null;
  installedOn: string | null;
  cleaningIntervalDays: number;
  checkIntervalDays: number;
  lastCleanedTs: number | null;
  notes: string | null;
  lastCheck: { ts: number; passed: boolean } | null;
  cleaningDueTs: number | null;
  checkDueTs: number | null;
};

const neutralizerColumns = {
  id: neutralizers.id,
  tag: neutralizers.tag,
  kind: neutralizers.kind,
  state: neutralizers.state,
  lengthMm: neutralizers.lengthMm,
  powerUnit: neutralizers.powerUnit,
  outputKv: neutralizers.outputKv,
  airAssisted: neutralizers.airAssisted,
  mountingDistanceMm: neutralizers.mountingDistanceMm,
  pointId: neutralizers.pointId,
  pointName: points.name,
  position: points.position,
  lineId: lines.id,
  lineName: lines.name,
  solventName: lines.solventName,
  lineOrder: lines.displayOrder,
  areaId: areas.id,
  areaName: areas.name,
  areaOrder: areas.displayOrder,
  installedOn: neutralizers.installedOn,
  cleaningIntervalDays: neutralizers.cleaningIntervalDays,
  checkIntervalDays: neutralizers.checkIntervalDays,
  lastCleanedTs: neutralizers.lastCleanedTs,
  notes: neutralizers.notes,
};

export async function listNeutralizers(db: Db, opts: { ids?: number[] } = {}): Promise<NeutralizerListItem[]> {
  const rows = await db
    .select(neutralizerColumns)
    .from(neutralizers)
    .leftJoin(points, eq(points.id, neutralizers.pointId))
    .leftJoin(lines, eq(lines.id, points.lineId))
    .leftJoin(areas, eq(areas.id, lines.areaId))
    .where(opts.ids ? inArray(neutralizers.id, opts.ids.length ? opts.ids : [-1]) : undefined)
    .orderBy(asc(areas.displayOrder), asc(lines.displayOrder), asc(points.position), asc(neutralizers.tag));
  const last = await lastCheckTimes(db, opts.ids);
  return rows.map(({ solventName, lineOrder: _l, areaOrder: _a, ...r }) => {
    const lastCheck = last.get(r.id) ?? null;
    const installedMs = dateOnlyMs(r.installedOn);
    const cleanedFrom = r.lastCleanedTs ?? installedMs;
    const checkedFrom = lastCheck?.ts ?? installedMs;
    return {
      ...r,
      airAssisted: Boolean(r.airAssisted),
      solventLine: solventName !== null && solventName !== undefined,
      lastCheck,
      cleaningDueTs: cleanedFrom !== null ? cleanedFrom + r.cleaningIntervalDays * DAY_MS : null,
      checkDueTs: checkedFrom !== null ? checkedFrom + r.checkIntervalDays * DAY_MS : null,
    };
  });
}

export async function getNeutralizer(db: Db, id: number): Promise<NeutralizerListItem | null> {
  return (await listNeutralizers(db, { ids: [id] }))[0] ?? null;
}

export type NeutralizerWrite = {
  tag: string;
  kind: (typeof NEUTRALIZER_KINDS)[number];
  lengthMm: number | null;
  powerUnit: string | null;
  outputKv: number | null;
  airAssisted: boolean;
  mountingDistanceMm: number | null;
  pointId: number | null;
  installedOn: string | null;
  cleaningIntervalDays: number;
  checkIntervalDays: number;
  state: NeutralizerState;
  notes: string | null;
};

export async function pointExists(db: Db, pointId: number): Promise<boolean> {
  return (await db.select({ id: points.id }).from(points).where(eq(points.id, pointId)).limit(1)).length > 0;
}

export async function createNeutralizer(db: Db, input: NeutralizerWrite, personId: number, nowMs = Date.now()): Promise<number> {
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(neutralizers).values({ ...input, lastCleanedTs: null });
    await tx.insert(equipmentEvents).values({ subjectType: "neutralizer", subjectId: res.insertId, ts: nowMs, kind: "created", personId, text: `Added ${input.tag}.` });
    return res.insertId;
  });
}

const FIELD_LABELS: Record<keyof NeutralizerWrite, string> = {
  tag: "tag",
  kind: "kind",
  lengthMm: "length",
  powerUnit: "power unit",
  outputKv: "output",
  airAssisted: "air assistance",
  mountingDistanceMm: "mounting distance",
  pointId: "point",
  installedOn: "installed on",
  cleaningIntervalDays: "cleaning interval",
  checkIntervalDays: "check interval",
  state: "state",
  notes: "notes",
};

/** Saves the changes and writes one history event per kind of change (moved, state, edited). */
export async function updateNeutralizer(db: Db, id: number, input: NeutralizerWrite, personId: number, nowMs = Date.now()): Promise<{ changed: string[] }> {
  return db.transaction(async (tx) => {
    const before = (await tx.select().from(neutralizers).where(eq(neutralizers.id, id)).limit(1).for("update"))[0];
    if (!before) throw new Error(`No neutralizer ${id}`);
    const changed = (Object.keys(input) as (keyof NeutralizerWrite)[]).filter((k) => {
      const a = before[k];
      const b = input[k];
      return (a ?? null) !== (b ?? null) && !(typeof a === "boolean" && Boolean(a) === Boolean(b));
    });
    if (changed.length === 0) return { changed };
    await tx.update(neutralizers).set(input).where(eq(neutralizers.id, id));
    const event = (kind: EquipmentEventKind, text: string) =>
      tx.insert(equipmentEvents).values({ subjectType: "neutralizer", subjectId: id, ts: nowMs, kind, personId, text });
    if (changed.includes("pointId")) {
      const names = await pointNames(tx, [before.pointId, input.pointId]);
      await event("moved", `Moved from ${names.get(before.pointId ?? -1) ?? "no point"} to ${names.get(input.pointId ?? -1) ?? "no point"}.`);
    }
    if (changed.includes("state")) {
      await event(input.state === "faulty" ? "fault" : "state_changed", `${NEUTRALIZER_STATE_WORDS[before.state]} → ${NEUTRALIZER_STATE_WORDS[input.state]}.`);
    }
    const rest = changed.filter((k) => k !== "pointId" && k !== "state");
    if (rest.length) await event("edited", `Changed ${rest.map((k) => FIELD_LABELS[k]).join(", ")}.`);
    return { changed };
  });
}

async function pointNames(db: Pick<Db, "select">, ids: Array<number | null>): Promise<Map<number, string>> {
  const wanted = ids.filter((x): x is number => x !== null);
  if (!wanted.length) return new Map();
  const rows = await db
    .select({ id: points.id, name: points.name, lineName: lines.name })
    .from(points)
    .innerJoin(lines, eq(lines.id, points.lineId))
    .where(inArray(points.id, wanted));
  return new Map(rows.map((r) => [r.id, `${r.lineName} — ${r.name}`]));
}

/** The "cleaned" action: resets the cleaning clock; a bar that needed cleaning is back in service. */
export async function markCleaned(db: Db, id: number, cleanedTs: number, personId: number, note: string | null): Promise<{ stateChanged: boolean }> {
  return db.transaction(async (tx) => {
    const n = (await tx.select({ state: neutralizers.state, lastCleanedTs: neutralizers.lastCleanedTs }).from(neutralizers).where(eq(neutralizers.id, id)).limit(1).for("update"))[0];
    if (!n) throw new Error(`No neutralizer ${id}`);
    const stateChanged = n.state === "needs_cleaning";
    await tx
      .update(neutralizers)
      .set({ lastCleanedTs: Math.max(cleanedTs, n.lastCleanedTs ?? 0), ...(stateChanged ? { state: "in_service" as const } : {}) })
      .where(eq(neutralizers.id, id));
    await tx.insert(equipmentEvents).values({ subjectType: "neutralizer", subjectId: id, ts: cleanedTs, kind: "cleaned", personId, text: note ? `Cleaned. ${note}` : "Cleaned." });
    if (stateChanged) {
      await tx.insert(equipmentEvents).values({ subjectType: "neutralizer", subjectId: id, ts: cleanedTs, kind: "state_changed", personId, text: "Needs cleaning → in service (cleaned)." });
    }
    return { stateChanged };
  });
}

// ---------------------------------------------------------------------------------------------
// history

export type EquipmentEventRow = {
  id: number;
  ts: number;
  kind: EquipmentEventKind;
  text: string | null;
  personName: string | null;
  checkId: number | null;
  uploadId: number | null;
};

export async function addEquipmentEvent(
  db: Pick<Db, "insert">,
  e: { subjectType: "neutralizer" | "device"; subjectId: number; ts: number; kind: EquipmentEventKind; personId: number | null; text?: string | null; checkId?: number | null; uploadId?: number | null },
): Promise<void> {
  await db.insert(equipmentEvents).values({ ...e, text: e.text ?? null, checkId: e.checkId ?? null, uploadId: e.uploadId ?? null });
}

export async function listEquipmentEvents(db: Db, subjectType: "neutralizer" | "device", subjectId: number, limit = 100): Promise<EquipmentEventRow[]> {
  return db
    .select({
      id: equipmentEvents.id,
      ts: equipmentEvents.ts,
      kind: equipmentEvents.kind,
      text: equipmentEvents.text,
      personName: people.name,
      checkId: equipmentEvents.checkId,
      uploadId: equipmentEvents.uploadId,
    })
    .from(equipmentEvents)
    .leftJoin(people, eq(people.id, equipmentEvents.personId))
    .where(and(eq(equipmentEvents.subjectType, subjectType), eq(equipmentEvents.subjectId, subjectId)))
    .orderBy(desc(equipmentEvents.ts), desc(equipmentEvents.id))
    .limit(Math.min(limit, 500));
}

// ---------------------------------------------------------------------------------------------
// uploads

export type UploadSubjectType = "check" | "neutralizer" | "line_note" | "device";
export type UploadRow = {
  id: number;
  storageKey: string;
  originalName: string;
  mimeType: string;
  sizeBytes: number;
  thumbnailKey: string | null;
  subjectType: UploadSubjectType;
  subjectId: number;
  minRole: "viewer" | "shift_lead" | "engineer" | "admin";
  personName: string | null;
  createdTs: number;
};

const uploadColumns = {
  id: uploads.id,
  storageKey: uploads.storageKey,
  originalName: uploads.originalName,
  mimeType: uploads.mimeType,
  sizeBytes: uploads.sizeBytes,
  thumbnailKey: uploads.thumbnailKey,
  subjectType: uploads.subjectType,
  subjectId: uploads.subjectId,
  minRole: uploads.minRole,
  personName: people.name,
  createdTs: uploads.createdTs,
};

export async function getUpload(db: Db, id: number): Promise<UploadRow | null> {
  const rows = await db.select(uploadColumns).from(uploads).leftJoin(people, eq(people.id, uploads.personId)).where(eq(uploads.id, id)).limit(1);
  return rows[0] ?? null;
}

export async function listUploads(db: Db, subjectType: UploadSubjectType, subjectIds: number[]): Promise<UploadRow[]> {
  if (!subjectIds.length) return [];
  return db
    .select(uploadColumns)
    .from(uploads)
    .leftJoin(people, eq(people.id, uploads.personId))
    .where(and(eq(uploads.subjectType, subjectType), inArray(uploads.subjectId, subjectIds)))
    .orderBy(desc(uploads.createdTs), desc(uploads.id));
}

export async function insertUpload(
  db: Db,
  u: { storageKey: string; originalName: string; mimeType: string; sizeBytes: number; sha256: string; thumbnailKey: string | null; subjectType: UploadSubjectType; subjectId: number; minRole: UploadRow["minRole"]; personId: number; createdTs: number },
  historyOf: { subjectType: "neutralizer" | "device"; subjectId: number; text: string } | null,
): Promise<number> {
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(uploads).values(u);
    if (historyOf) {
      await tx.insert(equipmentEvents).values({ ...historyOf, ts: u.createdTs, kind: "upload", personId: u.personId, uploadId: res.insertId });
    }
    return res.insertId;
  });
}

// ---------------------------------------------------------------------------------------------
// effect: charge before vs after each neutralizer, while its line runs

export type EffectWindow = { key: string; label: string; fromTs: number; toTs: number };

export type EffectFigure = {
  key: string;
  label: string;
  fromTs: number;
  toTs: number;
  /** 1 − mean|after| / mean|before| over running minutes; null when it cannot be computed */
  effect: number | null;
  meanBeforeKv: number | null;
  meanAfterKv: number | null;
  runningMinutes: number;
  reason: string | null;
};

export type NeutralizerTopology = {
  neutralizerId: number;
  lineId: number;
  beforePoint: { id: number; name: string; meterId: number | null } | null;
  afterPoint: { id: number; name: string; meterId: number | null };
  gatewayId: number | null;
};

export async function getNeutralizerTopology(db: Db, neutralizerIds: number[]): Promise<Map<number, NeutralizerTopology>> {
  const out = new Map<number, NeutralizerTopology>();
  if (!neutralizerIds.length) return out;
  const ns = await db
    .select({ id: neutralizers.id, pointId: neutralizers.pointId, lineId: points.lineId, position: points.position, pointName: points.name })
    .from(neutralizers)
    .innerJoin(points, eq(points.id, neutralizers.pointId))
    .where(inArray(neutralizers.id, neutralizerIds));
  if (!ns.length) return out;
  const lineIds = [...new Set(ns.map((n) => n.lineId))];
  const [pts, devs] = await Promise.all([
    db.select({ id: points.id, lineId: points.lineId, position: points.position, name: points.name }).from(points).where(inArray(points.lineId, lineIds)),
    db
      .select({ id: devices.id, kind: devices.kind, pointId: devices.pointId, lineId: devices.lineId })
      .from(devices)
      .where(and(eq(devices.enabled, true), inArray(devices.kind, ["field_meter", "speed_gateway"]))),
  ]);
  const meterOf = (pointId: number) => devs.find((d) => d.kind === "field_meter" && d.pointId === pointId)?.id ?? null;
  for (const n of ns) {
    if (n.pointId === null) continue;
    const before = pts.filter((p) => p.lineId === n.lineId && p.position < n.position).sort((a, b) => b.position - a.position)[0];
    out.set(n.id, {
      neutralizerId: n.id,
      lineId: n.lineId,
      beforePoint: before ? { id: before.id, name: before.name, meterId: meterOf(before.id) } : null,
      afterPoint: { id: n.pointId, name: n.pointName, meterId: meterOf(n.pointId) },
      gatewayId: devs.find((d) => d.kind === "speed_gateway" && d.lineId === n.lineId)?.id ?? null,
    });
  }
  return out;
}

/**
 * The effect of each neutralizer over each window, from the 1-minute rollups: the minute means
 * of charge at the point before it and at its own point, kept only for minutes in which both
 * meters reported and the line ran (the speed gateway's running flag averaged > 0.5 in that
 * minute; a line without a gateway counts as running, as in the live rules), then
 * effectFraction (1 − mean|after| / mean|before|).
 */
export async function computeNeutralizerEffects(db: Db, neutralizerIds: number[], windows: EffectWindow[]): Promise<Map<number, EffectFigure[]>> {
  const out = new Map<number, EffectFigure[]>();
  const topo = await getNeutralizerTopology(db, neutralizerIds);
  const empty = (w: EffectWindow, reason: string): EffectFigure => ({ ...w, effect: null, meanBeforeKv: null, meanAfterKv: null, runningMinutes: 0, reason });
  for (const id of neutralizerIds) {
    const t = topo.get(id);
    if (!t) out.set(id, windows.map((w) => empty(w, "Not attached to a measuring point.")));
    else if (!t.beforePoint) out.set(id, windows.map((w) => empty(w, "No measuring point before it on the line.")));
    else if (t.beforePoint.meterId === null || t.afterPoint.meterId === null) out.set(id, windows.map((w) => empty(w, "A field meter before or after it is missing.")));
  }
  const live = [...topo.values()].filter((t) => t.beforePoint?.meterId && t.afterPoint.meterId);
  if (!live.length || !windows.length) return out;

  const fromTs = Math.min(...windows.map((w) => w.fromTs));
  const toTs = Math.max(...windows.map((w) => w.toTs));
  const meterIds = [...new Set(live.flatMap((t) => [t.beforePoint!.meterId!, t.afterPoint.meterId!]))];
  const gatewayIds = [...new Set(live.map((t) => t.gatewayId).filter((g): g is number => g !== null))];
  const series = await db
    .select({ deviceId: rollup1m.deviceId, channel: rollup1m.channel, bucketTs: rollup1m.bucketTs, sum: rollup1m.sum, count: rollup1m.count })
    .from(rollup1m)
    .where(
      and(
        inArray(rollup1m.deviceId, [...meterIds, ...gatewayIds]),
        inArray(rollup1m.channel, ["charge_kv", "running"]),
        gte(rollup1m.bucketTs, fromTs),
        lt(rollup1m.bucketTs, toTs),
      ),
    );
  const means = new Map<string, Map<number, number>>();
  for (const r of series) {
    if (!r.count) continue;
    const key = `${r.deviceId}:${r.channel}`;
    let m = means.get(key);
    if (!m) means.set(key, (m = new Map()));
    m.set(Number(r.bucketTs), Number(r.sum) / Number(r.count));
  }
  for (const t of live) {
    const before = means.get(`${t.beforePoint!.meterId}:charge_kv`) ?? new Map<number, number>();
    const after = means.get(`${t.afterPoint.meterId}:charge_kv`) ?? new Map<number, number>();
    const running = t.gatewayId !== null ? (means.get(`${t.gatewayId}:running`) ?? new Map<number, number>()) : null;
    out.set(
      t.neutralizerId,
      windows.map((w) => {
        const b: number[] = [];
        const a: number[] = [];
        for (const [bucket, bv] of before) {
          if (bucket < w.fromTs || bucket >= w.toTs) continue;
          const av = after.get(bucket);
          if (av === undefined) continue;
          if (running !== null && !((running.get(bucket) ?? 0) > 0.5)) continue;
          b.push(bv);
          a.push(av);
        }
        if (!b.length) return empty(w, running !== null ? "The line did not run with both meters reporting." : "No readings from both meters.");
        const effect = effectFraction(b, a);
        const meanAbs = (xs: number[]) => xs.reduce((s, x) => s + Math.abs(x), 0) / xs.length;
        return {
          ...w,
          effect,
          meanBeforeKv: meanAbs(b),
          meanAfterKv: meanAbs(a),
          runningMinutes: b.length,
          reason: effect === null ? "No charge before it to remove." : null,
        };
      }),
    );
  }
  return out;
}

import { getPlantSettings } from "./plant-settings";
export { getPlantSettings };

export async function effectWindows(db: Db, nowMs: number): Promise<EffectWindow[]> {
  const plant = await getPlantSettings(db);
  const shift = lastCompletedShift(nowMs, plant);
  return [
    { key: "shift", label: `Last shift (${shift.name})`, fromTs: shift.startTs, toTs: shift.endTs },
    { key: "day", label: "Last 24 h", fromTs: nowMs - DAY_MS, toTs: nowMs },
    { key: "week", label: "Last 7 days", fromTs: nowMs - 7 * DAY_MS, toTs: nowMs },
  ];
}

// ---------------------------------------------------------------------------------------------
// devices (sensors)

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
      .where(and(inArray(rollup1m.deviceId, rows.map((r) => r.id)), gte(rollup1m.bucketTs, rateFrom)))
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
    if (!before) throw new Error(`No device ${id}`);
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

// ---------------------------------------------------------------------------------------------
// one neutralizer's page

export type NeutralizerDetail = {
  neutralizer: NeutralizerListItem;
  limits: KindLimits;
  checks: CheckRow[];
  projection: DecayProjection;
  effects: EffectFigure[];
  topology: NeutralizerTopology | null;
  events: EquipmentEventRow[];
  uploads: UploadRow[];
};

export async function getNeutralizerDetail(db: Db, id: number, nowMs = Date.now()): Promise<NeutralizerDetail | null> {
  const neutralizer = await getNeutralizer(db, id);
  if (!neutralizer) return null;
  const [limits, checkRows, events, windows, topo] = await Promise.all([
    getCheckLimits(db),
    listChecks(db, { neutralizerId: id, limit: 200 }),
    listEquipmentEvents(db, "neutralizer", id, 200),
    effectWindows(db, nowMs),
    getNeutralizerTopology(db, [id]),
  ]);
  const kindLimits = limits.byKind[neutralizer.kind];
  const effects = (await computeNeutralizerEffects(db, [id], windows)).get(id) ?? [];
  const uploadsOf = [...(await listUploads(db, "neutralizer", [id])), ...(await listUploads(db, "check", checkRows.map((c) => c.id)))].sort((a, b) => b.createdTs - a.createdTs);
  return {
    neutralizer,
    limits: kindLimits,
    checks: checkRows,
    projection: projectDecay(checkRows, kindLimits.maxDecayS, neutralizer.lastCleanedTs, nowMs),
    effects,
    topology: topo.get(id) ?? null,
    events,
    uploads: uploadsOf,
  };
}
