// Time series: raw readings (partitioned by time in a hand-written migration) and rollups.
// Times are BIGINT epoch milliseconds: bucketing integers is much faster than DATETIME(3).
import { bigint, double, index, int, mysqlTable, primaryKey, text, varchar } from "drizzle-orm/mysql-core";

export const readings = mysqlTable(
  "readings",
  {
    deviceId: int("device_id").notNull(),
    channel: varchar("channel", { length: 16 }).notNull(),
    ts: bigint("ts", { mode: "number" }).notNull(),
    value: double("value").notNull(),
  },
  (t) => [primaryKey({ columns: [t.deviceId, t.channel, t.ts] })],
);

const rollupColumns = {
  deviceId: int("device_id").notNull(),
  channel: varchar("channel", { length: 16 }).notNull(),
  bucketTs: bigint("bucket_ts", { mode: "number" }).notNull(),
  min: double("min").notNull(),
  max: double("max").notNull(),
  count: int("count").notNull(),
  sum: double("sum").notNull(),
  sumSq: double("sum_sq").notNull(),
};

export const rollup1m = mysqlTable("rollup_1m", rollupColumns, (t) => [
  primaryKey({ columns: [t.deviceId, t.channel, t.bucketTs] }),
]);

export const rollup1h = mysqlTable("rollup_1h", rollupColumns, (t) => [
  primaryKey({ columns: [t.deviceId, t.channel, t.bucketTs] }),
]);

// Rejected device messages kept for diagnosis (the worker trims it to the last few hundred).
export const ingestRejections = mysqlTable(
  "ingest_rejections",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    ts: bigint("ts", { mode: "number" }).notNull(),
    deviceCode: varchar("device_code", { length: 64 }),
    reason: varchar("reason", { length: 40 }).notNull(),
    detail: varchar("detail", { length: 300 }),
    payload: text("payload"),
  },
  (t) => [index("rejections_ts_idx").on(t.ts), index("rejections_device_idx").on(t.deviceCode)],
);

// Counters the worker publishes about itself (one row per worker instance).
export const ingestStatus = mysqlTable("ingest_status", {
  workerId: varchar("worker_id", { length: 80 }).primaryKey(),
  updatedTs: bigint("updated_ts", { mode: "number" }).notNull(),
  stats: text("stats").notNull(),
});
