// Equipment records: charged-plate checks, equipment history and uploaded files.
import { type AnyMySqlColumn, bigint, boolean, date, double, index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { people } from "./people";
import { neutralizers } from "./plant";

export const checks = mysqlTable(
  "checks",
  {
    id: int("id").autoincrement().primaryKey(),
    neutralizerId: int("neutralizer_id").notNull().references(() => neutralizers.id),
    ts: bigint("ts", { mode: "number" }).notNull(),
    method: mysqlEnum("method", ["charged_plate", "periodic"]).notNull().default("charged_plate"),
    // the test distance: from the neutralizer to the charged plate (decay times at different
    // distances are not comparable)
    plateDistanceMm: double("plate_distance_mm"),
    // the plate the monitor used: 20 pF on 150 × 150 mm in ANSI/ESD STM3.1-2015 and
    // IEC 61340-4-7:2017; null on checks recorded before the plate was asked for
    plateCapacitancePf: double("plate_capacitance_pf"),
    plateWidthMm: double("plate_width_mm"),
    plateLengthMm: double("plate_length_mm"),
    decayPosS: double("decay_pos_s"),
    decayNegS: double("decay_neg_s"),
    offsetV: double("offset_v"),
    instrument: varchar("instrument", { length: 120 }),
    instrumentCalibratedOn: date("instrument_calibrated_on", { mode: "string" }),
    passed: boolean("passed").notNull(),
    failReasons: varchar("fail_reasons", { length: 300 }),
    limitsUsed: text("limits_used"),
    personId: int("person_id").references(() => people.id),
    notes: text("notes"),
    // rows imported from an instrument's CSV log carry a hash so a re-import adds nothing twice
    importKey: varchar("import_key", { length: 80 }),
  },
  (t) => [index("checks_neutralizer_idx").on(t.neutralizerId, t.ts), uniqueIndex("checks_import_uq").on(t.importKey)],
);

export const EQUIPMENT_EVENT_KINDS = ["cleaned", "check", "fault", "moved", "note", "upload", "state_changed", "created", "edited", "secret_rotated"] as const;

export const equipmentEvents = mysqlTable(
  "equipment_events",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    subjectType: mysqlEnum("subject_type", ["neutralizer", "device"]).notNull(),
    subjectId: int("subject_id").notNull(),
    ts: bigint("ts", { mode: "number" }).notNull(),
    kind: mysqlEnum("kind", EQUIPMENT_EVENT_KINDS).notNull(),
    personId: int("person_id").references(() => people.id),
    text: text("text"),
    checkId: int("check_id").references(() => checks.id),
    uploadId: int("upload_id").references((): AnyMySqlColumn => uploads.id),
  },
  (t) => [index("equipment_events_subject_idx").on(t.subjectType, t.subjectId, t.ts)],
);

export const uploads = mysqlTable(
  "uploads",
  {
    id: int("id").autoincrement().primaryKey(),
    storageKey: varchar("storage_key", { length: 200 }).notNull().unique(),
    originalName: varchar("original_name", { length: 255 }).notNull(),
    mimeType: varchar("mime_type", { length: 100 }).notNull(),
    sizeBytes: int("size_bytes").notNull(),
    sha256: varchar("sha256", { length: 64 }).notNull(),
    thumbnailKey: varchar("thumbnail_key", { length: 200 }),
    // what it is attached to
    subjectType: mysqlEnum("subject_type", ["check", "neutralizer", "line_note", "device"]).notNull(),
    subjectId: bigint("subject_id", { mode: "number" }).notNull(),
    // lowest role allowed to download it
    minRole: mysqlEnum("min_role", ["viewer", "shift_lead", "engineer", "admin"]).notNull().default("viewer"),
    personId: int("person_id").references(() => people.id),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
  },
  (t) => [index("uploads_subject_idx").on(t.subjectType, t.subjectId)],
);

// Rows of imported files (humidity history, check logs), so the same file imports once.
export const importedFiles = mysqlTable("imported_files", {
  id: int("id").autoincrement().primaryKey(),
  kind: mysqlEnum("kind", ["check_log", "humidity_log"]).notNull(),
  sha256: varchar("sha256", { length: 64 }).notNull(),
  originalName: varchar("original_name", { length: 255 }).notNull(),
  rowsImported: int("rows_imported").notNull(),
  rowsRejected: int("rows_rejected").notNull(),
  personId: int("person_id").references(() => people.id),
  createdTs: bigint("created_ts", { mode: "number" }).notNull(),
});
