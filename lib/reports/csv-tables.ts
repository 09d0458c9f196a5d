/**
 * CSV downloads of the reports' tables, through lib/csv (RFC 4180 quoting, formula cells
 * escaped). Times are local to the plant, named in the header; charges keep their sign.
 * The state words come from the caller (components/ui/state-badge STATE_WORDS) so the CSV says
 * exactly what the screen says.
 */
import { recordsToCsv, type CsvColumn } from "../csv";
import type { ComplianceReport } from "./compliance";
import { formatCsvTime } from "./format";
import type { HandoverReport } from "./handover";
import type { PointState } from "../vocabulary";
import type { WeeklyReport } from "./weekly";

export type StateWords = Record<PointState, string>;

export const HANDOVER_TABLES = ["alerts", "points", "halls", "neutralizers", "notes"] as const;
export const WEEKLY_TABLES = ["points", "rules", "pairs"] as const;
export const COMPLIANCE_TABLES = ["neutralizers", "meters"] as const;

export type CsvFile = { filename: string; csv: string };

const minutes = (ms: number) => Math.round(ms / 600) / 100;
const round = (v: number | null | undefined, d = 2) => (v === null || v === undefined ? null : Number(v.toFixed(d)));

function slug(text: string): string {
  return text.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "");
}

function file<T>(filename: string, columns: CsvColumn<T>[], rows: readonly T[]): CsvFile {
  return { filename, csv: recordsToCsv(columns, rows, { bom: true }) };
}

export function handoverCsv(report: HandoverReport, table: (typeof HANDOVER_TABLES)[number], words: StateWords): CsvFile {
  const zone = report.window.timeZone;
  const t = (ts: number | null | undefined) => formatCsvTime(ts, zone);
  const base = `handover-${report.window.date}-${slug(report.window.name)}-${table}.csv`;
  const local = `(${zone})`;
  switch (table) {
    case "alerts":
      return file(base, [
        { header: "State", value: (a) => words[a.code] },
        { header: "Hall", value: (a) => a.where.areaName },
        { header: "Line", value: (a) => a.where.lineName },
        { header: "Point", value: (a) => a.where.pointName },
        { header: "Rule", value: (a) => a.ruleName },
        { header: "Kind", value: (a) => a.kind },
        { header: "Severity", value: (a) => a.severity },
        { header: "Message", value: (a) => a.message },
        { header: `Started ${local}`, value: (a) => t(a.startTs) },
        { header: `Ended ${local}`, value: (a) => t(a.endTs) },
        { header: "Minutes active in shift", value: (a) => minutes(a.activeMsInShift) },
        { header: "Peak", value: (a) => round(a.peakValue) },
        { header: "Status", value: (a) => a.status },
        { header: "Acknowledged by", value: (a) => a.ackedByName },
        { header: `Acknowledged ${local}`, value: (a) => t(a.ackedTs) },
        {
          header: "Notes",
          value: (a) =>
            a.events
              .filter((e) => e.comment)
              .map((e) => `${t(e.ts)} ${e.personName ?? "someone"}: ${e.comment}`)
              .join(" | "),
        },
      ], report.alerts);
    case "points":
      return file(base, [
        { header: "State", value: (p) => words[p.code] },
        { header: "Hall", value: (p) => p.where.areaName },
        { header: "Line", value: (p) => p.where.lineName },
        { header: "Point", value: (p) => p.where.pointName },
        { header: "Limit kV", value: (p) => p.limitKv },
        { header: "Minutes over limit", value: (p) => minutes(p.overMs) },
        { header: "Excursions", value: (p) => p.excursions },
        { header: "Minutes with data", value: (p) => minutes(p.coveredMs) },
        { header: "Worst kV", value: (p) => round(p.worst?.value) },
        { header: `Worst at ${local}`, value: (p) => t(p.worst?.ts) },
      ], report.points);
    case "halls":
      return file(base, [
        { header: "State", value: (h) => words[h.code] },
        { header: "Hall", value: (h) => h.areaName },
        { header: "Lowest RH %", value: (h) => round(h.lowest?.value, 1) },
        { header: `Lowest at ${local}`, value: (h) => t(h.lowest?.ts) },
        { header: "Band minimum RH %", value: (h) => h.rhMinPct },
        { header: "Minutes below band", value: (h) => minutes(h.belowBandMs) },
        { header: "Alert limit RH %", value: (h) => h.limitPct },
        { header: "Minutes below alert limit", value: (h) => minutes(h.belowLimitMs) },
      ], report.halls);
    case "neutralizers":
      return file(base, [
        { header: "State", value: (n) => words[n.code] },
        { header: "Tag", value: (n) => n.tag },
        { header: "Kind", value: (n) => n.kind },
        { header: "Where", value: (n) => n.where.label },
        { header: "Needs attention because", value: (n) => n.reasons.join("; ") },
      ], report.neutralizers);
    case "notes":
      return file(base, [
        { header: `Time ${local}`, value: (n) => t(n.ts) },
        { header: "Line", value: (n) => n.where.lineName },
        { header: "Point", value: (n) => n.where.pointName },
        { header: "By", value: (n) => n.personName },
        { header: "Note", value: (n) => n.text },
      ], report.notes);
  }
}

export function weeklyCsv(report: WeeklyReport, table: (typeof WEEKLY_TABLES)[number], words: StateWords): CsvFile {
  const zone = report.window.timeZone;
  const base = `weekly-${slug(report.line.name)}-${report.window.firstDate}-${table}.csv`;
  switch (table) {
    case "points":
      return file(base, [
        { header: "State", value: (p) => words[p.code] },
        { header: "Point", value: (p) => p.name },
        { header: "Limit kV", value: (p) => p.limitKv },
        { header: "Minutes with a reading over the limit", value: (p) => minutes(p.overMs) },
        { header: "Excursions", value: (p) => p.excursions },
        { header: "Worst kV", value: (p) => round(p.worst?.value) },
        { header: `Worst at (${zone})`, value: (p) => formatCsvTime(p.worst?.ts, zone) },
        { header: "Alerts", value: (p) => p.alerts },
        { header: "|charge| vs RH: slope kV per % RH", value: (p) => round(p.rh.fit?.slope, 4) },
        { header: "|charge| vs RH: intercept kV", value: (p) => round(p.rh.fit?.intercept, 3) },
        { header: "|charge| vs RH: r²", value: (p) => round(p.rh.fit?.rSquared, 4) },
        { header: "|charge| vs RH: hours", value: (p) => p.rh.n },
        { header: "|charge| vs speed: slope kV per m/min", value: (p) => round(p.speed.fit?.slope, 5) },
        { header: "|charge| vs speed: r²", value: (p) => round(p.speed.fit?.rSquared, 4) },
        { header: "|charge| vs speed: hours", value: (p) => p.speed.n },
      ], report.points);
    case "rules":
      return file(base, [
        { header: "Rule", value: (r) => r.ruleName },
        { header: "Kind", value: (r) => r.kind },
        { header: "Alerts", value: (r) => r.count },
        { header: "Chattering", value: (r) => r.chattering },
        { header: "Minutes active", value: (r) => minutes(r.activeMs) },
      ], report.alerts.noisiestRules);
    case "pairs": {
      const rows = report.points.flatMap((p) => [
        ...p.rh.plot.map(([x, y]) => ({ point: p.name, against: "rh_pct", x, y })),
        ...p.speed.plot.map(([x, y]) => ({ point: p.name, against: "speed_mpm", x, y })),
      ]);
      return file(base, [
        { header: "Point", value: (r) => r.point },
        { header: "Against", value: (r) => r.against },
        { header: "x (hourly mean)", value: (r) => round(r.x, 3) },
        { header: "charge kV (hourly RMS)", value: (r) => round(r.y, 3) },
      ], rows);
    }
  }
}

export function complianceCsv(report: ComplianceReport, table: (typeof COMPLIANCE_TABLES)[number], words: StateWords): CsvFile {
  const zone = report.window.timeZone;
  const d = (ts: number | null | undefined) => (ts === null || ts === undefined ? "" : formatCsvTime(ts, zone).slice(0, 10));
  const base = `equipment-${report.window.firstDate}-to-${report.window.lastDate}-${table}.csv`;
  switch (table) {
    case "neutralizers":
      return file(base, [
        { header: "Check state", value: (n) => words[n.check.code] },
        { header: "Tag", value: (n) => n.tag },
        { header: "Kind", value: (n) => n.kind },
        { header: "Where", value: (n) => n.where.label },
        { header: "Equipment state", value: (n) => n.state },
        { header: "Checks in period", value: (n) => n.checksInPeriod },
        { header: "Passed in period", value: (n) => n.passedInPeriod },
        { header: "Last check", value: (n) => d(n.lastCheck?.ts) },
        { header: "Last check passed", value: (n) => (n.lastCheck ? n.lastCheck.passed : null) },
        { header: "Next check due", value: (n) => d(n.check.dueTs) },
        { header: "Check status", value: (n) => n.check.status },
        { header: "Last cleaned", value: (n) => d(n.lastCleanedTs) },
        { header: "Next cleaning due", value: (n) => d(n.cleaning.dueTs) },
        { header: "Cleaning status", value: (n) => n.cleaning.status },
      ], report.neutralizers);
    case "meters":
      return file(base, [
        { header: "State", value: (m) => words[m.code] },
        { header: "Device", value: (m) => m.deviceCode },
        { header: "Label", value: (m) => m.label },
        { header: "Where", value: (m) => m.where.label },
        { header: "Calibration due", value: (m) => m.calibrationDue },
        { header: "Status", value: (m) => m.status },
      ], report.meters);
  }
}
