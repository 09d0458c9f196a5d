// Maintenance windows: planned work on a neutralizer, point, line or hall. While a window is
// active the alerts it explains are recorded but nobody is told (db/queries/maintenance-windows.ts);
// when it ends, its summary is stored here.
import { bigint, index, int, mysqlEnum, mysqlTable, text, varchar } from "drizzle-orm/mysql-core";
import { MAINTENANCE_TARGETS } from "../../lib/alerts/maintenance-windows";
import { people } from "./people";

export { MAINTENANCE_TARGETS };

export const maintenanceWindows = mysqlTable(
  "maintenance_windows",
  {
    id: int("id").autoincrement().primaryKey(),
    targetKind: mysqlEnum("target_kind", MAINTENANCE_TARGETS).notNull(),
    // the id of the area, line, point or neutralizer (which table follows from target_kind)
    targetId: int("target_id").notNull(),
    ownerId: int("owner_id").notNull().references(() => people.id),
    reason: varchar("reason", { length: 300 }).notNull(),
    startTs: bigint("start_ts", { mode: "number" }).notNull(),
    endTs: bigint("end_ts", { mode: "number" }).notNull(),
    /** Why it runs past the usual longest window (null: never extended that far). */
    extendReason: varchar("extend_reason", { length: 300 }),
    createdBy: int("created_by").notNull().references(() => people.id),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
    /** Set when someone ended it before its planned end (end_ts is then moved to that moment). */
    endedEarlyTs: bigint("ended_early_ts", { mode: "number" }),
    /** What happened during it (lib/alerts/maintenance-windows.ts summarizeWindow), stored once it ended. */
    summary: text("summary"),
    summarizedTs: bigint("summarized_ts", { mode: "number" }),
  },
  (t) => [index("maintenance_windows_end_idx").on(t.endTs), index("maintenance_windows_target_idx").on(t.targetKind, t.targetId)],
);
