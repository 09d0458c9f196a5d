// The alert list and an alert's detail: read models for the alerts page, its route handlers
// and the daily digest. The view types are in lib/views/alerts.ts.
import { and, asc, eq, gte, lt, ne, or, isNull, inArray, sql, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import { alertEvents, alerts, areas, lateFindings, lines, people, points, rules } from "../schema";
import type { AlertState, Severity } from "../../lib/vocabulary";
import type { AlertDetail, AlertListItem } from "../../lib/views/alerts";

const listColumns = {
  id: alerts.id,
  ruleId: alerts.ruleId,
  ruleVersion: alerts.ruleVersion,
  ruleName: rules.name,
  kind: alerts.kind,
  severity: alerts.severity,
  subjectKey: alerts.subjectKey,
  areaId: alerts.areaId,
  lineId: alerts.lineId,
  pointId: alerts.pointId,
  deviceId: alerts.deviceId,
  neutralizerId: alerts.neutralizerId,
  areaName: areas.name,
  lineName: lines.name,
  pointName: points.name,
  state: alerts.state,
  message: alerts.message,
  startTs: alerts.startTs,
  endTs: alerts.endTs,
  closedTs: alerts.closedTs,
  peakValue: alerts.peakValue,
  expectedCrossingTs: alerts.expectedCrossingTs,
  chattering: alerts.chattering,
  shelvedUntilTs: alerts.shelvedUntilTs,
  shelvedReason: alerts.shelvedReason,
  ackedBy: alerts.ackedBy,
  ackedByName: people.name,
  ackedTs: alerts.ackedTs,
  notifiedLevel: alerts.notifiedLevel,
  notifyGroup: alerts.notifyGroup,
  worsenedTs: alerts.worsenedTs,
  foundLateTs: sql<number | null>`(SELECT lf.found_ts FROM ${lateFindings} AS lf WHERE lf.alert_id = ${alerts.id})`.mapWith((v: unknown) => (v === null || v === undefined ? null : Number(v))),
  foundLateQuiet: sql<boolean | null>`(SELECT lf.quiet FROM ${lateFindings} AS lf WHERE lf.alert_id = ${alerts.id})`.mapWith((v: unknown) => (v === null || v === undefined ? null : Boolean(Number(v)))),
  linkLineId: sql<number | null>`COALESCE(${alerts.lineId}, (SELECT l2.id FROM ${lines} AS l2 WHERE l2.area_id = ${alerts.areaId} ORDER BY l2.display_order, l2.id LIMIT 1))`.mapWith((v: unknown) => (v === null || v === undefined ? null : Number(v))),
};

export type AlertFilters = {
  areaId?: number;
  lineId?: number;
  states?: AlertState[];
  /** only alerts not closed */
  openOnly?: boolean;
  severities?: Severity[];
  /** alerts overlapping [fromTs, toTs): started before toTs and not ended before fromTs */
  fromTs?: number;
  toTs?: number;
  ids?: number[];
  limit?: number;
};

function filterWhere(f: AlertFilters): SQL | undefined {
  const where: SQL[] = [];
  if (f.areaId !== undefined) where.push(eq(alerts.areaId, f.areaId));
  if (f.lineId !== undefined) where.push(eq(alerts.lineId, f.lineId));
  if (f.states?.length) where.push(inArray(alerts.state, f.states));
  if (f.openOnly) where.push(ne(alerts.state, "closed"));
  if (f.severities?.length) where.push(inArray(alerts.severity, f.severities));
  if (f.toTs !== undefined) where.push(lt(alerts.startTs, f.toTs));
  if (f.fromTs !== undefined) where.push(or(isNull(alerts.closedTs), gte(alerts.closedTs, f.fromTs))!);
  if (f.ids) where.push(inArray(alerts.id, f.ids.length ? f.ids : [-1]));
  return where.length ? and(...where) : undefined;
}

/**
 * Alerts for the list: open ones first (high severity first, then the longest waiting first),
 * then closed ones, newest first.
 */
export async function listAlerts(db: Db, f: AlertFilters = {}): Promise<AlertListItem[]> {
  const rows = await db
    .select(listColumns)
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .leftJoin(areas, eq(areas.id, alerts.areaId))
    .leftJoin(lines, eq(lines.id, alerts.lineId))
    .leftJoin(points, eq(points.id, alerts.pointId))
    .leftJoin(people, eq(people.id, alerts.ackedBy))
    .where(filterWhere(f))
    .orderBy(
      sql`(${alerts.state} = 'closed') ASC`,
      sql`(CASE ${alerts.severity} WHEN 'high' THEN 3 WHEN 'medium' THEN 2 ELSE 1 END) DESC`,
      sql`(CASE WHEN ${alerts.state} = 'closed' THEN -${alerts.startTs} ELSE ${alerts.startTs} END) ASC`,
      asc(alerts.id),
    )
    .limit(Math.min(f.limit ?? 200, 1000));
  return rows;
}

export async function getAlertDetail(db: Db, id: number): Promise<AlertDetail | null> {
  const [row] = await listAlerts(db, { ids: [id], limit: 1 });
  if (!row) return null;
  const events = await db
    .select({ id: alertEvents.id, ts: alertEvents.ts, kind: alertEvents.kind, personId: alertEvents.personId, personName: people.name, comment: alertEvents.comment, value: alertEvents.value })
    .from(alertEvents)
    .leftJoin(people, eq(people.id, alertEvents.personId))
    .where(eq(alertEvents.alertId, id))
    .orderBy(asc(alertEvents.ts), asc(alertEvents.id));
  return { ...row, events };
}

/** Counts for the page header: open alerts by state. */
export async function countOpenAlerts(db: Db): Promise<Record<AlertState, number>> {
  const rows = await db.select({ state: alerts.state, n: sql<number>`COUNT(*)` }).from(alerts).where(ne(alerts.state, "closed")).groupBy(alerts.state);
  const out: Record<AlertState, number> = { active_unacked: 0, active_acked: 0, cleared_unacked: 0, closed: 0 };
  for (const r of rows) out[r.state] = Number(r.n);
  return out;
}

/** Alerts raised in [fromTs, toTs) for the daily digest, oldest first. */
export async function listAlertsForDigest(db: Db, fromTs: number, toTs: number): Promise<AlertListItem[]> {
  const rows = await db
    .select(listColumns)
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .leftJoin(areas, eq(areas.id, alerts.areaId))
    .leftJoin(lines, eq(lines.id, alerts.lineId))
    .leftJoin(points, eq(points.id, alerts.pointId))
    .leftJoin(people, eq(people.id, alerts.ackedBy))
    .where(and(gte(alerts.startTs, fromTs), lt(alerts.startTs, toTs)))
    .orderBy(asc(alerts.startTs))
    .limit(2000);
  return rows;
}
