// People, sign-in protection, settings and the audit log.
import { bigint, boolean, index, int, json, mysqlEnum, mysqlTable, primaryKey, text, varchar } from "drizzle-orm/mysql-core";

export const ROLES = ["viewer", "shift_lead", "engineer", "admin"] as const;

export const people = mysqlTable(
  "people",
  {
    id: int("id").autoincrement().primaryKey(),
    email: varchar("email", { length: 254 }).notNull().unique(),
    name: varchar("name", { length: 120 }).notNull(),
    role: mysqlEnum("role", ROLES).notNull().default("viewer"),
    passwordHash: varchar("password_hash", { length: 100 }).notNull(),
    active: boolean("active").notNull().default(true),
    // people who asked for the daily alert digest / the weekly due list
    wantsDailyDigest: boolean("wants_daily_digest").notNull().default(false),
    onMaintenanceList: boolean("on_maintenance_list").notNull().default(false),
    // mobile number in E.164 (checked with libphonenumber-js), and the alert severities the
    // person wants texted / pushed (comma-separated, e.g. "high,medium"; empty: none)
    phoneE164: varchar("phone_e164", { length: 20 }),
    smsSeverities: varchar("sms_severities", { length: 40 }).notNull().default(""),
    pushSeverities: varchar("push_severities", { length: 40 }).notNull().default(""),
    // bumped on password reset, role change and deactivation: sessions signed with an older
    // version are refused (app/_server/auth.ts), so those changes end every open session
    sessionVersion: int("session_version").notNull().default(0),
    createdAt: bigint("created_at", { mode: "number" }).notNull(),
    updatedAt: bigint("updated_at", { mode: "number" }).notNull(),
  },
);

// Failed sign-ins counted per key ("account:<email>", "pair:<email>|<ip>" or "address:<ip>") in a
// window, kept in the database so several app instances share the count. `blocked_until` is the
// earliest time the key may try again (a delay that grows with the failures, db/queries/sign-in-throttle.ts);
// rows whose window and delay have passed are pruned.
export const signInFailures = mysqlTable(
  "sign_in_failures",
  {
    key: varchar("key", { length: 300 }).notNull(),
    windowStart: bigint("window_start", { mode: "number" }).notNull(),
    failures: int("failures").notNull().default(0),
    blockedUntil: bigint("blocked_until", { mode: "number" }).notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.key] })],
);

export const settings = mysqlTable("settings", {
  key: varchar("key", { length: 100 }).primaryKey(),
  value: json("value").notNull(),
  updatedAt: bigint("updated_at", { mode: "number" }).notNull(),
});

export const auditLog = mysqlTable(
  "audit_log",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    ts: bigint("ts", { mode: "number" }).notNull(),
    personId: int("person_id").references(() => people.id),
    action: varchar("action", { length: 80 }).notNull(),
    subjectType: varchar("subject_type", { length: 40 }).notNull(),
    subjectId: varchar("subject_id", { length: 80 }),
    summary: text("summary").notNull(),
    detail: json("detail"),
  },
  (t) => [index("audit_ts_idx").on(t.ts), index("audit_subject_idx").on(t.subjectType, t.subjectId)],
);
