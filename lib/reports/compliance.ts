/**
 * Equipment compliance: for a period, the verification checks done on each neutralizer and how
 * many passed, when the next check and cleaning fall due and what is overdue, and the field
 * meters' calibration dates. Pure; db/queries/reports.ts loads the inputs.
 *
 * "Due" is measured at `asOfTs`: the end of the period, or now when the period has not ended.
 * A neutralizer's next check is due `checkIntervalDays` after its last check (or after its
 * installation when it has never been checked); its next cleaning `cleaningIntervalDays` after
 * the last cleaning. "Due soon" looks ahead DUE_SOON_DAYS, but never more than a quarter of the
 * item's own interval: a bar cleaned weekly is not "due soon" for most of every week.
 */
import type { DateWindow } from "../plant-time";
import { localDateOf } from "../plant-time";
import type { Where } from "./types";
import { DAY_MS, type PointState } from "../vocabulary";

/** Items falling due within this many days of `asOfTs` are listed as "due soon". */
export const DUE_SOON_DAYS = 14;

export type DueStatus = "overdue" | "due_soon" | "ok" | "unknown";

export type ComplianceNeutralizerInput = {
  id: number;
  tag: string;
  kind: string;
  state: string;
  where: Where;
  cleaningIntervalDays: number;
  checkIntervalDays: number;
  lastCleanedTs: number | null;
  installedTs: number | null;
};

export type ComplianceCheckInput = { id: number; neutralizerId: number; ts: number; passed: boolean; failReasons: string | null; personName: string | null };

export type ComplianceMeterInput = { id: number; deviceCode: string; label: string; where: Where; calibrationDue: string | null };

export type ComplianceInput = {
  plantName: string;
  window: DateWindow;
  generatedTs: number;
  neutralizers: readonly ComplianceNeutralizerInput[];
  /** All checks up to the end of the period (earlier ones give the "last check" and due dates). */
  checks: readonly ComplianceCheckInput[];
  meters: readonly ComplianceMeterInput[];
};

export type Due = { dueTs: number | null; status: DueStatus; days: number | null; code: PointState };

export type ComplianceNeutralizerRow = {
  id: number;
  tag: string;
  kind: string;
  state: string;
  where: Where;
  checksInPeriod: number;
  passedInPeriod: number;
  failedInPeriod: ComplianceCheckInput[];
  lastCheck: ComplianceCheckInput | null;
  check: Due;
  lastCleanedTs: number | null;
  cleaning: Due;
};

export type ComplianceMeterRow = ComplianceMeterInput & { status: DueStatus; days: number | null; code: PointState };

export type ComplianceReport = {
  kind: "compliance";
  plantName: string;
  window: DateWindow;
  generatedTs: number;
  asOfTs: number;
  summary: {
    neutralizers: number;
    checksDone: number;
    checksPassed: number;
    /** passed / done, null when no check was done. */
    passRate: number | null;
    checksOverdue: number;
    checksDueSoon: number;
    cleaningOverdue: number;
    cleaningDueSoon: number;
    metersCalibrationOverdue: number;
    metersCalibrationDueSoon: number;
  };
  neutralizers: ComplianceNeutralizerRow[];
  meters: ComplianceMeterRow[];
};

const STATUS_CODE: Record<DueStatus, PointState> = { overdue: "over", due_soon: "near", ok: "normal", unknown: "silent" };
const URGENCY: Record<DueStatus, number> = { overdue: 0, unknown: 1, due_soon: 2, ok: 3 };

/** Look-ahead for "due soon" of an item with this interval: DUE_SOON_DAYS, at most a quarter of the interval. */
export function dueSoonWindowMs(intervalDays: number): number {
  return Math.min(DUE_SOON_DAYS, intervalDays / 4) * DAY_MS;
}

/** Status of a due time at `asOfTs`; `days` is whole days overdue, or whole days left. */
export function dueStatus(dueTs: number | null, asOfTs: number, soonMs: number = DUE_SOON_DAYS * DAY_MS): Due {
  if (dueTs === null) return { dueTs, status: "unknown", days: null, code: STATUS_CODE.unknown };
  if (dueTs <= asOfTs) {
    const days = Math.floor((asOfTs - dueTs) / DAY_MS);
    return { dueTs, status: "overdue", days, code: STATUS_CODE.overdue };
  }
  const days = Math.ceil((dueTs - asOfTs) / DAY_MS);
  const status: DueStatus = dueTs - asOfTs <= soonMs ? "due_soon" : "ok";
  return { dueTs, status, days, code: STATUS_CODE[status] };
}

/** Calibration due on a calendar date: overdue after that day, due soon within DUE_SOON_DAYS. */
export function calibrationStatus(calibrationDue: string | null, asOfTs: number, timeZone: string): { status: DueStatus; days: number | null } {
  if (!calibrationDue) return { status: "unknown", days: null };
  const today = localDateOf(asOfTs, timeZone);
  const daysBetween = Math.round((Date.parse(`${calibrationDue}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / DAY_MS);
  if (daysBetween < 0) return { status: "overdue", days: -daysBetween };
  return { status: daysBetween <= DUE_SOON_DAYS ? "due_soon" : "ok", days: daysBetween };
}

export function buildCompliance(input: ComplianceInput): ComplianceReport {
  const { window } = input;
  const asOfTs = Math.min(window.endTs, input.generatedTs);
  const checksBy = new Map<number, ComplianceCheckInput[]>();
  for (const c of input.checks) {
    if (c.ts >= window.endTs) continue;
    const list = checksBy.get(c.neutralizerId) ?? [];
    list.push(c);
    checksBy.set(c.neutralizerId, list);
  }

  const neutralizers: ComplianceNeutralizerRow[] = input.neutralizers
    .filter((n) => n.state !== "removed")
    .map((n) => {
      const all = (checksBy.get(n.id) ?? []).sort((a, b) => a.ts - b.ts || a.id - b.id);
      const inPeriod = all.filter((c) => c.ts >= window.startTs);
      const lastCheck = all.filter((c) => c.ts <= asOfTs).at(-1) ?? null;
      const checkFrom = lastCheck?.ts ?? n.installedTs;
      return {
        id: n.id,
        tag: n.tag,
        kind: n.kind,
        state: n.state,
        where: n.where,
        checksInPeriod: inPeriod.length,
        passedInPeriod: inPeriod.filter((c) => c.passed).length,
        failedInPeriod: inPeriod.filter((c) => !c.passed),
        lastCheck,
        check: dueStatus(checkFrom === null ? null : checkFrom + n.checkIntervalDays * DAY_MS, asOfTs, dueSoonWindowMs(n.checkIntervalDays)),
        lastCleanedTs: n.lastCleanedTs,
        cleaning: dueStatus(n.lastCleanedTs === null ? null : n.lastCleanedTs + n.cleaningIntervalDays * DAY_MS, asOfTs, dueSoonWindowMs(n.cleaningIntervalDays)),
      };
    })
    // what needs doing first: overdue, no record, due soon, then the rest; by tag within each
    .sort((a, b) => Math.min(URGENCY[a.check.status], URGENCY[a.cleaning.status]) - Math.min(URGENCY[b.check.status], URGENCY[b.cleaning.status]) || a.tag.localeCompare(b.tag));

  const meters: ComplianceMeterRow[] = input.meters
    .map((m) => {
      const s = calibrationStatus(m.calibrationDue, asOfTs, window.timeZone);
      return { ...m, ...s, code: STATUS_CODE[s.status] };
    })
    .sort((a, b) => URGENCY[a.status] - URGENCY[b.status] || a.deviceCode.localeCompare(b.deviceCode));

  const done = neutralizers.reduce((t, n) => t + n.checksInPeriod, 0);
  const passed = neutralizers.reduce((t, n) => t + n.passedInPeriod, 0);
  // a neutralizer never checked counts as overdue only when its installation date says so
  return {
    kind: "compliance",
    plantName: input.plantName,
    window,
    generatedTs: input.generatedTs,
    asOfTs,
    summary: {
      neutralizers: neutralizers.length,
      checksDone: done,
      checksPassed: passed,
      passRate: done > 0 ? passed / done : null,
      checksOverdue: neutralizers.filter((n) => n.check.status === "overdue").length,
      checksDueSoon: neutralizers.filter((n) => n.check.status === "due_soon").length,
      cleaningOverdue: neutralizers.filter((n) => n.cleaning.status === "overdue").length,
      cleaningDueSoon: neutralizers.filter((n) => n.cleaning.status === "due_soon").length,
      metersCalibrationOverdue: meters.filter((m) => m.status === "overdue").length,
      metersCalibrationDueSoon: meters.filter((m) => m.status === "due_soon").length,
    },
    neutralizers,
    meters,
  };
}
