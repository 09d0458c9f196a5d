// Neutralizers: the list with due dates, one unit, creating and editing (one history event per
// kind of change) and the "cleaned" action.
import { asc, eq, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { areas, equipmentEvents, lines, neutralizers, points } from "../schema";
import type { NeutralizerKind } from "../../lib/physics/neutralizer-kinds";
import { DAY_MS, NEUTRALIZER_STATE_WORDS, type NeutralizerState } from "../../lib/vocabulary";
import { lastCheckTimes } from "./checks";
import { dateOnlyMs, type EquipmentEventKind } from "./equipment-labels";
import { notFound } from "../../lib/errors";
import type { NeutralizerWrite } from "../../lib/views/neutralizers";

export type NeutralizerListItem = {
  id: number;
  tag: string;
  kind: NeutralizerKind;
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

/** What the equipment form writes (the view type lives in lib/views so the form shares it). */
export type { NeutralizerWrite };

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
    if (!before) throw notFound(`No neutralizer ${id}.`);
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
    if (!n) throw notFound(`No neutralizer ${id}.`);
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
