// The maintenance round, run by the alerts runner at the start of each escalation pass
// (ingest/alerts-escalation.ts): (a) every active alert explained by a window running now gets
// one "held" event saying so — the notify query (db/queries/alert-notify-candidates.ts) leaves it
// out meanwhile; (b) every window that has ended gets its summary stored once. Nothing else is
// needed for the re-check: once the window has ended, an alert still active is a notify candidate
// again and goes out as usual.
import { and, eq, gt, inArray, isNull, lte, or, sql } from "drizzle-orm";
import type { Db } from "../client";
import { alertEvents, alerts, maintenanceWindows, people } from "../schema";
import { explainingWindow, summarizeWindow, type MaintenanceWindow } from "../../lib/alerts/maintenance-windows";
import { formatPlantTime } from "../../lib/plant-time";
import { getPlantSettings } from "./plant-settings";
import { describeTarget, loadPlaceNames } from "./maintenance-windows";

/** The value a "held" event carries when a window held the alert (one per alert and window). */
export function heldByWindowValue(windowId: number): string {
  return `window:${windowId}`;
}

export type MaintenanceRoundResult = { held: Array<{ alertId: number; windowId: number }>; summarized: number[] };

const ACTIVE_STATES = ["active_unacked", "active_acked"] as const;

export async function runMaintenanceRound(db: Db, nowMs: number): Promise<MaintenanceRoundResult> {
  const result: MaintenanceRoundResult = { held: [], summarized: [] };
  const running = await db
    .select({
      id: maintenanceWindows.id,
      targetKind: maintenanceWindows.targetKind,
      targetId: maintenanceWindows.targetId,
      ownerId: maintenanceWindows.ownerId,
      ownerName: people.name,
      reason: maintenanceWindows.reason,
      startTs: maintenanceWindows.startTs,
      endTs: maintenanceWindows.endTs,
      extendReason: maintenanceWindows.extendReason,
    })
    .from(maintenanceWindows)
    .innerJoin(people, eq(people.id, maintenanceWindows.ownerId))
    .where(and(lte(maintenanceWindows.startTs, nowMs), gt(maintenanceWindows.endTs, nowMs)));
  const ended = await db
    .select({ id: maintenanceWindows.id, targetKind: maintenanceWindows.targetKind, targetId: maintenanceWindows.targetId, reason: maintenanceWindows.reason, startTs: maintenanceWindows.startTs, endTs: maintenanceWindows.endTs })
    .from(maintenanceWindows)
    .where(and(lte(maintenanceWindows.endTs, nowMs), isNull(maintenanceWindows.summary)))
    .limit(50);
  if (running.length === 0 && ended.length === 0) return result;
  const { timeZone } = await getPlantSettings(db);
  const names = await loadPlaceNames(db);
  const pointOfBar = (id: number) => names.neutralizer.get(id)?.pointId ?? null;

  if (running.length > 0) {
    const active = await db
      .select({ id: alerts.id, areaId: alerts.areaId, lineId: alerts.lineId, pointId: alerts.pointId, neutralizerId: alerts.neutralizerId })
      .from(alerts)
      .where(inArray(alerts.state, [...ACTIVE_STATES]))
      .limit(2000);
    const explained = active.map((a) => ({ a, w: explainingWindow(running, a, nowMs, pointOfBar) })).filter((x): x is { a: (typeof active)[number]; w: (typeof running)[number] } => x.w !== null);
    if (explained.length > 0) {
      const already = await db
        .select({ alertId: alertEvents.alertId, value: alertEvents.value })
        .from(alertEvents)
        .where(and(eq(alertEvents.kind, "held"), inArray(alertEvents.alertId, explained.map((x) => x.a.id))));
      const seen = new Set(already.map((e) => `${e.alertId}|${e.value}`));
      const rows = explained
        .filter(({ a, w }) => !seen.has(`${a.id}|${heldByWindowValue(w.id)}`))
        .map(({ a, w }) => ({
          alertId: a.id,
          ts: nowMs,
          kind: "held" as const,
          comment: `Planned work: ${w.reason} (${w.ownerName}), until ${formatPlantTime(w.endTs, timeZone, "HH:mm")}. Recorded; nobody is told until it ends.`,
          value: heldByWindowValue(w.id),
        }));
      if (rows.length) await db.insert(alertEvents).values(rows);
      for (const r of rows) result.held.push({ alertId: r.alertId, windowId: Number(r.value.slice("window:".length)) });
    }
  }

  for (const w of ended) {
    const barPoint = w.targetKind === "neutralizer" ? pointOfBar(w.targetId) : null;
    const place = placeCondition(w.targetKind, w.targetId, barPoint);
    const during = await db
      .select({ id: alerts.id, message: alerts.message, startTs: alerts.startTs, endTs: alerts.endTs })
      .from(alerts)
      .where(and(place, sql`${alerts.startTs} >= ${w.startTs}`, sql`${alerts.startTs} < ${w.endTs}`))
      .limit(1000);
    const targetName = describeTarget(names, w.targetKind, w.targetId)?.name ?? `${w.targetKind} ${w.targetId}`;
    const summary = summarizeWindow(w, targetName, during);
    const [res] = await db
      .update(maintenanceWindows)
      .set({ summary: summary.text, summarizedTs: nowMs })
      .where(and(eq(maintenanceWindows.id, w.id), isNull(maintenanceWindows.summary), eq(maintenanceWindows.endTs, w.endTs)));
    if (res.affectedRows === 1) result.summarized.push(w.id);
  }
  return result;
}

/** Alerts at a window's target (windowExplains of lib/alerts/maintenance-windows.ts, as a WHERE). */
function placeCondition(kind: MaintenanceWindow["targetKind"], targetId: number, barPointId: number | null) {
  switch (kind) {
    case "area":
      return eq(alerts.areaId, targetId);
    case "line":
      return eq(alerts.lineId, targetId);
    case "point":
      return eq(alerts.pointId, targetId);
    case "neutralizer":
      return barPointId !== null ? or(eq(alerts.neutralizerId, targetId), eq(alerts.pointId, barPointId)) : eq(alerts.neutralizerId, targetId);
  }
}
