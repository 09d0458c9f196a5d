// The rows the alert-load figures are computed from (lib/alert-load.ts computes them).
import { and, asc, eq, gte, inArray, isNull, lt } from "drizzle-orm";
import type { Db } from "../client";
import { alerts, rules } from "../schema";
import { ACTIVE_ALERT_STATES } from "../../lib/vocabulary";
import { STANDING_MS, computeAlertLoad, type AlertLoad, type LoadAlert } from "../../lib/alert-load";

/** The columns of one alert that the load figures read (both lists below select the same). */
const LOAD_ALERT_COLUMNS = {
  id: alerts.id,
  ruleId: alerts.ruleId,
  ruleName: rules.name,
  kind: alerts.kind,
  severity: alerts.severity,
  subjectKey: alerts.subjectKey,
  startTs: alerts.startTs,
  endTs: alerts.endTs,
  closedTs: alerts.closedTs,
  chattering: alerts.chattering,
  state: alerts.state,
};

export async function listAlertsStartedBetween(db: Db, fromTs: number, toTs: number, limit = 200_000): Promise<LoadAlert[]> {
  return db
    .select(LOAD_ALERT_COLUMNS)
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .where(and(gte(alerts.startTs, fromTs), lt(alerts.startTs, toTs)))
    .orderBy(asc(alerts.startTs))
    .limit(limit);
}

/** Alerts still not cleared that were raised before `beforeTs` (standing alerts). */
export async function listStandingAlerts(db: Db, beforeTs: number): Promise<LoadAlert[]> {
  return db
    .select(LOAD_ALERT_COLUMNS)
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .where(and(isNull(alerts.endTs), inArray(alerts.state, [...ACTIVE_ALERT_STATES]), lt(alerts.startTs, beforeTs)))
    .orderBy(asc(alerts.startTs))
    .limit(1000);
}

export async function getAlertLoad(db: Db, fromTs: number, toTs: number, nowMs = Date.now()): Promise<AlertLoad> {
  const [raised, standing] = await Promise.all([listAlertsStartedBetween(db, fromTs, toTs), listStandingAlerts(db, nowMs - STANDING_MS)]);
  return computeAlertLoad(raised, standing, fromTs, toTs, nowMs);
}
