// Data access behind the reports (shift handover, weekly line review, equipment compliance):
// loads exactly the rows a report needs (explicit columns, people by name only). The use cases
// that assemble a report from these rows and the pure builders of lib/reports live in
// db/use-cases/handover-report.ts, weekly-report.ts and compliance-report.ts.
import { and, asc, eq, gte, inArray, isNull, lt, or, sql } from "drizzle-orm";
import type { Db } from "../client";
import {
  alertEvents,
  alerts,
  areas,
  checks,
  devices,
  lineNotes,
  neutralizers,
  people,
  rollup1h,
  rollup1m,
  rules,
  readings,
} from "../schema";
import type { PlantArea } from "./plant";
import { localTimeToTs } from "../../lib/plant-time";
import type { HandoverAlertInput } from "../../lib/reports/handover";
import type { Sample } from "../../lib/reports/series";
import { MINUTE_HOLD_MS } from "../../lib/reports/weekly";

import { getPlantSettings } from "./plant-settings";
export { getPlantSettings };

/** Each hall's outdoor-air flow and humidifier capacity (for the humidity planner's presets). */
export async function listHallAirSupply(db: Db): Promise<{ id: number; airflowM3PerH: number; humidifierKgPerH: number }[]> {
  return db.select({ id: areas.id, airflowM3PerH: areas.airflowM3PerH, humidifierKgPerH: areas.humidifierKgPerH }).from(areas).orderBy(asc(areas.id));
}

export function groupSamples(rows: readonly { deviceId: number; ts: number; value: number }[]): Map<number, Sample[]> {
  const out = new Map<number, Sample[]>();
  for (const r of rows) {
    let list = out.get(r.deviceId);
    if (!list) out.set(r.deviceId, (list = []));
    list.push({ ts: r.ts, value: r.value });
  }
  return out;
}

/**
 * Raw readings of one channel for some devices from `fromTs − holdMs` (so a reading just before
 * the window still counts for its hold) to `toTs`, oldest first, grouped by device.
 */
export async function loadRawSeries(db: Db, channel: string, deviceIds: readonly number[], fromTs: number, toTs: number, holdMs: number): Promise<Map<number, Sample[]>> {
  if (deviceIds.length === 0) return new Map();
  const rows = await db
    .select({ deviceId: readings.deviceId, ts: readings.ts, value: readings.value })
    .from(readings)
    .where(and(inArray(readings.deviceId, [...deviceIds]), eq(readings.channel, channel), gte(readings.ts, fromTs - holdMs), lt(readings.ts, toTs)))
    .orderBy(asc(readings.deviceId), asc(readings.ts));
  return groupSamples(rows);
}

export const fieldMeterIds = (plant: readonly PlantArea[]) => plant.flatMap((a) => a.lines.flatMap((l) => l.points.flatMap((p) => (p.fieldMeter ? [p.fieldMeter.id] : []))));
export const loggerIds = (plant: readonly PlantArea[]) => plant.flatMap((a) => (a.logger ? [a.logger.id] : []));

/** Alerts active at any time in [fromTs, toTs), with rule names, who acknowledged and what people wrote. */
export async function loadAlertsInWindow(db: Db, fromTs: number, toTs: number): Promise<HandoverAlertInput[]> {
  const rows = await db
    .select({
      id: alerts.id,
      kind: alerts.kind,
      severity: alerts.severity,
      ruleName: rules.name,
      message: alerts.message,
      state: alerts.state,
      startTs: alerts.startTs,
      endTs: alerts.endTs,
      peakValue: alerts.peakValue,
      chattering: alerts.chattering,
      shelvedUntilTs: alerts.shelvedUntilTs,
      shelvedReason: alerts.shelvedReason,
      ackedByName: people.name,
      ackedTs: alerts.ackedTs,
      areaId: alerts.areaId,
      lineId: alerts.lineId,
      pointId: alerts.pointId,
      deviceId: alerts.deviceId,
      neutralizerId: alerts.neutralizerId,
    })
    .from(alerts)
    .leftJoin(rules, eq(rules.id, alerts.ruleId))
    .leftJoin(people, eq(people.id, alerts.ackedBy))
    .where(and(lt(alerts.startTs, toTs), or(isNull(alerts.endTs), sql`${alerts.endTs} > ${fromTs}`)))
    .orderBy(asc(alerts.startTs), asc(alerts.id));
  if (rows.length === 0) return [];
  const events = await db
    .select({ alertId: alertEvents.alertId, ts: alertEvents.ts, kind: alertEvents.kind, personName: people.name, comment: alertEvents.comment })
    .from(alertEvents)
    .leftJoin(people, eq(people.id, alertEvents.personId))
    .where(and(inArray(alertEvents.alertId, rows.map((r) => r.id)), inArray(alertEvents.kind, ["acknowledged", "commented", "shelved", "unshelved"])))
    .orderBy(asc(alertEvents.ts), asc(alertEvents.id));
  const byAlert = new Map<number, HandoverAlertInput["events"][number][]>();
  for (const e of events) {
    const list = byAlert.get(e.alertId) ?? [];
    list.push({ ts: e.ts, kind: e.kind, personName: e.personName, comment: e.comment });
    byAlert.set(e.alertId, list);
  }
  return rows.map((r) => ({ ...r, events: byAlert.get(r.id) ?? [] }));
}

/** Neutralizers with their intervals, last cleaning and the last check before `beforeTs`. */
export async function loadNeutralizerRecords(db: Db, beforeTs: number, timeZone: string) {
  const list = await db
    .select({
      id: neutralizers.id,
      tag: neutralizers.tag,
      kind: neutralizers.kind,
      state: neutralizers.state,
      pointId: neutralizers.pointId,
      cleaningIntervalDays: neutralizers.cleaningIntervalDays,
      checkIntervalDays: neutralizers.checkIntervalDays,
      lastCleanedTs: neutralizers.lastCleanedTs,
      installedOn: neutralizers.installedOn,
    })
    .from(neutralizers)
    .orderBy(asc(neutralizers.tag));
  const last = await db
    .select({ neutralizerId: checks.neutralizerId, ts: checks.ts, passed: checks.passed, failReasons: checks.failReasons, id: checks.id })
    .from(checks)
    .where(lt(checks.ts, beforeTs))
    .orderBy(asc(checks.neutralizerId), asc(checks.ts), asc(checks.id));
  const lastBy = new Map<number, { ts: number; passed: boolean; failReasons: string | null }>();
  for (const c of last) lastBy.set(c.neutralizerId, { ts: c.ts, passed: c.passed, failReasons: c.failReasons });
  return list.map(({ installedOn, ...n }) => ({
    ...n,
    installedTs: installedOn ? localTimeToTs(installedOn, 0, timeZone) : null,
    lastCheck: lastBy.get(n.id) ?? null,
  }));
}

export async function loadLineNotes(db: Db, fromTs: number, toTs: number) {
  return db
    .select({ id: lineNotes.id, ts: lineNotes.ts, lineId: lineNotes.lineId, pointId: lineNotes.pointId, text: lineNotes.text, personName: people.name })
    .from(lineNotes)
    .leftJoin(people, eq(people.id, lineNotes.personId))
    .where(and(gte(lineNotes.ts, fromTs), lt(lineNotes.ts, toTs)))
    .orderBy(asc(lineNotes.ts), asc(lineNotes.id));
}

/** People who can take a handover (shift leads and up), by name; the e-mail stays on the server. */
export async function listHandoverRecipients(db: Db): Promise<{ id: number; name: string; role: string }[]> {
  return db
    .select({ id: people.id, name: people.name, role: people.role })
    .from(people)
    .where(and(eq(people.active, true), inArray(people.role, ["shift_lead", "engineer", "admin"])))
    .orderBy(asc(people.name));
}

export async function getRecipient(db: Db, personId: number): Promise<{ id: number; name: string; email: string; role: string; active: boolean } | null> {
  const rows = await db.select({ id: people.id, name: people.name, email: people.email, role: people.role, active: people.active }).from(people).where(eq(people.id, personId)).limit(1);
  return rows[0] ?? null;
}

/** The rollups and alerts the weekly line review of one line reads, for one week window. */
export async function loadWeeklyRows(
  db: Db,
  q: { window: { startTs: number; endTs: number }; meterIds: number[]; loggerId: number | null; hourlyIds: number[]; lineId: number; pointIds: number[]; areaId: number },
) {
  const { window, meterIds, hourlyIds, pointIds } = q;
  const area = { id: q.areaId, logger: q.loggerId === null ? null : { id: q.loggerId } };
  const line = { id: q.lineId };
  const [minuteCharge, minuteRh, hourlyRows, alertRows] = await Promise.all([
    meterIds.length
      ? db
          .select({ deviceId: rollup1m.deviceId, bucketTs: rollup1m.bucketTs, min: rollup1m.min, max: rollup1m.max })
          .from(rollup1m)
          .where(and(inArray(rollup1m.deviceId, meterIds), eq(rollup1m.channel, "charge_kv"), gte(rollup1m.bucketTs, window.startTs - MINUTE_HOLD_MS), lt(rollup1m.bucketTs, window.endTs)))
          .orderBy(asc(rollup1m.deviceId), asc(rollup1m.bucketTs))
      : Promise.resolve([]),
    area.logger
      ? db
          .select({ bucketTs: rollup1m.bucketTs, min: rollup1m.min })
          .from(rollup1m)
          .where(and(eq(rollup1m.deviceId, area.logger.id), eq(rollup1m.channel, "rh_pct"), gte(rollup1m.bucketTs, window.startTs - MINUTE_HOLD_MS), lt(rollup1m.bucketTs, window.endTs)))
          .orderBy(asc(rollup1m.bucketTs))
      : Promise.resolve([]),
    hourlyIds.length
      ? db
          .select({ deviceId: rollup1h.deviceId, channel: rollup1h.channel, bucketTs: rollup1h.bucketTs, sum: rollup1h.sum, sumSq: rollup1h.sumSq, count: rollup1h.count })
          .from(rollup1h)
          .where(and(inArray(rollup1h.deviceId, hourlyIds), gte(rollup1h.bucketTs, window.startTs), lt(rollup1h.bucketTs, window.endTs)))
      : Promise.resolve([]),
    db
      .select({
        id: alerts.id,
        ruleId: alerts.ruleId,
        ruleName: rules.name,
        kind: alerts.kind,
        severity: alerts.severity,
        startTs: alerts.startTs,
        endTs: alerts.endTs,
        chattering: alerts.chattering,
        pointId: alerts.pointId,
        lineId: alerts.lineId,
        areaId: alerts.areaId,
      })
      .from(alerts)
      .leftJoin(rules, eq(rules.id, alerts.ruleId))
      .where(
        and(
          gte(alerts.startTs, window.startTs),
          lt(alerts.startTs, window.endTs),
          or(
            eq(alerts.lineId, line.id),
            pointIds.length ? inArray(alerts.pointId, pointIds) : sql`false`,
            and(eq(alerts.areaId, area.id), isNull(alerts.lineId), isNull(alerts.pointId)),
          ),
        ),
      )
      .orderBy(asc(alerts.startTs)),
  ]);

  return { minuteCharge, minuteRh, hourlyRows, alertRows };
}

/** Every check before `beforeTs` and every enabled meter with its calibration date, for the compliance report. */
export async function loadComplianceRows(db: Db, beforeTs: number) {
  const [checkRows, meterRows] = await Promise.all([
    db
      .select({ id: checks.id, neutralizerId: checks.neutralizerId, ts: checks.ts, passed: checks.passed, failReasons: checks.failReasons, personName: people.name })
      .from(checks)
      .leftJoin(people, eq(people.id, checks.personId))
      .where(lt(checks.ts, beforeTs))
      .orderBy(asc(checks.ts), asc(checks.id)),
    db
      .select({ id: devices.id, code: devices.code, label: devices.label, kind: devices.kind, pointId: devices.pointId, lineId: devices.lineId, areaId: devices.areaId, calibrationDue: devices.calibrationDue })
      .from(devices)
      .where(and(eq(devices.enabled, true), inArray(devices.kind, ["field_meter", "th_logger"])))
      .orderBy(asc(devices.code)),
  ]);
  return { checkRows, meterRows };
}
