// The plant: halls (areas), lines, measuring points in web-path order, devices, neutralizers.
import { bigint, boolean, date, double, index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { NEUTRALIZER_STATES } from "../../lib/vocabulary/neutralizer-states";
import { NEUTRALIZER_KINDS } from "../../lib/physics/neutralizer-kinds";

export const areas = mysqlTable("areas", {
  id: int("id").autoincrement().primaryKey(),
  slug: varchar("slug", { length: 60 }).notNull().unique(),
  name: varchar("name", { length: 120 }).notNull(),
  // the hall's humidity band: below min static rises, above max paper curls / condensation
  rhMinPct: double("rh_min_pct").notNull().default(40),
  rhMaxPct: double("rh_max_pct").notNull().default(60),
  tempSetpointC: double("temp_setpoint_c").notNull().default(21),
  // humidifier capacity (kg water per hour) used by the planner and the simulator
  humidifierKgPerH: double("humidifier_kg_per_h").notNull().default(0),
  airflowM3PerH: double("airflow_m3_per_h").notNull().default(0),
  displayOrder: int("display_order").notNull().default(0),
});

export const LINE_KINDS = [
  "gravure_press",
  "flexo_press",
  "laminator",
  "slitter_rewinder",
  "bag_machine",
  "labeller",
  "extruder",
  "other",
] as const;

export const lines = mysqlTable(
  "lines",
  {
    id: int("id").autoincrement().primaryKey(),
    areaId: int("area_id").notNull().references(() => areas.id),
    slug: varchar("slug", { length: 60 }).notNull().unique(),
    name: varchar("name", { length: 120 }).notNull(),
    kind: mysqlEnum("kind", LINE_KINDS).notNull(),
    nominalSpeedMpm: double("nominal_speed_mpm").notNull(),
    material: varchar("material", { length: 120 }),
    // solvent used on the line and its minimum ignition energy (mJ), if any
    solventName: varchar("solvent_name", { length: 80 }),
    solventMieMj: double("solvent_mie_mj"),
    // capacitance of the largest isolated conductor assumed for the spark-margin figure
    conductorCapacitancePf: double("conductor_capacitance_pf"),
    displayOrder: int("display_order").notNull().default(0),
  },
  (t) => [index("lines_area_idx").on(t.areaId)],
);

export const points = mysqlTable(
  "points",
  {
    id: int("id").autoincrement().primaryKey(),
    lineId: int("line_id").notNull().references(() => lines.id),
    name: varchar("name", { length: 120 }).notNull(),
    // order along the web path, 1 = first (unwind side)
    position: int("position").notNull(),
    description: text("description"),
  },
  (t) => [uniqueIndex("points_line_pos_uq").on(t.lineId, t.position)],
);

export const DEVICE_KINDS = ["field_meter", "th_logger", "speed_gateway"] as const;

export const devices = mysqlTable(
  "devices",
  {
    id: int("id").autoincrement().primaryKey(),
    // the id the device signs in with and publishes under (stillfield/d/<code>/...)
    code: varchar("code", { length: 64 }).notNull().unique(),
    kind: mysqlEnum("kind", DEVICE_KINDS).notNull(),
    label: varchar("label", { length: 120 }).notNull(),
    // salted hash, and the secret sealed for an MQTT broker that keeps its own credentials (lib/device-secrets.ts)
    secretHash: varchar("secret_hash", { length: 255 }).notNull(),
    pointId: int("point_id").references(() => points.id),
    areaId: int("area_id").references(() => areas.id),
    lineId: int("line_id").references(() => lines.id),
    calibratedDistanceMm: double("calibrated_distance_mm"),
    mountingDistanceMm: double("mounting_distance_mm"),
    calibrationDue: date("calibration_due", { mode: "string" }),
    enabled: boolean("enabled").notNull().default(true),
    online: boolean("online").notNull().default(false),
    lastSeenTs: bigint("last_seen_ts", { mode: "number" }),
    secretRotatedAt: bigint("secret_rotated_at", { mode: "number" }),
    createdAt: bigint("created_at", { mode: "number" }).notNull(),
  },
  (t) => [index("devices_point_idx").on(t.pointId), index("devices_area_idx").on(t.areaId)],
);

// Kinds with their mounting ranges and decay defaults: lib/physics/neutralizer-kinds.ts.
export { NEUTRALIZER_KINDS };
// The value list comes from the one vocabulary (lib/vocabulary/neutralizer-states.ts).
export { NEUTRALIZER_STATES };

export const neutralizers = mysqlTable(
  "neutralizers",
  {
    id: int("id").autoincrement().primaryKey(),
    tag: varchar("tag", { length: 60 }).notNull().unique(),
    kind: mysqlEnum("kind", NEUTRALIZER_KINDS).notNull(),
    lengthMm: double("length_mm"),
    powerUnit: varchar("power_unit", { length: 120 }),
    outputKv: double("output_kv"),
    airAssisted: boolean("air_assisted").notNull().default(false),
    mountingDistanceMm: double("mounting_distance_mm"),
    // the point it serves: it sits just upstream of this point on the web path
    pointId: int("point_id").references(() => points.id),
    installedOn: date("installed_on", { mode: "string" }),
    cleaningIntervalDays: int("cleaning_interval_days").notNull().default(14),
    checkIntervalDays: int("check_interval_days").notNull().default(90),
    lastCleanedTs: bigint("last_cleaned_ts", { mode: "number" }),
    state: mysqlEnum("state", NEUTRALIZER_STATES).notNull().default("in_service"),
    notes: text("notes"),
  },
  (t) => [index("neutralizers_point_idx").on(t.pointId)],
);
