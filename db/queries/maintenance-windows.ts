// Maintenance windows (planned work): the read models for the Planned work page, the line charts
// and the handover, and the use cases open / extend / end now. The rules (longest window, what a
// window explains, its summary) are lib/alerts/maintenance-windows.ts; the round that holds
// explained alerts and writes summaries is db/queries/maintenance-round.ts.
import { and, asc, desc, eq, gt, inArray, lte, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import { areas, lines, maintenanceWindows, neutralizers, people, points } from "../schema";
import { checkExtension, MAX_WINDOW_MS, type MaintenanceTarget, type MaintenanceWindow } from "../../lib/alerts/maintenance-windows";
import { AppError, badInput, notFound } from "../../lib/errors";
import { targetValue, type MaintenanceTargetGroup, type MaintenanceWindowView } from "../../lib/views/maintenance";
import { writeAudit } from "./audit";

/** The longest a window may ever run (lib/alerts/maintenance-windows.ts checkExtension says the same). */
export const LONGEST_WINDOW_MS = 7 * 24 * 3_600_000;

/**
 * SQL: "a maintenance window active at nowMs explains this alert" (windowExplains of
 * lib/alerts/maintenance-windows.ts, in SQL), for a query whose FROM holds `alerts`.
 */
export function explainedByActiveWindow(nowMs: number): SQL {
  return sql`EXISTS (SELECT 1 FROM maintenance_windows mw WHERE mw.start_ts <= ${nowMs} AND mw.end_ts > ${nowMs} AND (
    (mw.target_kind = 'area' AND mw.target_id = \`alerts\`.\`area_id\`)
    OR (mw.target_kind = 'line' AND mw.target_id = \`alerts\`.\`line_id\`)
    OR (mw.target_kind = 'point' AND mw.target_id = \`alerts\`.\`point_id\`)
    OR (mw.target_kind = 'neutralizer' AND (mw.target_id = \`alerts\`.\`neutralizer_id\`
        OR \`alerts\`.\`point_id\` = (SELECT n.point_id FROM neutralizers n WHERE n.id = mw.target_id)))))`;
}

type Names = {
  area: Map<number, { name: string }>;
  line: Map<number, { name: string; areaId: number }>;
  point: Map<number, { name: string; lineId: number; position: number }>;
  neutralizer: Map<number, { tag: string; pointId: number | null; state: string }>;
};

/** The plant's places by id (a few hundred rows at most), to name window targets. */
export async function loadPlaceNames(db: Db): Promise<Names> {
  const [a, l, p, n] = await Promise.all([
    db.select({ id: areas.id, name: areas.name }).from(areas),
    db.select({ id: lines.id, name: lines.name, areaId: lines.areaId }).from(lines),
    db.select({ id: points.id, name: points.name, lineId: points.lineId, position: points.position }).from(points),
    db.select({ id: neutralizers.id, tag: neutralizers.tag, pointId: neutralizers.pointId, state: neutralizers.state }).from(neutralizers),
  ]);
  return {
    area: new Map(a.map((x) => [x.id, x])),
    line: new Map(l.map((x) => [x.id, x])),
    point: new Map(p.map((x) => [x.id, x])),
    neutralizer: new Map(n.map((x) => [x.id, x])),
  };
}

/** Name, line and point of a target; null when it does not exist. */
export function describeTarget(names: Names, kind: MaintenanceTarget, id: number): { name: string; lineId: number | null; pointId: number | null } | null {
  const pointLabel = (pid: number) => {
    const p = names.point.get(pid);
    return p ? `${names.line.get(p.lineId)?.name ?? "?"} — ${p.position}. ${p.name}` : null;
  };
  switch (kind) {
    case "area": {
      const a = names.area.get(id);
      return a ? { name: a.name, lineId: null, pointId: null } : null;
    }
    case "line": {
      const l = names.line.get(id);
      return l ? { name: l.name, lineId: id, pointId: null } : null;
    }
    case "point": {
      const p = names.point.get(id);
      return p ? { name: pointLabel(id) ?? "?", lineId: p.lineId, pointId: id } : null;
    }
    case "neutralizer": {
      const n = names.neutralizer.get(id);
      if (!n) return null;
      const at = n.pointId !== null ? pointLabel(n.pointId) : null;
      return { name: at ? `bar ${n.tag} (before ${at})` : `bar ${n.tag}`, lineId: n.pointId !== null ? (names.point.get(n.pointId)?.lineId ?? null) : null, pointId: n.pointId };
    }
  }
}

const owner = sql<string>`(SELECT p.name FROM people p WHERE p.id = ${maintenanceWindows.ownerId})`;
const creator = sql<string>`(SELECT p.name FROM people p WHERE p.id = ${maintenanceWindows.createdBy})`;
const columns = {
  id: maintenanceWindows.id,
  targetKind: maintenanceWindows.targetKind,
  targetId: maintenanceWindows.targetId,
  ownerId: maintenanceWindows.ownerId,
  ownerName: owner,
  reason: maintenanceWindows.reason,
  startTs: maintenanceWindows.startTs,
  endTs: maintenanceWindows.endTs,
  extendReason: maintenanceWindows.extendReason,
  createdByName: creator,
  endedEarlyTs: maintenanceWindows.endedEarlyTs,
  summary: maintenanceWindows.summary,
};
type Row = { [K in keyof typeof columns]: K extends "ownerName" | "createdByName" ? string : MaintenanceWindowView[K] };

function toViews(rows: Row[], names: Names): MaintenanceWindowView[] {
  return rows.map((r) => {
    const t = describeTarget(names, r.targetKind, r.targetId);
    return { ...r, targetName: t?.name ?? `${r.targetKind} ${r.targetId} (removed)`, lineId: t?.lineId ?? null, pointId: t?.pointId ?? null };
  });
}

async function selectWindows(db: Db, where: SQL | undefined, order: "asc" | "desc", limit: number): Promise<MaintenanceWindowView[]> {
  const [rows, names] = await Promise.all([
    db
      .select(columns)
      .from(maintenanceWindows)
      .where(where)
      .orderBy(order === "asc" ? asc(maintenanceWindows.startTs) : desc(maintenanceWindows.endTs))
      .limit(limit),
    loadPlaceNames(db),
  ]);
  return toViews(rows as Row[], names);
}

/** For the Planned work page: running now, planned (not started), ended in the last `recentDays`. */
export async function listMaintenanceWindows(db: Db, nowMs: number, recentDays = 14) {
  const [active, planned, recent] = await Promise.all([
    selectWindows(db, and(lte(maintenanceWindows.startTs, nowMs), gt(maintenanceWindows.endTs, nowMs)), "asc", 200),
    selectWindows(db, gt(maintenanceWindows.startTs, nowMs), "asc", 200),
    selectWindows(db, and(lte(maintenanceWindows.endTs, nowMs), gt(maintenanceWindows.endTs, nowMs - recentDays * 86_400_000)), "desc", 50),
  ]);
  return { active, planned, recent };
}

export async function getMaintenanceWindow(db: Db, id: number): Promise<MaintenanceWindowView | null> {
  return (await selectWindows(db, eq(maintenanceWindows.id, id), "asc", 1))[0] ?? null;
}

/** Windows overlapping [fromTs, toTs) anywhere in the plant (the handover lists a shift's). */
export async function listWindowsOverlapping(db: Db, fromTs: number, toTs: number): Promise<MaintenanceWindowView[]> {
  return selectWindows(db, and(lte(maintenanceWindows.startTs, toTs), gt(maintenanceWindows.endTs, fromTs)), "asc", 500);
}

/** Windows overlapping a range that touch a line: the line itself, its hall, its points, their bars (for the charts). */
export async function listLineWindows(db: Db, opts: { lineId: number; fromTs: number; toTs: number }): Promise<MaintenanceWindowView[]> {
  const [line] = await db.select({ areaId: lines.areaId }).from(lines).where(eq(lines.id, opts.lineId)).limit(1);
  if (!line) return [];
  const pointIds = (await db.select({ id: points.id }).from(points).where(eq(points.lineId, opts.lineId))).map((p) => p.id);
  const barIds = pointIds.length ? (await db.select({ id: neutralizers.id }).from(neutralizers).where(inArray(neutralizers.pointId, pointIds))).map((n) => n.id) : [];
  const kind = maintenanceWindows.targetKind;
  const target = maintenanceWindows.targetId;
  const touches = or(
    and(eq(kind, "area"), eq(target, line.areaId)),
    and(eq(kind, "line"), eq(target, opts.lineId)),
    pointIds.length ? and(eq(kind, "point"), inArray(target, pointIds)) : undefined,
    barIds.length ? and(eq(kind, "neutralizer"), inArray(target, barIds)) : undefined,
  );
  return selectWindows(db, and(lte(maintenanceWindows.startTs, opts.toTs), gt(maintenanceWindows.endTs, opts.fromTs), touches), "asc", 200);
}

/** A window to open: everything but its id (extendReason is needed when it is longer than MAX_WINDOW_MS). */
export type OpenWindow = Omit<MaintenanceWindow, "id">;

/** Opens a window (now or later). Longer than 12 h only with a reason, never longer than a week. */
export async function openMaintenanceWindow(db: Db, w: OpenWindow, createdBy: number, nowMs: number): Promise<number> {
  // slack for a form left open: one filled in at 14:02 with start "14:02" and sent at 14:10 still means "now"
  if (w.startTs < nowMs - 15 * 60_000) throw badInput("A window starts now or later.", { startTs: ["Start now or later; past work is a line note"] });
  if (w.endTs <= w.startTs) throw badInput("The end must be after the start.", { endTs: ["The end must be after the start"] });
  if (w.endTs - w.startTs > LONGEST_WINDOW_MS) throw badInput("A window cannot run longer than a week.", { endTs: ["At most a week; shelve or disable the rule instead"] });
  if (w.endTs - w.startTs > MAX_WINDOW_MS && !w.extendReason) {
    const h = MAX_WINDOW_MS / 3_600_000;
    throw badInput(`Longer than ${h} h needs a reason.`, { endTs: [`More than ${h} h: tick “It needs longer than ${h} h” and say why`], extendReason: [`Say why it needs more than ${h} h`] });
  }
  const names = await loadPlaceNames(db);
  const target = describeTarget(names, w.targetKind, w.targetId);
  if (!target) throw notFound(`No ${w.targetKind} with id ${w.targetId}.`);
  const [who] = await db.select({ active: people.active }).from(people).where(eq(people.id, w.ownerId)).limit(1);
  if (!who?.active) throw badInput("Pick an owner who can sign in.", { ownerId: ["Pick an active person"] });
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(maintenanceWindows).values({
      targetKind: w.targetKind,
      targetId: w.targetId,
      ownerId: w.ownerId,
      reason: w.reason,
      startTs: w.startTs,
      endTs: w.endTs,
      extendReason: w.endTs - w.startTs > MAX_WINDOW_MS ? w.extendReason : null,
      createdBy,
      createdTs: nowMs,
    });
    await writeAudit(tx, { personId: createdBy, action: "maintenance.open", subjectType: "maintenance_window", subjectId: res.insertId, summary: `Planned work on ${target.name}: ${w.reason}`, detail: w }, nowMs);
    return res.insertId;
  });
}

/** A later end for a window that has not ended; the reason is kept with it. */
export async function extendMaintenanceWindow(db: Db, id: number, newEndTs: number, reason: string, personId: number, nowMs: number): Promise<void> {
  const w = await getMaintenanceWindow(db, id);
  if (!w) throw notFound(`No maintenance window ${id}.`);
  if (w.endTs <= nowMs) throw new AppError("conflict", "This window has already ended; open a new one.");
  const ok = checkExtension(w, newEndTs, nowMs);
  if (!ok.ok) throw badInput(ok.message, { endTs: [ok.message] });
  await db.transaction(async (tx) => {
    const [res] = await tx
      .update(maintenanceWindows)
      .set({ endTs: newEndTs, extendReason: reason })
      .where(and(eq(maintenanceWindows.id, id), eq(maintenanceWindows.endTs, w.endTs)));
    if (res.affectedRows !== 1) throw new AppError("conflict", "Someone changed this window meanwhile; reload and try again.");
    await writeAudit(tx, { personId, action: "maintenance.extend", subjectType: "maintenance_window", subjectId: id, summary: `Planned work on ${w.targetName} extended: ${reason}`, detail: { fromEndTs: w.endTs, toEndTs: newEndTs } }, nowMs);
  });
}

/** Ends a running window now (its alerts are re-checked by the next round); a planned one is called off. */
export async function endMaintenanceWindow(db: Db, id: number, personId: number, nowMs: number): Promise<void> {
  const w = await getMaintenanceWindow(db, id);
  if (!w) throw notFound(`No maintenance window ${id}.`);
  if (w.endTs <= nowMs) throw new AppError("conflict", "This window has already ended.");
  const calledOff = w.startTs > nowMs;
  await db.transaction(async (tx) => {
    await tx
      .update(maintenanceWindows)
      .set(calledOff ? { startTs: nowMs, endTs: nowMs, endedEarlyTs: nowMs } : { endTs: nowMs, endedEarlyTs: nowMs })
      .where(eq(maintenanceWindows.id, id));
    await writeAudit(tx, { personId, action: "maintenance.end", subjectType: "maintenance_window", subjectId: id, summary: `Planned work on ${w.targetName} ${calledOff ? "called off" : "ended early"}` }, nowMs);
  });
}

/** The target picker's choices: halls, lines, points, bars not removed. */
export async function listMaintenanceTargets(db: Db): Promise<MaintenanceTargetGroup[]> {
  const names = await loadPlaceNames(db);
  const option = (kind: MaintenanceTarget, id: number) => ({ value: targetValue(kind, id), label: describeTarget(names, kind, id)?.name ?? `${kind} ${id}` });
  const byName = (a: { label: string }, b: { label: string }) => a.label.localeCompare(b.label, "en", { numeric: true });
  return [
    { kind: "area", label: "Halls", options: [...names.area.keys()].map((id) => option("area", id)).sort(byName) },
    { kind: "line", label: "Lines", options: [...names.line.keys()].map((id) => option("line", id)).sort(byName) },
    { kind: "point", label: "Measuring points", options: [...names.point.keys()].map((id) => option("point", id)).sort(byName) },
    { kind: "neutralizer", label: "Neutralizers", options: [...names.neutralizer.entries()].filter(([, n]) => n.state !== "removed").map(([id]) => id).map((id) => option("neutralizer", id)).sort(byName) },
  ];
}
