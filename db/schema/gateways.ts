// Sparkplug B gateways: edge nodes (with sign-in credentials like devices), the devices and
// metrics their births declared, the mapping of a metric onto a Stillfield device and channel,
// refused messages per gateway; clock skew and the time-source choice of every device; and the
// marks on alerts that were found late (in history uploaded or sent after the fact).
import { bigint, boolean, double, index, int, mysqlEnum, mysqlTable, primaryKey, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { people } from "./people";
import { devices } from "./plant";
import { TIME_SOURCES } from "../../lib/clock-skew";
import { CONVERSIONS } from "../../lib/sparkplug/metrics";

export const edgeNodes = mysqlTable(
  "edge_nodes",
  {
    id: int("id").autoincrement().primaryKey(),
    // what the node signs in with (MQTT user name and client id); unique among devices too
    code: varchar("code", { length: 64 }).notNull().unique(),
    groupId: varchar("group_id", { length: 64 }).notNull(),
    nodeId: varchar("node_id", { length: 64 }).notNull(),
    label: varchar("label", { length: 120 }).notNull(),
    // salted hash, and the secret sealed for an MQTT broker that keeps its own credentials (lib/device-secrets.ts)
    secretHash: varchar("secret_hash", { length: 255 }).notNull(),
    enabled: boolean("enabled").notNull().default(true),
    online: boolean("online").notNull().default(false),
    bdSeq: int("bd_seq"),
    lastBirthTs: bigint("last_birth_ts", { mode: "number" }),
    lastDeathTs: bigint("last_death_ts", { mode: "number" }),
    lastSeenTs: bigint("last_seen_ts", { mode: "number" }),
    clockSkewMs: double("clock_skew_ms"),
    clockSkewTs: bigint("clock_skew_ts", { mode: "number" }),
    rebirthRequests: int("rebirth_requests").notNull().default(0),
    seqGaps: int("seq_gaps").notNull().default(0),
    rejectedCount: int("rejected_count").notNull().default(0),
    createdAt: bigint("created_at", { mode: "number" }).notNull(),
  },
  (t) => [uniqueIndex("edge_nodes_group_node_uq").on(t.groupId, t.nodeId)],
);

/** A device behind an edge node (device_name "" is the node itself, for node-level metrics). */
export const gatewayDevices = mysqlTable(
  "gateway_devices",
  {
    edgeNodeId: int("edge_node_id").notNull().references(() => edgeNodes.id),
    deviceName: varchar("device_name", { length: 64 }).notNull(),
    online: boolean("online").notNull().default(false),
    lastBirthTs: bigint("last_birth_ts", { mode: "number" }),
    lastDeathTs: bigint("last_death_ts", { mode: "number" }),
  },
  (t) => [primaryKey({ columns: [t.edgeNodeId, t.deviceName] })],
);

export const gatewayMetrics = mysqlTable(
  "gateway_metrics",
  {
    id: int("id").autoincrement().primaryKey(),
    edgeNodeId: int("edge_node_id").notNull().references(() => edgeNodes.id),
    deviceName: varchar("device_name", { length: 64 }).notNull(),
    name: varchar("name", { length: 200 }).notNull(),
    alias: bigint("alias", { mode: "number" }),
    datatype: varchar("datatype", { length: 16 }).notNull(),
    unit: varchar("unit", { length: 24 }),
    lastValue: double("last_value"),
    lastText: varchar("last_text", { length: 120 }),
    lastTs: bigint("last_ts", { mode: "number" }),
    lastBirthTs: bigint("last_birth_ts", { mode: "number" }).notNull(),
    // the mapping (null: unmapped, still listed)
    targetDeviceId: int("target_device_id").references(() => devices.id),
    targetChannel: varchar("target_channel", { length: 16 }),
    conversion: mysqlEnum("conversion", CONVERSIONS).notNull().default("none"),
    mappedBy: int("mapped_by").references(() => people.id),
    mappedAt: bigint("mapped_at", { mode: "number" }),
  },
  (t) => [uniqueIndex("gateway_metrics_uq").on(t.edgeNodeId, t.deviceName, t.name), index("gateway_metrics_target_idx").on(t.targetDeviceId)],
);

export const gatewayRejections = mysqlTable(
  "gateway_rejections",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    ts: bigint("ts", { mode: "number" }).notNull(),
    edgeNodeId: int("edge_node_id").references(() => edgeNodes.id),
    topic: varchar("topic", { length: 200 }).notNull(),
    reason: varchar("reason", { length: 40 }).notNull(),
    detail: varchar("detail", { length: 300 }),
  },
  (t) => [index("gateway_rejections_node_idx").on(t.edgeNodeId, t.ts), index("gateway_rejections_ts_idx").on(t.ts)],
);

/** Clock skew measured per device, and whether its readings keep device time or arrival time. */
export const deviceClocks = mysqlTable("device_clocks", {
  deviceId: int("device_id").primaryKey().references(() => devices.id),
  skewMs: double("skew_ms"),
  measuredTs: bigint("measured_ts", { mode: "number" }),
  timeSource: mysqlEnum("time_source", TIME_SOURCES).notNull().default("device"),
  changedBy: int("changed_by").references(() => people.id),
  changedAt: bigint("changed_at", { mode: "number" }),
});

/** An alert raised by the re-check of a late span: kept in history, paged or left quiet. */
export const lateFindings = mysqlTable(
  "late_findings",
  {
    alertId: int("alert_id").primaryKey(),
    foundTs: bigint("found_ts", { mode: "number" }).notNull(),
    endedTs: bigint("ended_ts", { mode: "number" }),
    quiet: boolean("quiet").notNull(),
  },
  (t) => [index("late_findings_found_idx").on(t.foundTs)],
);
