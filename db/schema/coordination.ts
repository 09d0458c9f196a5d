// Coordination between several ingest workers (README "Production install"):
// - service_leases: one row per singleton duty (the alert owner). The holder renews it every few
//   seconds; `token` grows by one with every new holder and fences writes made by an old one.
// - alert_engine_rows: the rules engine's state per rule and subject (its hysteresis: phase,
//   delays, the open alert), written only when it changes, in the same transaction as the
//   alert rows; windows are rebuilt from committed readings by the next owner.
// - alert_owner_progress: how far the owner has read the reading journal (same transaction).
// - reading_journal: the readings each writer transaction inserted, in commit order, for the
//   alert owner to read (a worker's readings reach the owner whichever worker stored them).
import { bigint, index, int, mediumtext, mysqlTable, primaryKey, text, varchar } from "drizzle-orm/mysql-core";

export const serviceLeases = mysqlTable("service_leases", {
  name: varchar("name", { length: 40 }).primaryKey(),
  holder: varchar("holder", { length: 120 }),
  token: bigint("token", { mode: "number" }).notNull().default(0),
  /** database clock, epoch ms */
  expiresTs: bigint("expires_ts", { mode: "number" }).notNull().default(0),
  acquiredTs: bigint("acquired_ts", { mode: "number" }),
});

export const alertEngineRows = mysqlTable(
  "alert_engine_rows",
  {
    ruleId: int("rule_id").notNull(),
    subjectKey: varchar("subject_key", { length: 120 }).notNull(),
    ruleVersion: int("rule_version").notNull(),
    /** JSON of the evaluator's hysteresis state (lib/rules/engine-state.ts) */
    state: text("state").notNull(),
    updatedTs: bigint("updated_ts", { mode: "number" }).notNull(),
    /** lease token of the owner that wrote it */
    token: bigint("token", { mode: "number" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.ruleId, t.subjectKey] })],
);

export const alertOwnerProgress = mysqlTable("alert_owner_progress", {
  name: varchar("name", { length: 40 }).primaryKey(),
  /** every journal id at or below this has been read (or given up as rolled back) */
  journalId: bigint("journal_id", { mode: "number" }).notNull(),
  /** ids above journalId read already (out of commit order), JSON array */
  seenAbove: text("seen_above").notNull(),
  /** newest reading time fed to the engine */
  readingTs: bigint("reading_ts", { mode: "number" }).notNull(),
  updatedTs: bigint("updated_ts", { mode: "number" }).notNull(),
  token: bigint("token", { mode: "number" }).notNull(),
});

export const readingJournal = mysqlTable(
  "reading_journal",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
    rowCount: int("row_count").notNull(),
    /** "deviceId,channel,ts,value" lines */
    body: mediumtext("body").notNull(),
  },
  (t) => [index("reading_journal_created_idx").on(t.createdTs)],
);
