// Invented report data for the reports' integration and browser tests, written straight into a
// seeded demo-plant database: one shift's raw readings, alerts with acknowledgements and
// comments, line notes, neutralizer records and checks (the shift handover and the equipment
// report), and a week of 1-minute and 1-hour rollups of Gravure Press 1 (the weekly review).
// The generators are plain functions of time so the tests can recompute every expected figure
// on their own. Relative imports: the browser tests (Playwright) load this file too.
import { and, eq, gte, isNotNull, lt } from "drizzle-orm";
import type { Db } from "../../db/client";
import * as s from "../../db/schema";
import { DEMO_PEOPLE } from "../../lib/demo-plant";
import { addDaysToDate, localDateOf, localTimeToTs, shiftWindowFor, weekWindow, type ShiftWindow } from "../../lib/plant-time";
import { DEFAULT_PLANT_SETTINGS } from "../../lib/plant-settings";

export const FIXTURE_TZ = "Europe/London";
export const SEC = 1000;
export const MIN = 60_000;
export const HOUR = 3_600_000;
export const DAY = 86_400_000;
/** Raw charge readings every 10 s, humidity every 60 s. */
export const CHARGE_STEP_MS = 10 * SEC;
export const RH_STEP_MS = 60 * SEC;

export type FixtureAlert = typeof s.alerts.$inferInsert & { id: number };
export type FixtureIds = Awaited<ReturnType<typeof lookupIds>>;

async function lookupIds(db: Db) {
  const lines = await db.select({ id: s.lines.id, slug: s.lines.slug, areaId: s.lines.areaId }).from(s.lines);
  const points = await db.select({ id: s.points.id, lineId: s.points.lineId, position: s.points.position, name: s.points.name }).from(s.points);
  const devices = await db.select({ id: s.devices.id, code: s.devices.code }).from(s.devices);
  const areas = await db.select({ id: s.areas.id, slug: s.areas.slug }).from(s.areas);
  const neutralizers = await db.select({ id: s.neutralizers.id, tag: s.neutralizers.tag, pointId: s.neutralizers.pointId }).from(s.neutralizers);
  const people = await db.select({ id: s.people.id, email: s.people.email }).from(s.people);
  const rules = await db.select({ id: s.rules.id, kind: s.rules.kind, pointId: s.rules.pointId, lineId: s.rules.lineId, areaId: s.rules.areaId }).from(s.rules);
  const line = (slug: string) => lines.find((l) => l.slug === slug)!;
  const point = (slug: string, position: number) => points.find((p) => p.lineId === line(slug).id && p.position === position)!;
  const device = (code: string) => devices.find((d) => d.code === code)!.id;
  const area = (slug: string) => areas.find((a) => a.slug === slug)!.id;
  const neutralizer = (tag: string) => neutralizers.find((n) => n.tag === tag)!.id;
  const person = (role: string) => people.find((p) => p.email === DEMO_PEOPLE.find((d) => d.role === role)!.email)!.id;
  const plantRule = (kind: string) => rules.find((r) => r.kind === kind && r.pointId === null && r.lineId === null && r.areaId === null)!.id;
  return { line, point, device, area, neutralizer, person, plantRule, neutralizers, devices };
}

/** Deterministic charge (kV) of a fixture meter at time t within the shift. */
export function chargeAt(meter: string, t: number, shift: ShiftWindow): number | null {
  const m = (t - shift.startTs) / MIN; // minutes into the shift (may be negative or past the end)
  const k = Math.round((t - shift.startTs) / CHARGE_STEP_MS);
  const wobble = Math.sin((2 * Math.PI * (t - shift.startTs)) / (30 * MIN));
  switch (meter) {
    case "fm-gravure-1-unwind":
      if (m >= 60 && m < 90) return -(14 + (k % 5)); // an excursion peaking at −18 kV
      if (m >= 300 && m < 310) return -13;
      return -(5 + 1.5 * wobble);
    case "fm-gravure-1-rewind":
      return Number((7 + 2 * wobble).toFixed(3)); // over its own 8 kV point limit part of the time
    case "fm-flexo-2-unwind":
      return 13.5; // over the plant-wide 12 kV but under the flexo line's 15 kV
    case "fm-labeller-1-dispense":
      return null; // silent all shift
    case "fm-slitter-1-knife-exit":
      if (m >= 120 && m < 150) return null; // a 30-minute gap
      return 3 + wobble;
    default:
      return 2 + wobble;
  }
}

/** Deterministic hall RH (%) at time t. */
export function rhAt(logger: string, t: number, shift: ShiftWindow): number {
  const m = (t - shift.startTs) / MIN;
  switch (logger) {
    case "th-press-hall":
      // falls from 35 % to 27 % at 4 h into the shift, then recovers
      return Number((35 - 8 * Math.max(0, 1 - Math.abs(m - 240) / 240)).toFixed(3));
    case "th-converting-hall":
      return Number((38 + 0.5 * Math.sin(m / 20)).toFixed(3));
    default:
      return 45;
  }
}

/** Hourly means of Gravure Press 1 for hour index h of the week. */
export function hourlyAt(h: number) {
  const hourOfDay = h % 24;
  const running = h === 30 ? 0.5 : hourOfDay >= 6 && hourOfDay < 22 ? 1 : 0;
  const speed = running === 0 ? 0 : 200 + 10 * (h % 7);
  const rh = 30 + 10 * Math.sin((2 * Math.PI * h) / 48) + (h % 5);
  const noise = (p: number) => (((h * 7 + p * 3) % 11) - 5) / 10;
  const charge = (p: number) => {
    if (running === 0) return 0.4;
    const sign = p % 2 === 0 ? 1 : -1;
    const a = [30, 24, 20, 28][p - 1];
    const b = [0.5, 0.4, 0.3, 0.45][p - 1];
    return sign * (a - b * rh + 0.02 * (speed - 200) + noise(p));
  };
  return { running, speed, rh, charge };
}

/** 1-minute extremes of Gravure Press 1 meters for minute m of the fixture day. */
export function minuteAt(meterPosition: number, m: number): { min: number; max: number } {
  switch (meterPosition) {
    case 1:
      return m % 10 === 0 ? { min: -15, max: -2 } : { min: -5, max: -2 };
    case 4:
      return m % 4 === 0 ? { min: 5, max: 9 } : { min: 5, max: 7 };
    default:
      return { min: 1, max: 4 };
  }
}

export function minuteRhMinAt(m: number): number {
  return m >= 600 && m < 660 ? 28 : 35;
}

async function insertChunks<T>(rows: T[], insert: (chunk: T[]) => Promise<unknown>, size = 4000) {
  for (let i = 0; i < rows.length; i += size) await insert(rows.slice(i, i + size));
}

export type ReportFixture = Awaited<ReturnType<typeof seedReportFixture>>;

/**
 * Writes the fixture. `nowTs` fixes "today"; the fixture day is eight days earlier so its whole
 * week is over and its raw readings are inside the retention.
 */
export async function seedReportFixture(db: Db, nowTs: number) {
  const ids = await lookupIds(db);
  const day = localDateOf(nowTs - 8 * DAY, FIXTURE_TZ);
  const shift = shiftWindowFor(day, "Early", { timeZone: FIXTURE_TZ, shifts: DEFAULT_PLANT_SETTINGS.shifts })!;
  const S = shift.startTs;
  const E = shift.endTs;
  const week = weekWindow(day, FIXTURE_TZ);

  // The fixture owns its time span: anything already recorded there (for example a simulator's
  // backfilled history in the shared browser-test database) is cleared first, so the report
  // figures are exactly those computed from the fixture.
  {
    const spanFrom = Math.min(S - 5 * MIN, week.startTs, localTimeToTs(day, 0, FIXTURE_TZ)) - HOUR;
    const spanTo = Math.max(E + 5 * MIN, week.endTs, localTimeToTs(day, 0, FIXTURE_TZ) + DAY) + HOUR;
    await db.delete(s.readings).where(and(gte(s.readings.ts, spanFrom), lt(s.readings.ts, spanTo)));
    await db.delete(s.rollup1m).where(and(gte(s.rollup1m.bucketTs, spanFrom), lt(s.rollup1m.bucketTs, spanTo)));
    await db.delete(s.rollup1h).where(and(gte(s.rollup1h.bucketTs, spanFrom), lt(s.rollup1h.bucketTs, spanTo)));
  }

  // --- limits: a point rule (Gravure rewind 8 kV) and a line rule (Flexo 15 kV) ------------------
  const addRule = async (name: string, scope: { pointId?: number; lineId?: number }, limitKv: number, clearKv: number) => {
    const [r] = await db.insert(s.rules).values({ kind: "charge_high", name, pointId: scope.pointId ?? null, lineId: scope.lineId ?? null, createdAt: S - 30 * DAY, currentVersion: 1 });
    await db.insert(s.ruleVersions).values({ ruleId: r.insertId, version: 1, severity: "medium", onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv, clearKv }, createdAt: S - 30 * DAY });
    return r.insertId;
  };
  const rewindRuleId = await addRule("Rewind tighter limit", { pointId: ids.point("gravure-1", 4).id }, 8, 6);
  const flexoRuleId = await addRule("Flexo line limit", { lineId: ids.line("flexo-2").id }, 15, 13);

  // --- raw readings of the shift (and a little either side) ------------------------------------
  const meters = ["fm-gravure-1-unwind", "fm-gravure-1-infeed", "fm-gravure-1-dryer-exit", "fm-gravure-1-rewind", "fm-flexo-2-unwind", "fm-flexo-2-print-exit", "fm-labeller-1-dispense", "fm-slitter-1-knife-exit"];
  const raw: (typeof s.readings.$inferInsert)[] = [];
  for (const code of meters) {
    const deviceId = ids.device(code);
    for (let t = S - 5 * MIN; t < E + 5 * MIN; t += CHARGE_STEP_MS) {
      const v = chargeAt(code, t, shift);
      if (v !== null) raw.push({ deviceId, channel: "charge_kv", ts: t, value: v });
    }
  }
  for (const code of ["th-press-hall", "th-converting-hall", "th-labelling-room"]) {
    const deviceId = ids.device(code);
    for (let t = S - 5 * MIN; t < E + 5 * MIN; t += RH_STEP_MS) raw.push({ deviceId, channel: "rh_pct", ts: t, value: rhAt(code, t, shift) });
  }
  await insertChunks(raw, (c) => db.insert(s.readings).values(c));

  // --- alerts around the shift ---------------------------------------------------------------
  const lead = ids.person("shift_lead");
  const engineer = ids.person("engineer");
  const pressHall = ids.area("press-hall");
  const gravure = ids.line("gravure-1").id;
  const unwind = ids.point("gravure-1", 1).id;
  const rewind = ids.point("gravure-1", 4).id;
  const infeed = ids.point("gravure-1", 2).id;
  const flexo = ids.line("flexo-2").id;
  const printExit = ids.point("flexo-2", 2).id;
  const converting = ids.area("converting-hall");
  const slitter = ids.line("slitter-1").id;
  const knifeExit = ids.point("slitter-1", 2).id;
  const alertSpecs: Omit<typeof s.alerts.$inferInsert, "ruleVersion" | "subjectKey">[] = [
    // 0: the previous shift's, ended before this one
    { ruleId: rewindRuleId, kind: "charge_high", severity: "medium", areaId: pressHall, lineId: gravure, pointId: rewind, state: "closed", message: "Rewind charge over 8 kV", startTs: S - 3 * HOUR, endTs: S - 2 * HOUR, peakValue: 9.4 },
    // 1: carried in from the previous shift, cleared during this one
    { ruleId: ids.plantRule("rh_low"), kind: "rh_low", severity: "medium", areaId: pressHall, state: "closed", message: "Press Hall humidity below 30 %", startTs: S - 30 * MIN, endTs: S + 20 * MIN, peakValue: 29.1, ackedBy: lead, ackedTs: S - 10 * MIN },
    // 2: the unwind excursion, acknowledged with a note
    { ruleId: ids.plantRule("charge_high"), kind: "charge_high", severity: "medium", areaId: pressHall, lineId: gravure, pointId: unwind, state: "closed", message: "Unwind charge over 12 kV", startTs: S + 60 * MIN + 10 * SEC, endTs: S + 90 * MIN + 30 * SEC, peakValue: -18, ackedBy: lead, ackedTs: S + 65 * MIN },
    // 3: still active at the end, not acknowledged
    { ruleId: ids.plantRule("rh_low"), kind: "rh_low", severity: "medium", areaId: pressHall, state: "active_unacked", message: "Press Hall humidity below 30 %", startTs: S + 3 * HOUR, endTs: null, peakValue: 27 },
    // 4: a neutralizer losing effect on another line
    { ruleId: ids.plantRule("effect_loss"), kind: "effect_loss", severity: "medium", areaId: ids.line("flexo-2").areaId, lineId: flexo, pointId: printExit, neutralizerId: ids.neutralizer("N-FLEXO-2-PRINT-EXIT"), state: "cleared_unacked", message: "Neutralizer before Print exit removes only 20 %", startTs: S + 6 * HOUR, endTs: S + 6 * HOUR + 20 * MIN, peakValue: 0.2 },
    // 5: the silent sensor
    { ruleId: ids.plantRule("sensor_silent"), kind: "sensor_silent", severity: "medium", areaId: converting, lineId: slitter, pointId: knifeExit, deviceId: ids.device("fm-slitter-1-knife-exit"), state: "closed", message: "Knife exit field meter silent", startTs: S + 122 * MIN, endTs: S + 150 * MIN, ackedBy: engineer, ackedTs: S + 125 * MIN },
    // 6: the next shift's
    { ruleId: ids.plantRule("charge_high"), kind: "charge_high", severity: "medium", areaId: pressHall, lineId: gravure, pointId: unwind, state: "closed", message: "Unwind charge over 12 kV", startTs: E + HOUR, endTs: E + HOUR + 5 * MIN, peakValue: 12.8 },
  ];
  // weekly-only alerts on Gravure Press 1, early on the Monday of the week (before any Early shift)
  for (let i = 0; i < 5; i++) {
    alertSpecs.push({ ruleId: ids.plantRule("charge_high"), kind: "charge_high", severity: "medium", areaId: pressHall, lineId: gravure, pointId: unwind, state: "closed", message: "Unwind charge over 12 kV", startTs: week.startTs + HOUR + i * 10 * MIN, endTs: week.startTs + HOUR + i * 10 * MIN + 5 * MIN, peakValue: -13, chattering: i < 2 });
  }
  for (let i = 0; i < 2; i++) {
    alertSpecs.push({ ruleId: ids.plantRule("charge_rate"), kind: "charge_rate", severity: "low", areaId: pressHall, lineId: gravure, pointId: infeed, state: "closed", message: "Infeed charge rising fast", startTs: week.startTs + 2 * HOUR + i * 10 * MIN, endTs: week.startTs + 2 * HOUR + i * 10 * MIN + 3 * MIN, peakValue: 4 });
  }
  // another line's alert and one from the week before: not in Gravure Press 1's review
  alertSpecs.push({ ruleId: ids.plantRule("charge_high"), kind: "charge_high", severity: "medium", areaId: ids.line("flexo-2").areaId, lineId: flexo, pointId: ids.point("flexo-2", 1).id, state: "closed", message: "Unwind charge over 12 kV", startTs: week.startTs + 3 * HOUR, endTs: week.startTs + 3 * HOUR + 2 * MIN });
  alertSpecs.push({ ruleId: ids.plantRule("charge_high"), kind: "charge_high", severity: "medium", areaId: pressHall, lineId: gravure, pointId: unwind, state: "closed", message: "Unwind charge over 12 kV", startTs: week.startTs - HOUR, endTs: week.startTs - HOUR + 2 * MIN });

  const alertRows: FixtureAlert[] = [];
  for (const [i, a] of alertSpecs.entries()) {
    const row = { ...a, ruleVersion: 1, subjectKey: `fixture:${i}` };
    const [res] = await db.insert(s.alerts).values(row);
    alertRows.push({ ...row, id: res.insertId });
  }
  const events: (typeof s.alertEvents.$inferInsert)[] = [
    { alertId: alertRows[2].id, ts: S + 60 * MIN + 10 * SEC, kind: "raised" },
    { alertId: alertRows[2].id, ts: S + 65 * MIN, kind: "acknowledged", personId: lead, comment: "Cleaned bar at unwind" },
    { alertId: alertRows[2].id, ts: S + 80 * MIN, kind: "commented", personId: engineer, comment: "Bar output checked, back to normal" },
    { alertId: alertRows[5].id, ts: S + 125 * MIN, kind: "acknowledged", personId: engineer, comment: null },
  ];
  await db.insert(s.alertEvents).values(events);

  // --- line notes -----------------------------------------------------------------------------
  const notes = [
    { lineId: gravure, pointId: unwind, ts: S + 95 * MIN, text: "Changed to new roll of film", personId: lead, createdTs: S + 95 * MIN },
    { lineId: ids.line("laminator-1").id, pointId: null, ts: S + 200 * MIN, text: "Humidifier output raised", personId: engineer, createdTs: S + 200 * MIN },
    { lineId: gravure, pointId: null, ts: S + 210 * MIN, text: "-3 kV after cleaning, =looks fine", personId: lead, createdTs: S + 210 * MIN },
    { lineId: gravure, pointId: null, ts: S - HOUR, text: "Previous shift's note", personId: lead, createdTs: S - HOUR },
  ];
  await db.insert(s.lineNotes).values(notes);

  // --- neutralizer records and checks ------------------------------------------------------------
  await db.update(s.neutralizers).set({ lastCleanedTs: E - 2 * DAY, state: "in_service" });
  await db.update(s.neutralizers).set({ state: "faulty" }).where(eq(s.neutralizers.tag, "N-GRAVURE-1-UNWIND"));
  await db.update(s.neutralizers).set({ lastCleanedTs: E - 30 * DAY }).where(eq(s.neutralizers.tag, "N-LAMINATOR-1-REWIND"));
  await db.update(s.neutralizers).set({ lastCleanedTs: E - 6 * DAY - 12 * HOUR }).where(eq(s.neutralizers.tag, "N-FLEXO-2-UNWIND"));
  // the fixture owns the checks of its database: the demo seed's own charged-plate history would
  // change the counts the compliance report is checked against
  await db.delete(s.equipmentEvents).where(isNotNull(s.equipmentEvents.checkId));
  await db.delete(s.checks);
  const checkRows: (typeof s.checks.$inferInsert)[] = [];
  for (const n of ids.neutralizers) {
    if (n.tag === "N-BAGGER-1-UNWIND") continue; // never checked
    checkRows.push({ neutralizerId: n.id, ts: E - 10 * DAY, decayPosS: 8, decayNegS: 9, offsetV: 12, passed: true, personId: engineer });
  }
  checkRows.push({ neutralizerId: ids.neutralizer("N-SLITTER-1-UNWIND"), ts: E - 5 * DAY, decayPosS: 31, decayNegS: 9, offsetV: 12, passed: false, failReasons: "Positive decay 31 s is over the 20 s limit.", personId: engineer });
  checkRows.push({ neutralizerId: ids.neutralizer("N-GRAVURE-1-UNWIND"), ts: E - 200 * DAY, decayPosS: 8, decayNegS: 9, offsetV: 12, passed: true, personId: engineer });
  checkRows.push({ neutralizerId: ids.neutralizer("N-GRAVURE-1-INFEED"), ts: E + 2 * DAY, decayPosS: 25, decayNegS: 9, offsetV: 50, passed: false, failReasons: "Offset 50 V is outside ±35 V.", personId: engineer });
  await db.insert(s.checks).values(checkRows);
  await db.update(s.devices).set({ calibrationDue: addDaysToDate(day, -3) }).where(eq(s.devices.code, "fm-gravure-1-unwind"));
  await db.update(s.devices).set({ calibrationDue: addDaysToDate(day, 5) }).where(eq(s.devices.code, "fm-gravure-1-rewind"));

  // --- a week of Gravure Press 1 rollups ------------------------------------------------------
  const gp = { meters: [1, 2, 3, 4].map((p) => ids.device(["fm-gravure-1-unwind", "fm-gravure-1-infeed", "fm-gravure-1-dryer-exit", "fm-gravure-1-rewind"][p - 1])), gateway: ids.device("sg-gravure-1"), logger: ids.device("th-press-hall") };
  const hourRows: (typeof s.rollup1h.$inferInsert)[] = [];
  const agg = (deviceId: number, channel: string, bucketTs: number, mean: number, count = 60) => ({ deviceId, channel, bucketTs, min: mean, max: mean, count, sum: mean * count, sumSq: mean * mean * count });
  const hours = Math.round((week.endTs - week.startTs) / HOUR);
  for (let h = 0; h < hours; h++) {
    const t = week.startTs + h * HOUR;
    const v = hourlyAt(h);
    hourRows.push(agg(gp.gateway, "running", t, v.running), agg(gp.gateway, "speed_mpm", t, v.speed), agg(gp.logger, "rh_pct", t, v.rh));
    gp.meters.forEach((deviceId, i) => hourRows.push(agg(deviceId, "charge_kv", t, v.charge(i + 1))));
  }
  await insertChunks(hourRows, (c) => db.insert(s.rollup1h).values(c));
  const dayStart = localTimeToTs(day, 0, FIXTURE_TZ); // local midnight of the fixture day
  const minuteRows: (typeof s.rollup1m.$inferInsert)[] = [];
  for (let m = 0; m < 1440; m++) {
    const t = dayStart + m * MIN;
    gp.meters.forEach((deviceId, i) => {
      const e = minuteAt(i + 1, m);
      minuteRows.push({ deviceId, channel: "charge_kv", bucketTs: t, min: e.min, max: e.max, count: 6, sum: 3 * (e.min + e.max), sumSq: 3 * (e.min * e.min + e.max * e.max) });
    });
    const r = minuteRhMinAt(m);
    minuteRows.push({ deviceId: gp.logger, channel: "rh_pct", bucketTs: t, min: r, max: r + 1, count: 1, sum: r, sumSq: r * r });
  }
  await insertChunks(minuteRows, (c) => db.insert(s.rollup1m).values(c));

  return {
    day,
    shift,
    week,
    dayStart,
    ids: { gravure, unwind, rewind, infeed, flexo, pressHall, lead, engineer, rewindRuleId, flexoRuleId, gp },
    meters,
    alerts: alertRows,
    notes,
    checks: checkRows,
    lookup: ids,
  };
}

/** True when the fixture is already in this database (a browser test run reusing its stack). */
export async function hasReportFixture(db: Db): Promise<boolean> {
  const rows = await db.select({ id: s.rules.id }).from(s.rules).where(eq(s.rules.name, "Rewind tighter limit")).limit(1);
  return rows.length > 0;
}
