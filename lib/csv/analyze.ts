// Analysing a CSV file as it comes: byte-order mark, preamble lines, delimiter, header row,
// which column holds which field and in which unit, date order, and a preview. The file is
// parsed in full once (readRows); the layout is guessed from its first 60 rows.
import Papa from "papaparse";
import { parseNumberCell, DMY_OR_MDY } from "./cells";
import { DEFAULT_UNITS, FIELD_LABELS, FIELDS_BY_KIND, REQUIRED, UNIT_CHOICES, type CsvAnalysis, type CsvOptions, type DateOrder, type ImportField, type ImportKind, type UnitField, type UnitSource, type Units } from "./fields";
import { matchField, normalizeHeader, unitFromHeader } from "./headers";

/** More rows than any instrument log a person would import at once (a year of 5-minute values is ~105,000). */
export const MAX_IMPORT_ROWS = 200_000;

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
  return analyzeTable(kind, input, opts).analysis;
}

/**
 * The analysis and every row of the file, from one full parse (parseCsv reads the rows from
 * here rather than parsing the file again). Files over MAX_IMPORT_ROWS rows are refused.
 */
export function analyzeTable(kind: ImportKind, input: string, opts: Omit<CsvOptions, "timeZone"> = {}): { analysis: CsvAnalysis; rows: RowWithLine[] } {
  const { text, hadBom } = prepare(input);
  const fileErrors: string[] = [];
  const layout = detectLayout(kind, text);
  const headerIndex = layout.headerIndex;
  const { rows, truncated } = headerIndex !== null ? readRows(text, layout.delimiter, MAX_IMPORT_ROWS + headerIndex + 1) : { rows: [], truncated: false };
  if (truncated) fileErrors.push(`The file has more than ${MAX_IMPORT_ROWS.toLocaleString("en-GB")} rows; split it and import the parts.`);
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
    for (const r of rows) {
      if (r.index <= headerIndex || !r.cells.some((c) => c.trim())) continue;
      preview.push({ line: r.line, cells: r.cells });
      if (preview.length >= 5) break;
    }
  }

  const analysis: CsvAnalysis = {
    kind,
    delimiter: layout.delimiter,
    decimalComma,
    hadBom,
    headerLine: headerIndex !== null ? (rows[headerIndex]?.line ?? headerIndex + 1) : null,
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
  return { analysis, rows };
}

export type RowWithLine = { index: number; line: number; cells: string[] };

/** Every row with the 1-based line it starts on (quoted fields may span lines), at most `maxRows`. */
function readRows(text: string, delimiter: string, maxRows: number): { rows: RowWithLine[]; truncated: boolean } {
  const rows: RowWithLine[] = [];
  let truncated = false;
  let start = 0;
  let line = 1;
  Papa.parse<string[]>(text, {
    delimiter,
    skipEmptyLines: false,
    step: (result, parser) => {
      if (rows.length >= maxRows) {
        truncated = true;
        parser.abort();
        return;
      }
      rows.push({ index: rows.length, line, cells: result.data });
      // the cursor stands just past the row's own newline; quoted fields may hold more
      const end = result.meta.cursor;
      for (let i = start; i < end && i < text.length; i++) if (text.charCodeAt(i) === 10) line++;
      start = end;
    },
  });
  return { rows, truncated };
}
