/**
 * Reading CSV files exported by instruments, as they really come: a byte-order mark, a few
 * preamble lines before the column names, semicolons and decimal commas, separate date and
 * time columns, units in the header ("Decay + (ms)", "Temp °F"), day/month dates, short rows.
 *
 * Two kinds of file:
 * - check_log: a charged-plate instrument's log (date, neutralizer tag, decay +, decay −, offset,
 *   optionally plate distance and instrument);
 * - humidity_log: a standalone temperature/humidity logger's history (time, °C or °F, %RH).
 *
 * analyzeCsv() finds the delimiter, the header row, the column for each field and each field's
 * unit, and shows the first rows; parseCsv() turns the data rows into validated records and
 * lists every rejected row with its line number (1 = the first line of the file) and a reason.
 * The caller may override the detected mapping, units and date order (the "map columns" step).
 *
 * Pure: papaparse for the CSV grammar, @date-fns/tz for local times. No I/O.
 */
import Papa from "papaparse";
import { TZDate } from "@date-fns/tz";
import { CHANNEL_RANGES } from "./contract/readings-payload";

export const IMPORT_KINDS = ["check_log", "humidity_log"] as const;
export type ImportKind = (typeof IMPORT_KINDS)[number];

export const CHECK_LOG_FIELDS = ["date", "time", "tag", "decayPos", "decayNeg", "offset", "plateDistance", "instrument"] as const;
export const HUMIDITY_LOG_FIELDS = ["date", "time", "temp", "rh"] as const;
export type CheckLogField = (typeof CHECK_LOG_FIELDS)[number];
export type HumidityLogField = (typeof HUMIDITY_LOG_FIELDS)[number];
export type ImportField = CheckLogField | HumidityLogField;

export const FIELD_LABELS: Record<ImportField, string> = {
  date: "Date (or date and time)",
  time: "Time of day (when separate from the date)",
  tag: "Neutralizer tag",
  decayPos: "Decay time + (1000 → 100 V)",
  decayNeg: "Decay time − (−1000 → −100 V)",
  offset: "Offset (balance) voltage",
  plateDistance: "Plate distance",
  instrument: "Instrument",
  temp: "Temperature",
  rh: "Relative humidity",
};

const REQUIRED: Record<ImportKind, readonly ImportField[]> = {
  check_log: ["date", "tag", "decayPos", "decayNeg", "offset"],
  humidity_log: ["date", "rh"],
};

export const FIELDS_BY_KIND: Record<ImportKind, readonly ImportField[]> = {
  check_log: CHECK_LOG_FIELDS,
  humidity_log: HUMIDITY_LOG_FIELDS,
};

export function requiredFields(kind: ImportKind): readonly ImportField[] {
  return REQUIRED[kind];
}

// Units each numeric field may come in; values are converted to the first one.
export const UNIT_CHOICES = {
  decayPos: ["s", "ms"],
  decayNeg: ["s", "ms"],
  offset: ["V", "mV"],
  plateDistance: ["mm", "cm", "in"],
  temp: ["°C", "°F"],
  rh: ["%RH"],
} as const;
export type UnitField = keyof typeof UNIT_CHOICES;
export type Units = { [F in UnitField]: (typeof UNIT_CHOICES)[F][number] };
export type UnitSource = "header" | "values" | "default" | "chosen";

export const DEFAULT_UNITS: Units = { decayPos: "s", decayNeg: "s", offset: "V", plateDistance: "mm", temp: "°C", rh: "%RH" };

export type DateOrder = "dmy" | "mdy";
export type Mapping = Partial<Record<ImportField, number | null>>;

export type CsvAnalysis = {
  kind: ImportKind;
  delimiter: string;
  decimalComma: boolean;
  hadBom: boolean;
  /** 1-based line of the header row; null when no header was recognised. */
  headerLine: number | null;
  headers: string[];
  mapping: Record<string, number | null>;
  units: Units;
  unitSources: Partial<Record<UnitField, UnitSource>>;
  dateOrder: DateOrder;
  dateOrderSource: "values" | "default" | "chosen";
  /** times without a zone are read as UTC when the column says so ("Time (UTC)"), else plant time */
  timesIn: "utc" | "plant";
  /** required fields with no column: the file cannot be imported until they are mapped */
  missingRequired: ImportField[];
  /** the first data rows as they are in the file */
  preview: { line: number; cells: string[] }[];
  /** problems with the whole file (no header, nothing to read, a required column missing) */
  fileErrors: string[];
};

export type CheckLogRow = {
  line: number;
  ts: number;
  tag: string;
  decayPosS: number;
  decayNegS: number;
  offsetV: number;
  plateDistanceMm: number | null;
  instrument: string | null;
};

export type HumidityLogRow = { line: number; ts: number; tempC: number | null; rhPct: number };

export type RejectedRow = { line: number; reason: string };

export type CsvParseResult<R> = { analysis: CsvAnalysis; rows: R[]; rejected: RejectedRow[] };

export type CsvOptions = {
  /** plant time zone: times written without a zone are local plant time */
  timeZone: string;
  mapping?: Mapping;
  units?: Partial<Units>;
  dateOrder?: DateOrder;
};

// ---------------------------------------------------------------------------------------------
// header recognition

function normalizeHeader(h: string): string {
  return h
    .toLowerCase()
    .replace(/[\u2212\u2013\u2014]/g, "-")
    .replace(/\s+/g, " ")
    .trim();
}

type Matcher = (h: string) => boolean;

const has = (re: RegExp): Matcher => (h) => re.test(h);
// a sign that is not a hyphen inside a word ("decay-time" has no polarity)
const isPositive: Matcher = (h) => /(^|[^a-z])(pos|positive|plus)/.test(h) || h.includes("+");
const isNegative: Matcher = (h) => !isPositive(h) && (/(^|[^a-z])(neg|negative|minus)/.test(h) || /(^|[^a-z])-|-([^a-z]|$)/.test(h));

const MATCHERS: Record<ImportField, Matcher> = {
  date: has(/^(date|datum|timestamp|date ?\/? ?time|datetime|zeit ?stempel|recorded|logged)|(^|\W)(date|timestamp)(\W|$)/),
  time: has(/^(time|time of day|uhrzeit|zeit|heure|hora|clock)(\W|$)/),
  tag: has(/neutrali[sz]er|ioni[sz](er|ing)|(^|\W)(tag|bar|equipment|asset)(\W|$)|unit id/),
  decayPos: (h) => /decay|discharge|t ?\+|t ?pos/.test(h) && isPositive(h) && !/neg|minus/.test(h),
  decayNeg: (h) => /decay|discharge|t ?-|t ?neg/.test(h) && isNegative(h),
  offset: has(/offset|balance|float/),
  plateDistance: has(/(plate|test).*dist|distance/),
  instrument: has(/instrument|meter|monitor|serial|s\/n|device/),
  temp: (h) => /temp|°c|°f|deg ?[cf]|celsius|fahrenheit/.test(h) && !/dew|frost/.test(h),
  rh: has(/(^|\W)(rh|r\.h\.|humidity|hum|feuchte)(\W|$)|%\s*rh|rel\.? ?hum/),
};

function matchField(kind: ImportKind, header: string): ImportField | null {
  const h = normalizeHeader(header);
  if (!h) return null;
  // order matters: a "Date/Time" column is the date, "Time" alone is the time of day
  const order: ImportField[] =
    kind === "check_log" ? ["decayPos", "decayNeg", "offset", "plateDistance", "tag", "instrument", "date", "time"] : ["rh", "temp", "date", "time"];
  for (const f of order) {
    if (f === "time" && MATCHERS.date(h)) continue;
    if (MATCHERS[f](h)) return f;
  }
  return null;
}

function unitFromHeader(field: UnitField, header: string): Units[UnitField] | null {
  const h = normalizeHeader(header);
  switch (field) {
    case "decayPos":
    case "decayNeg":
      if (/(\(|\[|\s|^)ms(\)|\]|\s|$)|milli/.test(h)) return "ms";
      if (/(\(|\[|\s)(s|sec|secs|seconds)(\)|\]|\s|$)/.test(h)) return "s";
      return null;
    case "offset":
      if (/(\(|\[|\s)mv(\)|\]|\s|$)/.test(h)) return "mV";
      if (/(\(|\[|\s)v(\)|\]|\s|$)|volt/.test(h)) return "V";
      return null;
    case "plateDistance":
      if (/(\(|\[|\s)mm(\)|\]|\s|$)/.test(h)) return "mm";
      if (/(\(|\[|\s)cm(\)|\]|\s|$)/.test(h)) return "cm";
      if (/(\(|\[|\s)(in|inch|inches|")(\)|\]|\s|$)/.test(h)) return "in";
      return null;
    case "temp":
      if (/°\s*f|deg ?f|fahrenheit|\(f\)|\[f\]/.test(h)) return "°F";
      if (/°\s*c|deg ?c|celsius|\(c\)|\[c\]/.test(h)) return "°C";
      return null;
    case "rh":
      return "%RH";
  }
}

// ---------------------------------------------------------------------------------------------
// numbers and dates

/** "12,5" with decimal commas, "−3.4" with a typographic minus, "+12" and "12.5 s" all read. */
export function parseNumberCell(cell: string, decimalComma: boolean): number | null {
  let s = cell.trim().replace(/[\u2212\u2013]/g, "-").replace(/\s+/g, "");
  s = s.replace(/(ms|s|sec|mv|v|mm|cm|in|°c|°f|%rh|%)$/i, "");
  if (decimalComma) {
    if (/^[+-]?\d{1,3}(\.\d{3})+(,\d+)?$/.test(s)) s = s.replace(/\./g, "");
    s = s.replace(",", ".");
  }
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

const DMY_OR_MDY = /^(\d{1,2})[./-](\d{1,2})[./-](\d{4}|\d{2})$/;
const YMD = /^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})$/;
const TIME = /^(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,3}))?)?\s*(am|pm)?$/i;

function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

/**
 * Epoch ms of a date/time cell, or a reason it cannot be read. Accepted: ISO 8601 with a zone
 * (taken as is); "YYYY-MM-DD[ T]HH:MM[:SS]", "DD/MM/YYYY HH:MM", "DD.MM.YYYY HH:MM" and
 * "MM/DD/YYYY" (per `dateOrder`) in plant local time; epoch seconds or milliseconds.
 */
export function parseDateCell(dateCell: string, timeCell: string | null, dateOrder: DateOrder, timeZone: string): { ok: true; ts: number } | { ok: false; reason: string } {
  const raw = `${dateCell.trim()}${timeCell !== null && timeCell.trim() ? ` ${timeCell.trim()}` : ""}`;
  const bad = (why = "is not a date this import can read") => ({ ok: false as const, reason: `date "${raw}" ${why}` });
  if (!dateCell.trim()) return { ok: false, reason: "no date" };

  if (/^\d{10}$/.test(raw)) return { ok: true, ts: Number(raw) * 1000 };
  if (/^\d{13}$/.test(raw)) return { ok: true, ts: Number(raw) };

  // ISO 8601 with an explicit zone
  if (/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/i.test(raw)) {
    const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(raw)!;
    if (!validParts(+m[1], +m[2], +m[3], +m[4], +m[5], 0)) return bad("is not a valid date");
    const ts = Date.parse(raw);
    return Number.isFinite(ts) ? { ok: true, ts } : bad();
  }

  const [datePart, ...rest] = raw.replace("T", " ").split(/\s+/);
  const timePart = rest.join(" ");
  let year: number, month: number, day: number;
  let m = YMD.exec(datePart);
  if (m) {
    [year, month, day] = [+m[1], +m[2], +m[3]];
  } else if ((m = DMY_OR_MDY.exec(datePart))) {
    const a = +m[1];
    const b = +m[2];
    year = m[3].length === 2 ? 2000 + +m[3] : +m[3];
    [day, month] = dateOrder === "dmy" ? [a, b] : [b, a];
  } else return bad();

  let hour = 0,
    minute = 0,
    second = 0,
    ms = 0;
  if (timePart) {
    const t = TIME.exec(timePart);
    if (!t) return bad();
    hour = +t[1];
    minute = +t[2];
    second = t[3] ? +t[3] : 0;
    ms = t[4] ? Math.round(Number(`0.${t[4]}`) * 1000) : 0;
    if (t[5]) {
      if (hour < 1 || hour > 12) return bad("is not a valid date");
      const pm = t[5].toLowerCase() === "pm";
      hour = (hour % 12) + (pm ? 12 : 0);
    }
  }
  if (!validParts(year, month, day, hour, minute, second)) return bad("is not a valid date");
  const ts = new TZDate(year, month - 1, day, hour, minute, second, ms, timeZone).getTime();
  return Number.isFinite(ts) ? { ok: true, ts } : bad();
}

function validParts(year: number, month: number, day: number, hour: number, minute: number, second: number): boolean {
  if (year < 1990 || year > 2100) return false;
  if (month < 1 || month > 12) return false;
  if (day < 1 || day > daysInMonth(year, month)) return false;
  return hour >= 0 && hour <= 23 && minute >= 0 && minute <= 59 && second >= 0 && second <= 59;
}

// ---------------------------------------------------------------------------------------------
// the file

type Table = { text: string; hadBom: boolean };

function prepare(input: string): Table {
  const hadBom = input.charCodeAt(0) === 0xfeff;
  const text = (hadBom ? input.slice(1) : input).replace(/\r\n?/g, "\n");
  return { text, hadBom };
}

const DELIMITERS = [";", "\t", ",", "|"] as const;

function headerScore(kind: ImportKind, cells: string[]): number {
  const found = new Set<ImportField>();
  for (const c of cells) {
    const f = matchField(kind, c);
    if (f) found.add(f);
  }
  return found.size;
}

type Detected = { delimiter: string; headerIndex: number | null; rows: string[][] };

/** Tries each delimiter on the first lines; the winner has the best header and steady rows. */
function detectLayout(kind: ImportKind, text: string): Detected {
  let best: Detected & { score: number } = { delimiter: ",", headerIndex: null, rows: [], score: -1 };
  for (const delimiter of DELIMITERS) {
    const rows = Papa.parse<string[]>(text, { delimiter, preview: 60, skipEmptyLines: false }).data;
    let headerIndex: number | null = null;
    let headerHits = 0;
    for (let i = 0; i < Math.min(rows.length, 30); i++) {
      const hits = headerScore(kind, rows[i]);
      if (hits >= 2 && hits > headerHits) {
        headerIndex = i;
        headerHits = hits;
        break;
      }
    }
    const width = headerIndex !== null ? rows[headerIndex].length : 0;
    const body = headerIndex !== null ? rows.slice(headerIndex + 1).filter((r) => r.some((c) => c.trim())) : [];
    const steady = body.length ? body.filter((r) => r.length === width).length / body.length : 0;
    const score = headerIndex === null ? 0 : headerHits * 10 + steady * 5 + (width > 1 ? 1 : 0);
    if (score > best.score) best = { delimiter, headerIndex, rows, score };
  }
  return best;
}

function detectDateOrder(cells: string[]): DateOrder | null {
  let dmy = false;
  let mdy = false;
  for (const c of cells) {
    const m = DMY_OR_MDY.exec(c.trim().split(/[\sT]/)[0] ?? "");
    if (!m) continue;
    if (+m[1] > 12) dmy = true;
    if (+m[2] > 12) mdy = true;
  }
  if (dmy && !mdy) return "dmy";
  if (mdy && !dmy) return "mdy";
  return null;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

/** Analyses the file: delimiter, header, columns, units, date order and a preview. */
export function analyzeCsv(kind: ImportKind, input: string, opts: Omit<CsvOptions, "timeZone"> = {}): CsvAnalysis {
  const { text, hadBom } = prepare(input);
  const fileErrors: string[] = [];
  const layout = detectLayout(kind, text);
  const headerIndex = layout.headerIndex;
  const headers = headerIndex !== null ? layout.rows[headerIndex].map((h) => h.trim()) : [];
  if (!text.trim()) fileErrors.push("The file is empty.");
  else if (headerIndex === null) fileErrors.push("No row of column names was found in the first 30 lines; the file needs a header row.");

  const mapping: Record<string, number | null> = {};
  for (const f of FIELDS_BY_KIND[kind]) mapping[f] = null;
  headers.forEach((h, i) => {
    const f = matchField(kind, h);
    if (f && mapping[f] === null) mapping[f] = i;
  });
  // a lone "Time" column holding whole timestamps is the date column
  if (mapping.date === null && mapping.time !== null && mapping.time !== undefined) {
    mapping.date = mapping.time;
    mapping.time = null;
  }
  for (const [f, col] of Object.entries(opts.mapping ?? {})) {
    if (!(FIELDS_BY_KIND[kind] as readonly string[]).includes(f)) continue;
    mapping[f] = col === null || col === undefined || col < 0 || col >= Math.max(headers.length, 1) ? null : col;
  }

  const dataRows = headerIndex !== null ? layout.rows.slice(headerIndex + 1).filter((r) => r.some((c) => c.trim())) : [];
  const sampleNumbers = dataRows.flatMap((r) => r.filter((c) => /^\s*[+\-\u2212]?\d+,\d+\s*$/.test(c)));
  const decimalComma = layout.delimiter !== "," && sampleNumbers.length > 0;

  const units: Units = { ...DEFAULT_UNITS };
  const unitSources: Partial<Record<UnitField, UnitSource>> = {};
  for (const f of Object.keys(UNIT_CHOICES) as UnitField[]) {
    if (!(FIELDS_BY_KIND[kind] as readonly string[]).includes(f)) continue;
    const col = mapping[f];
    const chosen = opts.units?.[f];
    if (chosen) {
      (units as Record<UnitField, string>)[f] = chosen;
      unitSources[f] = "chosen";
      continue;
    }
    if (col === null || col === undefined) continue;
    const fromHeader = unitFromHeader(f, headers[col] ?? "");
    if (fromHeader) {
      (units as Record<UnitField, string>)[f] = fromHeader;
      unitSources[f] = "header";
      continue;
    }
    const values = dataRows.map((r) => parseNumberCell(r[col] ?? "", decimalComma)).filter((v): v is number => v !== null);
    // no unit written: a decay time in the hundreds is milliseconds, a hall "temperature" of
    // 60–100 is Fahrenheit (no heated hall runs at 60 °C)
    if ((f === "decayPos" || f === "decayNeg") && values.length && median(values) > 120) {
      units[f] = "ms";
      unitSources[f] = "values";
    } else if (f === "temp" && values.length && median(values) > 45 && median(values) < 110) {
      units.temp = "°F";
      unitSources[f] = "values";
    } else unitSources[f] = "default";
  }

  let dateOrder: DateOrder = "dmy";
  let dateOrderSource: CsvAnalysis["dateOrderSource"] = "default";
  if (opts.dateOrder) {
    dateOrder = opts.dateOrder;
    dateOrderSource = "chosen";
  } else if (mapping.date !== null && mapping.date !== undefined) {
    const detected = detectDateOrder(dataRows.map((r) => r[mapping.date as number] ?? ""));
    if (detected) {
      dateOrder = detected;
      dateOrderSource = "values";
    }
  }

  const dateHeaders = [mapping.date, mapping.time].filter((c): c is number => typeof c === "number").map((c) => normalizeHeader(headers[c] ?? ""));
  const timesIn: CsvAnalysis["timesIn"] = dateHeaders.some((h) => /(^|\W)(utc|gmt|zulu)(\W|$)/.test(h)) ? "utc" : "plant";

  const missingRequired = headerIndex === null ? [] : REQUIRED[kind].filter((f) => mapping[f] === null || mapping[f] === undefined);
  for (const f of missingRequired) fileErrors.push(`No column for "${FIELD_LABELS[f]}" was found; choose it in the column mapping.`);

  // preview with real line numbers
  const preview: CsvAnalysis["preview"] = [];
  if (headerIndex !== null) {
    for (const r of iterateRows(text, layout.delimiter)) {
      if (r.index <= headerIndex || !r.cells.some((c) => c.trim())) continue;
      preview.push({ line: r.line, cells: r.cells });
      if (preview.length >= 5) break;
    }
  }

  return {
    kind,
    delimiter: layout.delimiter,
    decimalComma,
    hadBom,
    headerLine: headerIndex !== null ? lineOfRow(text, layout.delimiter, headerIndex) : null,
    headers,
    mapping,
    units,
    unitSources,
    dateOrder,
    dateOrderSource,
    timesIn,
    missingRequired,
    preview,
    fileErrors,
  };
}

type RowWithLine = { index: number; line: number; cells: string[] };

/** Rows of the file with the 1-based line each starts on (quoted fields may span lines). */
function* iterateRows(text: string, delimiter: string): Generator<RowWithLine> {
  const rows: RowWithLine[] = [];
  let start = 0;
  let line = 1;
  let index = 0;
  Papa.parse<string[]>(text, {
    delimiter,
    skipEmptyLines: false,
    step: (result) => {
      rows.push({ index, line, cells: result.data });
      // the cursor stands just past the row's own newline; quoted fields may hold more
      const end = result.meta.cursor;
      for (let i = start; i < end && i < text.length; i++) if (text.charCodeAt(i) === 10) line++;
      start = end;
      index++;
    },
  });
  yield* rows;
}

function lineOfRow(text: string, delimiter: string, rowIndex: number): number {
  for (const r of iterateRows(text, delimiter)) if (r.index === rowIndex) return r.line;
  return rowIndex + 1;
}

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
  const analysis = analyzeCsv(kind, input, opts);
  const rows: Array<CheckLogRow | HumidityLogRow> = [];
  const rejected: RejectedRow[] = [];
  if (analysis.fileErrors.length > 0 || analysis.headerLine === null) return { analysis, rows, rejected };

  const { text } = prepare(input);
  const col = (f: ImportField) => analysis.mapping[f] ?? null;
  const width = analysis.headers.length;
  let pastHeader = false;

  for (const r of iterateRows(text, analysis.delimiter)) {
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
