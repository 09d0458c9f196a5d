// Read models for the live screens: plant settings (time zone, shifts, units), the Floor's
// current-state snapshot (structure, limits, open alerts, the last 15 minutes of every sensor as
// 1-minute means from the rollups, db/queries/floor-trends.ts) and the alerts drawn on a line's
// time axis.
import { and, desc, eq, gte, isNull, lte, ne, or } from "drizzle-orm";
import type { Db } from "../client";
import { alerts, devices } from "../schema";
import type { FloorArea, FloorSnapshot, TimelineAlert } from "../../lib/views/floor";
import { getPlantLayout, type PlantArea } from "./plant";
import { getFloorTrends } from "./floor-trends";
import { listLimitRules } from "./limits";
import { chartChargeLimit, chartRhLimit } from "../../lib/rules/limits-in-force";

import { getPlantSettings } from "./plant-settings";
export { getPlantSettings };

export const FLOOR_TREND_MS = 15 * 60_000;

type OpenAlertRow = { areaId: number | null; lineId: number | null; pointId: number | null; shelvedUntilTs: number | null };

async function listOpenAlerts(db: Db): Promise<OpenAlertRow[]> {
  return db
    .select({ areaId: alerts.areaId, lineId: alerts.lineId, pointId: alerts.pointId, shelvedUntilTs: alerts.shelvedUntilTs })
    .from(alerts)
    .where(ne(alerts.state, "closed"))
    .limit(5000);
}

/** Structure, limits and open alerts of the whole plant, or of one hall when areaId is given. */
export async function getFloorStructure(db: Db, opts: { nowMs?: number; areaId?: number } = {}): Promise<FloorArea[]> {
  const nowMs = opts.nowMs ?? Date.now();
  const [layout, limitRules, open, deviceSeen] = await Promise.all([
    getPlantLayout(db),
    listLimitRules(db),
    listOpenAlerts(db),
    db.select({ id: devices.id, lastSeenTs: devices.lastSeenTs }).from(devices),
  ]);
  const seen = new Map(deviceSeen.map((d) => [d.id, d.lastSeenTs]));
  const areas: PlantArea[] = opts.areaId === undefined ? layout : layout.filter((a) => a.id === opts.areaId);
  return areas.map((a) => ({
    id: a.id,
    slug: a.slug,
    name: a.name,
    rhMinPct: a.rhMinPct,
    rhMaxPct: a.rhMaxPct,
    tempSetpointC: a.tempSetpointC,
    rhLimit: chartRhLimit({ areaId: a.id, rhMinPct: a.rhMinPct }, limitRules),
    logger: a.logger ? { deviceId: a.logger.id, code: a.logger.code, lastSeenTs: seen.get(a.logger.id) ?? null } : null,
    openAlerts: open.filter((x) => x.areaId === a.id && x.lineId === null).length,
    lines: a.lines.map((l) => ({
      id: l.id,
      areaId: l.areaId,
      name: l.name,
      kind: l.kind,
      nominalSpeedMpm: l.nominalSpeedMpm,
      material: l.material,
      solventName: l.solventName,
      solventMieMj: l.solventMieMj,
      conductorCapacitancePf: l.conductorCapacitancePf,
      speedGateway: l.speedGateway ? { deviceId: l.speedGateway.id, lastSeenTs: seen.get(l.speedGateway.id) ?? null } : null,
      openAlerts: open.filter((x) => x.lineId === l.id).length,
      points: l.points.map((p) => ({
        id: p.id,
        name: p.name,
        position: p.position,
        fieldMeter: p.fieldMeter
          ? { deviceId: p.fieldMeter.id, code: p.fieldMeter.code, enabled: p.fieldMeter.enabled, lastSeenTs: seen.get(p.fieldMeter.id) ?? null }
          : null,
        neutralizer: p.neutralizer,
        limit: chartChargeLimit({ pointId: p.id, lineId: l.id, areaId: a.id }, limitRules),
        openAlerts: open.filter((x) => x.pointId === p.id).length,
        shelved: open.some((x) => x.pointId === p.id && x.shelvedUntilTs !== null && x.shelvedUntilTs > nowMs),
      })),
    })),
  }));
}

/** Every sensor device id of a set of halls (loggers, speed gateways, field meters). */
export function deviceIdsOf(areas: FloorArea[]): number[] {
  const ids: number[] = [];
  for (const a of areas) {
    if (a.logger) ids.push(a.logger.deviceId);
    for (const l of a.lines) {
      if (l.speedGateway) ids.push(l.speedGateway.deviceId);
      for (const p of l.points) if (p.fieldMeter) ids.push(p.fieldMeter.deviceId);
    }
  }
  return ids;
}

/**
 * The Floor (or one hall for the wallboard): structure plus the last 15 minutes of every sensor.
 * `trendDb` (the read replica when fit, db/client.ts getReadDb) serves the trends; the rest is
 * read from `db`.
 */
export async function getFloorSnapshot(db: Db, opts: { nowMs?: number; areaId?: number; trendDb?: Db } = {}): Promise<FloorSnapshot> {
  const nowTs = opts.nowMs ?? Date.now();
  const [plantSettings, areas] = await Promise.all([getPlantSettings(db), getFloorStructure(db, { nowMs: nowTs, areaId: opts.areaId })]);
  const series = await getFloorTrends(opts.trendDb ?? db, deviceIdsOf(areas), nowTs, FLOOR_TREND_MS);
  return { nowTs, settings: plantSettings, areas, series, trendMs: FLOOR_TREND_MS };
}

/** Alerts of a line (and its hall's own humidity alerts) that overlap [fromTs, toTs]. */
export async function listLineAlerts(db: Db, q: { lineId: number; areaId: number; fromTs: number; toTs: number; limit?: number }): Promise<TimelineAlert[]> {
  return db
    .select({
      id: alerts.id,
      kind: alerts.kind,
      severity: alerts.severity,
      state: alerts.state,
      message: alerts.message,
      startTs: alerts.startTs,
      endTs: alerts.endTs,
      pointId: alerts.pointId,
      lineId: alerts.lineId,
      areaId: alerts.areaId,
      peakValue: alerts.peakValue,
      shelvedUntilTs: alerts.shelvedUntilTs,
    })
    .from(alerts)
    .where(
      and(
        or(eq(alerts.lineId, q.lineId), and(eq(alerts.areaId, q.areaId), isNull(alerts.lineId))),
        lte(alerts.startTs, q.toTs),
        or(isNull(alerts.endTs), gte(alerts.endTs, q.fromTs), ne(alerts.state, "closed")),
      ),
    )
    .orderBy(desc(alerts.startTs))
    .limit(Math.min(q.limit ?? 200, 1000));
}

/** Ids of the line's devices (speed gateway, field meters) and its hall's logger, for the live stream's filter. */
export function liveDeviceIdsOfLine(area: FloorArea, lineId: number): number[] {
  const line = area.lines.find((l) => l.id === lineId);
  const ids: number[] = [];
  if (area.logger) ids.push(area.logger.deviceId);
  if (line?.speedGateway) ids.push(line.speedGateway.deviceId);
  for (const p of line?.points ?? []) if (p.fieldMeter) ids.push(p.fieldMeter.deviceId);
  return ids;
}

