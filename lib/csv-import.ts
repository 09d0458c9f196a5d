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
 * The file is parsed in full once per call and may hold at most MAX_IMPORT_ROWS rows.
 *
 * The parts, by job: lib/csv/fields.ts (vocabulary and types), lib/csv/headers.ts (column
 * recognition), lib/csv/cells.ts (numbers and dates), lib/csv/analyze.ts (layout and analysis),
 * lib/csv/parse.ts (rows to records). Pure: papaparse and @date-fns/tz, no I/O.
 */
export * from "./csv/fields";
export { parseDateCell, parseNumberCell } from "./csv/cells";
export { analyzeCsv, MAX_IMPORT_ROWS } from "./csv/analyze";
export { parseCsv } from "./csv/parse";
