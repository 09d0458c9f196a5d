// Read models behind the reports (shift handover, weekly line review, equipment compliance).
// Loads exactly the rows a report needs (explicit columns,
// people by name only) and hands them to the pure builders in lib/reports.
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
import { getPlantLayout, type PlantArea } from "./plant";
import { dateRangeWindow, localTimeToTs, shiftWindowFor, weekWindow, type ShiftWindow } from "../../lib/plant-time";
import { buildCompliance, type ComplianceCheckInput, type ComplianceReport } from "../../lib/reports/compliance";
import { buildHandover, RAW_HOLD_MS, type HandoverAlertInput, type HandoverReport } from "../../lib/reports/handover";
import { listStoredRules } from "./limits";
import { bucketExtreme, type Sample } from "../../lib/reports/series";
import { buildPlaceIndex } from "../../lib/reports/types";
import { buildWeekly, MINUTE_HOLD_MS, rollupRms, type HourlyMean, type WeeklyReport } from "../../lib/reports/weekly";

import { getPlantSettings } from "./plant-settings";
export { getPlantSettings };

/** Each hall's outdoor-air flow and humidifier capacity (for the humidity planner's presets). */
export async function listHallAirSupply(db: Db): Promise<{ id: number; airflowM3PerH: number; humidifierKgPerH: number }[]> {
  return db.select({ id: areas.id, airflowM3PerH: areas.airflowM3PerH, humidifierKgPerH: areas.humidifierKgPerH }).from(areas).orderBy(asc(areas.id));
}

function groupSamples(rows: readonly { deviceId: number; ts: number; value: number }[]): Map<number, Sample[]> {
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

const fieldMeterIds = (plant: readonly PlantArea[]) => plant.flatMap((a) => a.lines.flatMap((l) => l.points.flatMap((p) => (p.fieldMeter ? [p.fieldMeter.id] : []))));
const loggerIds = (plant: readonly PlantArea[]) => plant.flatMap((a) => (a.logger ? [a.logger.id] : []));

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

// ---------------------------------------------------------------------------------------------
// Shift handover
// ---------------------------------------------------------------------------------------------

export type HandoverRequest = { date: string; shift: string };

/** The handover of a shift, or null when the plant has no shift of that name. */
export async function getHandoverReport(db: Db, req: HandoverRequest, nowTs: number): Promise<HandoverReport | null> {
  const plantSettings = await getPlantSettings(db);
  const window = shiftWindowFor(req.date, req.shift, plantSettings);
  if (!window) return null;
  return buildHandoverForWindow(db, window, plantSettings.name, nowTs);
}

export async function buildHandoverForWindow(db: Db, window: ShiftWindow, plantName: string, nowTs: number): Promise<HandoverReport> {
  const plant = await getPlantLayout(db);
  const [ruleList, chargeSeries, rhSeries, alertList, neutralizerList, notes] = await Promise.all([
    listStoredRules(db),
    loadRawSeries(db, "charge_kv", fieldMeterIds(plant), window.startTs, window.endTs, RAW_HOLD_MS),
    loadRawSeries(db, "rh_pct", loggerIds(plant), window.startTs, window.endTs, RAW_HOLD_MS),
    loadAlertsInWindow(db, window.startTs, window.endTs),
    loadNeutralizerRecords(db, window.endTs, window.timeZone),
    loadLineNotes(db, window.startTs, window.endTs),
  ]);
  return buildHandover({
    plantName,
    window,
    generatedTs: nowTs,
    plant,
    rules: ruleList,
    chargeSeries,
    rhSeries,
    alerts: alertList,
    neutralizers: neutralizerList,
    notes,
  });
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

// ---------------------------------------------------------------------------------------------
// Weekly line review
// ---------------------------------------------------------------------------------------------

export type WeeklyRequest = { lineId: number; date: string };

export async function getWeeklyReport(db: Db, req: WeeklyRequest, nowTs: number): Promise<WeeklyReport | null> {
  const plantSettings = await getPlantSettings(db);
  const plant = await getPlantLayout(db);
  const area = plant.find((a) => a.lines.some((l) => l.id === req.lineId));
  const line = area?.lines.find((l) => l.id === req.lineId);
  if (!area || !line) return null;
  const window = weekWindow(req.date, plantSettings.timeZone);
  const meterIds = line.points.flatMap((p) => (p.fieldMeter ? [p.fieldMeter.id] : []));
  const hourlyIds = [...meterIds, ...(line.speedGateway ? [line.speedGateway.id] : []), ...(area.logger ? [area.logger.id] : [])];
  const pointIds = line.points.map((p) => p.id);

  const [ruleList, minuteCharge, minuteRh, hourlyRows, alertRows] = await Promise.all([
    listStoredRules(db),
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

  const hourly: HourlyMean[] = hourlyRows.filter((r) => r.count > 0).map((r) => ({ deviceId: r.deviceId, channel: r.channel, bucketTs: r.bucketTs, mean: r.sum / r.count, rms: rollupRms(r.count, r.sumSq) }));
  return buildWeekly({
    plantName: plantSettings.name,
    window,
    generatedTs: nowTs,
    area,
    line,
    rules: ruleList,
    minuteCharge: groupSamples(minuteCharge.map((r) => ({ deviceId: r.deviceId, ts: r.bucketTs, value: bucketExtreme(r.min, r.max) }))),
    minuteRhMin: minuteRh.map((r) => ({ ts: r.bucketTs, value: r.min })),
    hourly,
    alerts: alertRows,
  });
}

// ---------------------------------------------------------------------------------------------
// Equipment compliance
// ---------------------------------------------------------------------------------------------

export type ComplianceRequest = { from: string; to: string };

export async function getComplianceReport(db: Db, req: ComplianceRequest, nowTs: number): Promise<ComplianceReport> {
  const plantSettings = await getPlantSettings(db);
  const window = dateRangeWindow(req.from, req.to, plantSettings.timeZone);
  const plant = await getPlantLayout(db);
  const places = buildPlaceIndex(plant);
  const [neutralizerRows, checkRows, meterRows] = await Promise.all([
    loadNeutralizerRecords(db, window.endTs, plantSettings.timeZone),
    db
      .select({ id: checks.id, neutralizerId: checks.neutralizerId, ts: checks.ts, passed: checks.passed, failReasons: checks.failReasons, personName: people.name })
      .from(checks)
      .leftJoin(people, eq(people.id, checks.personId))
      .where(lt(checks.ts, window.endTs))
      .orderBy(asc(checks.ts), asc(checks.id)),
    db
      .select({ id: devices.id, code: devices.code, label: devices.label, kind: devices.kind, pointId: devices.pointId, lineId: devices.lineId, areaId: devices.areaId, calibrationDue: devices.calibrationDue })
      .from(devices)
      .where(and(eq(devices.enabled, true), inArray(devices.kind, ["field_meter", "th_logger"])))
      .orderBy(asc(devices.code)),
  ]);
  const checkList: ComplianceCheckInput[] = checkRows;
  return buildCompliance({
    plantName: plantSettings.name,
    window,
    generatedTs: nowTs,
    neutralizers: neutralizerRows.map((n) => ({ ...n, where: places.where({ pointId: n.pointId }) })),
    checks: checkList,
    meters: meterRows.map((m) => ({
      id: m.id,
      deviceCode: m.code,
      label: m.label,
      where: places.where({ pointId: m.pointId, lineId: m.lineId, areaId: m.areaId }),
      calibrationDue: m.calibrationDue,
    })),
  });
}
