// CSV import vocabulary: the two kinds of file, their fields with labels, which are required,
// the units each numeric field may come in, and the shapes of analyses, rows and results.
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

export const REQUIRED: Record<ImportKind, readonly ImportField[]> = {
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
