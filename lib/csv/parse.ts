// Reading the data rows of an analysed CSV file into validated records; every rejected row is
// listed with its line number and reason. The rows come from the analysis's single parse.
import { CHANNEL_RANGES } from "../contract/readings-payload";
import { analyzeTable } from "./analyze";
import { parseDateCell, parseNumberCell } from "./cells";
import { FIELD_LABELS, REQUIRED, UNIT_CHOICES, type CheckLogRow, type CsvOptions, type CsvParseResult, type HumidityLogRow, type ImportField, type ImportKind, type RejectedRow, type UnitField, type Units } from "./fields";

const UNIT_FACTOR: Record<string, number> = { s: 1, ms: 0.001, V: 1, mV: 0.001, mm: 1, cm: 10, in: 25.4 };

function convert(field: UnitField, value: number, units: Units): number {
  if (field === "temp") return units.temp === "°F" ? ((value - 32) * 5) / 9 : value;
  if (field === "rh") return value;
  return value * UNIT_FACTOR[units[field]];
}

function round(value: number, digits = 6): number {
  return Number(value.toFixed(digits));
}

/** Reads every data row of the file; each bad row is reported with its line and reason. */
export function parseCsv(kind: "check_log", input: string, opts: CsvOptions): CsvParseResult<CheckLogRow>;
export function parseCsv(kind: "humidity_log", input: string, opts: CsvOptions): CsvParseResult<HumidityLogRow>;
export function parseCsv(kind: ImportKind, input: string, opts: CsvOptions): CsvParseResult<CheckLogRow | HumidityLogRow> {
  const { analysis, rows: fileRows } = analyzeTable(kind, input, opts);
  const rows: Array<CheckLogRow | HumidityLogRow> = [];
  const rejected: RejectedRow[] = [];
  if (analysis.fileErrors.length > 0 || analysis.headerLine === null) return { analysis, rows, rejected };

  const col = (f: ImportField) => analysis.mapping[f] ?? null;
  const width = analysis.headers.length;
  let pastHeader = false;

  for (const r of fileRows) {
    if (!pastHeader) {
      if (r.line === analysis.headerLine) pastHeader = true;
      continue;
    }
    if (!r.cells.some((c) => c.trim())) continue; // blank lines are not rows
    const reasons: string[] = [];
    const cell = (f: ImportField): string | null => {
      const i = col(f);
      if (i === null) return null;
      return i < r.cells.length ? r.cells[i] : null;
    };
    const missing = REQUIRED[kind].filter((f) => {
      const v = cell(f);
      return v === null || !v.trim();
    });
    if (missing.length > 0) {
      const short = r.cells.length < width ? ` (the row has ${r.cells.length} of ${width} columns)` : "";
      rejected.push({ line: r.line, reason: `missing ${missing.map((f) => FIELD_LABELS[f].toLowerCase()).join(", ")}${short}` });
      continue;
    }

    const dateCell = cell("date") ?? "";
    const timeCell = col("time") !== null ? cell("time") : null;
    const date = parseDateCell(dateCell, timeCell, analysis.dateOrder, analysis.timesIn === "utc" ? "UTC" : opts.timeZone);
    if (!date.ok) reasons.push(date.reason);

    const num = (f: UnitField, label: string, lo: number, hi: number, optional = false): number | null => {
      const raw = cell(f);
      if (raw === null || !raw.trim()) {
        if (!optional) reasons.push(`no ${label}`);
        return null;
      }
      const v = parseNumberCell(raw, analysis.decimalComma);
      if (v === null) {
        reasons.push(`${label} "${raw.trim()}" is not a number`);
        return null;
      }
      const converted = convert(f, v, analysis.units);
      if (converted < lo || converted > hi) {
        reasons.push(`${label} ${raw.trim()} ${analysis.units[f]} is outside ${lo}…${hi} ${f === "temp" ? "°C" : f === "rh" ? "%RH" : UNIT_CHOICES[f][0]}`);
        return null;
      }
      return round(converted);
    };

    if (kind === "check_log") {
      const tag = (cell("tag") ?? "").trim();
      // a charged-plate test runs for at most a few minutes; offsets beyond ±1000 V mean a
      // miswired plate (plausibility bounds, from memory)
      const decayPosS = num("decayPos", "decay +", 0, 600);
      const decayNegS = num("decayNeg", "decay −", 0, 600);
      const offsetV = num("offset", "offset", -1000, 1000);
      const plateDistanceMm = num("plateDistance", "plate distance", 0, 2000, true);
      const instrument = (cell("instrument") ?? "").trim() || null;
      if (tag.length > 60) reasons.push("neutralizer tag longer than 60 characters");
      if (reasons.length > 0 || !date.ok || decayPosS === null || decayNegS === null || offsetV === null) {
        rejected.push({ line: r.line, reason: reasons.join("; ") });
        continue;
      }
      rows.push({ line: r.line, ts: date.ts, tag, decayPosS, decayNegS, offsetV, plateDistanceMm, instrument: instrument ? instrument.slice(0, 120) : null });
    } else {
      const rhPct = num("rh", "relative humidity", CHANNEL_RANGES.rh_pct.min, CHANNEL_RANGES.rh_pct.max);
      const tempC = col("temp") !== null ? num("temp", "temperature", CHANNEL_RANGES.temp_c.min, CHANNEL_RANGES.temp_c.max, true) : null;
      if (reasons.length > 0 || !date.ok || rhPct === null) {
        rejected.push({ line: r.line, reason: reasons.join("; ") });
        continue;
      }
      rows.push({ line: r.line, ts: date.ts, tempC, rhPct });
    }
  }
  return { analysis, rows, rejected };
}
