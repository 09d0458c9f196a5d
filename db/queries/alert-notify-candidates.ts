// Alerts that may need an e-mail to the on-call person (ingest/alerts-escalation.ts).
import { and, asc, eq, inArray, isNull, lte, not, or, sql } from "drizzle-orm";
import type { Db } from "../client";
import { alertEvents, alerts, areas, lines, points } from "../schema";
import type { RuleKind, Severity } from "../../lib/vocabulary";
import { explainedByActiveWindow } from "./maintenance-windows";

export type NotifyCandidate = {
  id: number;
  ruleId: number;
  kind: RuleKind;
  severity: Severity;
  subjectKey: string;
  areaId: number | null;
  lineId: number | null;
  pointId: number | null;
  message: string;
  startTs: number;
  /** when the worker wrote it (null: written by other means, e.g. tests or history) */
  shownTs: number | null;
  peakValue: number | null;
  expectedCrossingTs: number | null;
  notifiedLevel: number;
  worsenedTs: number | null;
  notifyGroup: string | null;
  /** on call was told of it before it last got worse (a "notified" event before the last "worsened" one): it is then told again as "Worse:" */
  toldBefore: boolean;
  areaName: string | null;
  lineName: string | null;
  pointName: string | null;
};

/** Active, unacknowledged, unshelved alerts at or above a severity, raised at or before `startedBy`, not explained by a running maintenance window. */
export async function listNotifyCandidates(db: Db, severities: Severity[], startedBy: number, nowMs: number): Promise<NotifyCandidate[]> {
  return db
    .select({
      id: alerts.id,
      ruleId: alerts.ruleId,
      kind: alerts.kind,
      severity: alerts.severity,
      subjectKey: alerts.subjectKey,
      areaId: alerts.areaId,
      lineId: alerts.lineId,
      pointId: alerts.pointId,
      message: alerts.message,
      startTs: alerts.startTs,
      shownTs: alerts.shownTs,
      peakValue: alerts.peakValue,
      expectedCrossingTs: alerts.expectedCrossingTs,
      notifiedLevel: alerts.notifiedLevel,
      worsenedTs: alerts.worsenedTs,
      notifyGroup: alerts.notifyGroup,
      // told before its last worsening: event ids, not times, order them (the worsening is dated in
      // reading time, the telling in wall time; a message sent after the worsening already said it)
      toldBefore: sql<boolean>`EXISTS (SELECT 1 FROM ${alertEvents} AS told WHERE told.alert_id = ${alerts.id} AND told.kind = 'notified' AND told.id < (SELECT MAX(w.id) FROM ${alertEvents} AS w WHERE w.alert_id = ${alerts.id} AND w.kind = 'worsened'))`.mapWith((v: unknown) => Boolean(Number(v))),
      areaName: areas.name,
      lineName: lines.name,
      pointName: points.name,
    })
    .from(alerts)
    .leftJoin(areas, eq(areas.id, alerts.areaId))
    .leftJoin(lines, eq(lines.id, alerts.lineId))
    .leftJoin(points, eq(points.id, alerts.pointId))
    .where(
      and(
        eq(alerts.state, "active_unacked"),
        inArray(alerts.severity, severities.length ? severities : ["high"]),
        lte(alerts.startTs, startedBy),
        or(isNull(alerts.shelvedUntilTs), lte(alerts.shelvedUntilTs, nowMs)),
        // planned work explains it: recorded, nobody told until the window ends (db/queries/maintenance-round.ts)
        not(explainedByActiveWindow(nowMs)),
      ),
    )
    .orderBy(asc(alerts.startTs))
    .limit(500);
}
