// Walk-down surveys with a handheld field meter: versioned plans (spots in web-path order), the
// rounds sent from phones (idempotent by a client-made id, kept against the plan version they
// were taken with), their readings, photos, findings and actions, and the fixed-meter
// cross-checks they produce.
import { type AnyMySqlColumn, bigint, boolean, date, double, index, int, json, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { people } from "./people";
import { devices, lines, points } from "./plant";
import { FINDING_KINDS } from "../../lib/surveys/findings";
import { METER_UNITS } from "../../lib/surveys/judge";
import { ACTION_KINDS, type PlanSpot } from "../../lib/surveys/schemas";

export const surveyPlans = mysqlTable(
  "survey_plans",
  {
    id: int("id").autoincrement().primaryKey(),
    lineId: int("line_id").notNull().references(() => lines.id),
    name: varchar("name", { length: 120 }).notNull(),
    currentVersion: int("current_version").notNull().default(1),
    archived: boolean("archived").notNull().default(false),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
  },
  (t) => [index("survey_plans_line_idx").on(t.lineId)],
);

export const surveyPlanVersions = mysqlTable(
  "survey_plan_versions",
  {
    id: int("id").autoincrement().primaryKey(),
    planId: int("plan_id").notNull().references(() => surveyPlans.id),
    version: int("version").notNull(),
    spots: json("spots").$type<PlanSpot[]>().notNull(),
    comment: varchar("comment", { length: 300 }),
    personId: int("person_id").references(() => people.id),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
  },
  (t) => [uniqueIndex("survey_plan_versions_uq").on(t.planId, t.version)],
);

export const surveys = mysqlTable(
  "surveys",
  {
    id: int("id").autoincrement().primaryKey(),
    // made on the phone; a round sent twice is stored once
    clientId: varchar("client_id", { length: 36 }).notNull(),
    planId: int("plan_id").notNull().references(() => surveyPlans.id),
    planVersion: int("plan_version").notNull(),
    lineId: int("line_id").notNull().references(() => lines.id),
    personId: int("person_id").references(() => people.id),
    startedTs: bigint("started_ts", { mode: "number" }).notNull(),
    finishedTs: bigint("finished_ts", { mode: "number" }),
    receivedTs: bigint("received_ts", { mode: "number" }).notNull(),
    meterLabel: varchar("meter_label", { length: 120 }).notNull(),
    meterCalibratedOn: date("meter_calibrated_on", { mode: "string" }),
    calibratedDistanceMm: double("calibrated_distance_mm").notNull(),
    note: text("note"),
    resurveyOfActionId: int("resurvey_of_action_id").references((): AnyMySqlColumn => surveyActions.id),
  },
  (t) => [uniqueIndex("surveys_client_uq").on(t.clientId), index("surveys_plan_idx").on(t.planId, t.startedTs), index("surveys_line_idx").on(t.lineId, t.startedTs)],
);

export const surveyReadings = mysqlTable(
  "survey_readings",
  {
    id: int("id").autoincrement().primaryKey(),
    surveyId: int("survey_id").notNull().references(() => surveys.id),
    spotKey: varchar("spot_key", { length: 40 }).notNull(),
    position: int("position").notNull(),
    pointId: int("point_id").references(() => points.id),
    ts: bigint("ts", { mode: "number" }).notNull(),
    enteredValue: double("entered_value").notNull(),
    unit: mysqlEnum("unit", METER_UNITS).notNull(),
    readKv: double("read_kv").notNull(),
    distanceMm: double("distance_mm").notNull(),
    // flat-surface equivalent at the meter's calibrated distance (lib/surveys/judge.ts)
    equivalentKv: double("equivalent_kv").notNull(),
    running: boolean("running").notNull(),
    speedMpm: double("speed_mpm"),
    note: text("note"),
    // the fixed meter at that point, its mean around the same moment
    fixedDeviceId: int("fixed_device_id").references(() => devices.id),
    fixedKv: double("fixed_kv"),
  },
  (t) => [uniqueIndex("survey_readings_spot_uq").on(t.surveyId, t.spotKey)],
);

export const surveyPhotos = mysqlTable(
  "survey_photos",
  {
    id: int("id").autoincrement().primaryKey(),
    surveyId: int("survey_id").notNull().references(() => surveys.id),
    spotKey: varchar("spot_key", { length: 40 }).notNull(),
    storageKey: varchar("storage_key", { length: 200 }).notNull(),
    thumbnailKey: varchar("thumbnail_key", { length: 200 }),
    mimeType: varchar("mime_type", { length: 60 }).notNull(),
    sizeBytes: int("size_bytes").notNull(),
    sha256: varchar("sha256", { length: 64 }).notNull(),
    personId: int("person_id").references(() => people.id),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
  },
  (t) => [uniqueIndex("survey_photos_spot_uq").on(t.surveyId, t.spotKey)],
);

export const surveyFindings = mysqlTable(
  "survey_findings",
  {
    id: int("id").autoincrement().primaryKey(),
    surveyId: int("survey_id").notNull().references(() => surveys.id),
    kind: mysqlEnum("kind", FINDING_KINDS).notNull(),
    spotKey: varchar("spot_key", { length: 40 }).notNull(),
    fromSpotKey: varchar("from_spot_key", { length: 40 }),
    valueKv: double("value_kv").notNull(),
    limitKv: double("limit_kv"),
    reductionPct: double("reduction_pct"),
    text: varchar("text", { length: 400 }).notNull(),
  },
  (t) => [index("survey_findings_survey_idx").on(t.surveyId)],
);

export const surveyActions = mysqlTable(
  "survey_actions",
  {
    id: int("id").autoincrement().primaryKey(),
    surveyId: int("survey_id").notNull().references((): AnyMySqlColumn => surveys.id),
    findingId: int("finding_id").references(() => surveyFindings.id),
    kind: mysqlEnum("kind", ACTION_KINDS).notNull(),
    text: varchar("text", { length: 500 }).notNull(),
    ownerId: int("owner_id").notNull().references(() => people.id),
    dueDate: date("due_date", { mode: "string" }).notNull(),
    state: mysqlEnum("state", ["open", "closed"]).notNull().default("open"),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
    createdBy: int("created_by").references(() => people.id),
    closedTs: bigint("closed_ts", { mode: "number" }),
    closedBy: int("closed_by").references(() => people.id),
    closeNote: varchar("close_note", { length: 500 }),
    // the re-survey of the points involved that closed it, if any
    resurveyId: int("resurvey_id").references((): AnyMySqlColumn => surveys.id),
  },
  (t) => [index("survey_actions_state_idx").on(t.state, t.dueDate), index("survey_actions_survey_idx").on(t.surveyId)],
);

// One row per judged cross-check of a fixed meter against a handheld reading: the history per meter.
export const meterCrossChecks = mysqlTable(
  "meter_cross_checks",
  {
    id: int("id").autoincrement().primaryKey(),
    deviceId: int("device_id").notNull().references(() => devices.id),
    surveyId: int("survey_id").notNull().references(() => surveys.id),
    readingId: int("reading_id").notNull().references(() => surveyReadings.id),
    ts: bigint("ts", { mode: "number" }).notNull(),
    handheldKv: double("handheld_kv").notNull(),
    fixedKv: double("fixed_kv").notNull(),
    diffShare: double("diff_share").notNull(),
    allowedShare: double("allowed_share").notNull(),
    flagged: boolean("flagged").notNull(),
  },
  (t) => [uniqueIndex("meter_cross_checks_reading_uq").on(t.readingId), index("meter_cross_checks_device_idx").on(t.deviceId, t.ts)],
);
