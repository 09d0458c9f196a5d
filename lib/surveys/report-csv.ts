/**
 * The survey report as CSV (formula-safe through lib/csv.ts): one row per spot in web-path
 * order, then the findings and the actions, each block under its own header row. Pure.
 */
import { toCsv, type CsvCell } from "../csv";
import { FINDING_LABELS } from "./findings";
import { ACTION_KIND_LABELS } from "./schemas";
import type { SurveyReport } from "./types";

const iso = (ts: number | null) => (ts === null ? null : new Date(ts));
const r3 = (v: number | null | undefined) => (v === null || v === undefined ? null : Math.round(v * 1000) / 1000);

export function surveyReportCsv(rep: SurveyReport): string {
  const rows: CsvCell[][] = [];
  for (const s of rep.spots) {
    const r = s.reading;
    rows.push([
      "reading",
      s.position,
      s.name,
      s.afterNeutralizer,
      iso(r?.ts ?? null),
      r?.enteredValue,
      r?.unit,
      r?.distanceMm,
      r3(r?.equivalentKv),
      s.limitKv,
      r3(s.reductionPct),
      r ? (r.running ? "running" : "stopped") : null,
      r?.speedMpm,
      r3(r?.fixedKv),
      r?.note,
    ]);
  }
  for (const f of rep.findings) rows.push(["finding", null, f.spotKey, FINDING_LABELS[f.kind], null, null, null, null, r3(f.valueKv), f.limitKv, r3(f.reductionPct), null, null, null, f.text]);
  for (const a of rep.actions) {
    rows.push(["action", null, ACTION_KIND_LABELS[a.kind], a.ownerName, a.dueDate, null, null, null, null, null, null, a.state, null, null, a.closeNote ? `${a.text} | closed: ${a.closeNote}` : a.text]);
  }
  const header = [
    "row",
    "position",
    "spot / finding spot / action",
    "after neutralizer / kind / owner",
    "time (UTC) / due",
    "reading as entered",
    "unit",
    "distance mm",
    `kV at ${rep.calibratedDistanceMm} mm (equivalent)`,
    "limit kV",
    "reduction %",
    "line / state",
    "speed m/min",
    "fixed meter kV",
    "note / text",
  ];
  return toCsv(header, rows, { bom: true });
}
