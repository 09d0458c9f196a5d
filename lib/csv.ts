/**
 * CSV writing for downloads (reports, exports). Pure, no I/O.
 *
 * Two jobs:
 * 1. Quoting per RFC 4180: a cell holding a comma, a double quote, CR or LF is wrapped in double
 *    quotes and its quotes doubled; rows end with CRLF.
 * 2. CSV (formula) injection, per the OWASP "CSV Injection" guidance: a text cell that begins
 *    with `=`, `+`, `-`, `@`, a tab or a carriage return could be run as a formula by a
 *    spreadsheet, so it is prefixed with a single quote (`'`), which spreadsheets show as text.
 *    This applies to every text cell (alert comments, line notes, names), because any of them
 *    can hold what a person typed.
 *
 * Numbers passed as JS numbers are written as numbers, unprefixed: a negative charge such as
 * −3.4 kV must stay a number in the spreadsheet, and a number's text (digits, sign, point,
 * exponent) cannot be a formula. A number passed as a *string* ("-3.4") is treated as text and
 * prefixed like any other text.
 */

export type CsvCell = string | number | boolean | null | undefined | Date;

/** First characters that make a spreadsheet read a cell as a formula (OWASP CSV Injection). */
export const CSV_FORMULA_TRIGGERS = ["=", "+", "-", "@", "\t", "\r"] as const;

const NEEDS_QUOTES = /[",\r\n]/;

/** Prefixes a text that a spreadsheet would read as a formula with a single quote. */
export function neutralizeFormula(text: string): string {
  if (text.length > 0 && (CSV_FORMULA_TRIGGERS as readonly string[]).includes(text[0])) return `'${text}`;
  return text;
}

/** RFC 4180: wrap in double quotes when needed, doubling any double quote inside. */
export function quoteCsvField(text: string): string {
  return NEEDS_QUOTES.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * One cell as CSV text: null/undefined → empty; finite numbers as numbers (NaN and ±Infinity
 * → empty, they are not data); booleans → "true"/"false"; dates → ISO 8601 (UTC); text →
 * formula-neutralized, then quoted as needed.
 */
export function formatCsvCell(value: CsvCell): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  if (typeof value === "boolean") return value ? "true" : "false";
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? "" : value.toISOString();
  return quoteCsvField(neutralizeFormula(value));
}

export function formatCsvRow(cells: readonly CsvCell[]): string {
  return cells.map(formatCsvCell).join(",");
}

/** UTF-8 byte-order mark: lets spreadsheet programs read °C, µ, − and names with accents. */
export const UTF8_BOM = "\uFEFF";

/**
 * A whole CSV document: a header row then the rows, each ending in CRLF (RFC 4180).
 * Header cells go through the same escaping as data.
 */
export function toCsv(header: readonly string[], rows: readonly (readonly CsvCell[])[], opts: { bom?: boolean } = {}): string {
  const lines = [formatCsvRow(header), ...rows.map((r) => formatCsvRow(r))];
  return (opts.bom ? UTF8_BOM : "") + lines.map((l) => `${l}\r\n`).join("");
}

export type CsvColumn<T> = { header: string; value: (row: T) => CsvCell };

/** A CSV document from records and column definitions. */
export function recordsToCsv<T>(columns: readonly CsvColumn<T>[], records: readonly T[], opts: { bom?: boolean } = {}): string {
  return toCsv(
    columns.map((c) => c.header),
    records.map((r) => columns.map((c) => c.value(r))),
    opts,
  );
}
