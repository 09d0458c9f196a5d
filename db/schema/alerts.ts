// Limits (rules and their versions), alerts and their history, the mail outbox and the on-call roster.
import { bigint, boolean, double, index, int, json, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { people } from "./people";
import { areas, devices, lines, neutralizers, points } from "./plant";
import { ALERT_STATES, RULE_KINDS, SEVERITIES } from "../../lib/vocabulary";

// The enums' value lists come from the one vocabulary (lib/vocabulary).
export { ALERT_STATES, RULE_KINDS, SEVERITIES };

export const rules = mysqlTable(
  "rules",
  {
    id: int("id").autoincrement().primaryKey(),
    kind: mysqlEnum("kind", RULE_KINDS).notNull(),
    name: varchar("name", { length: 160 }).notNull(),
    // scope: exactly one of point / line / area / device / neutralizer, or none (plant-wide default)
    pointId: int("point_id").references(() => points.id),
    lineId: int("line_id").references(() => lines.id),
    areaId: int("area_id").references(() => areas.id),
    deviceId: int("device_id").references(() => devices.id),
    neutralizerId: int("neutralizer_id").references(() => neutralizers.id),
    enabled: boolean("enabled").notNull().default(true),
    currentVersion: int("current_version").notNull().default(1),
    createdAt: bigint("created_at", { mode: "number" }).notNull(),
  },
  (t) => [index("rules_scope_idx").on(t.kind, t.pointId, t.lineId, t.areaId)],
);

// Every saved change is a new version; alerts keep the version that raised them.
export const ruleVersions = mysqlTable(
  "rule_versions",
  {
    id: int("id").autoincrement().primaryKey(),
    ruleId: int("rule_id").notNull().references(() => rules.id),
    version: int("version").notNull(),
    severity: mysqlEnum("severity", SEVERITIES).notNull(),
    onDelayS: int("on_delay_s").notNull(),
    offDelayS: int("off_delay_s").notNull(),
    onlyWhileRunning: boolean("only_while_running").notNull().default(true),
    params: json("params").notNull(),
    createdBy: int("created_by").references(() => people.id),
    createdAt: bigint("created_at", { mode: "number" }).notNull(),
    comment: varchar("comment", { length: 300 }),
  },
  (t) => [uniqueIndex("rule_versions_uq").on(t.ruleId, t.version)],
);

export const alerts = mysqlTable(
  "alerts",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    ruleId: int("rule_id").notNull().references(() => rules.id),
    ruleVersion: int("rule_version").notNull(),
    kind: mysqlEnum("kind", RULE_KINDS).notNull(),
    severity: mysqlEnum("severity", SEVERITIES).notNull(),
    subjectKey: varchar("subject_key", { length: 80 }).notNull(),
    areaId: int("area_id").references(() => areas.id),
    lineId: int("line_id").references(() => lines.id),
    pointId: int("point_id").references(() => points.id),
    deviceId: int("device_id").references(() => devices.id),
    neutralizerId: int("neutralizer_id").references(() => neutralizers.id),
    state: mysqlEnum("state", ALERT_STATES).notNull().default("active_unacked"),
    message: varchar("message", { length: 300 }).notNull(),
    startTs: bigint("start_ts", { mode: "number" }).notNull(),
    endTs: bigint("end_ts", { mode: "number" }),
    closedTs: bigint("closed_ts", { mode: "number" }),
    peakValue: double("peak_value"),
    expectedCrossingTs: bigint("expected_crossing_ts", { mode: "number" }),
    chattering: boolean("chattering").notNull().default(false),
    shelvedUntilTs: bigint("shelved_until_ts", { mode: "number" }),
    shelvedReason: varchar("shelved_reason", { length: 300 }),
    ackedBy: int("acked_by").references(() => people.id),
    ackedTs: bigint("acked_ts", { mode: "number" }),
    notifiedLevel: int("notified_level").notNull().default(0),
    /** When the alert last got worse (a higher severity, or a peak past the plant's setting): on call is told again from then. */
    worsenedTs: bigint("worsened_ts", { mode: "number" }),
    /**
     * When the worker wrote the row (wall clock). A raise can be written after its reading-time
     * start (a silence held back while its siblings are awaited, an owner catching up on the
     * journal): the first message waits notifyAfterS from whichever is later, so people get the
     * time to acknowledge it that the setting promises.
     */
    shownTs: bigint("shown_ts", { mode: "number" }),
    /** The storm group it was sent to on call with (ingest/alerts-escalation.ts): alerts sharing it went out as one message. */
    notifyGroup: varchar("notify_group", { length: 80 }),
  },
  (t) => [
    index("alerts_state_idx").on(t.state, t.severity),
    index("alerts_line_idx").on(t.lineId, t.startTs),
    index("alerts_area_idx").on(t.areaId, t.startTs),
    index("alerts_start_idx").on(t.startTs),
    index("alerts_rule_subject_idx").on(t.ruleId, t.subjectKey, t.startTs),
    index("alerts_notify_group_idx").on(t.notifyGroup),
  ],
);

export const ALERT_EVENT_KINDS = [
  "raised",
  "updated",
  "cleared",
  "acknowledged",
  "commented",
  "shelved",
  "unshelved",
  "closed",
  "notified",
  "escalated",
  /** a higher severity or a clearly worse peak (lib/alerts/condition-merge.ts) */
  "worsened",
  /** the most severe rule cleared while a milder one still holds */
  "eased",
  /** recorded but nobody told: behind a silent gateway, or explained by a maintenance window */
  "held",
] as const;

export const alertEvents = mysqlTable(
  "alert_events",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    alertId: bigint("alert_id", { mode: "number" }).notNull().references(() => alerts.id),
    ts: bigint("ts", { mode: "number" }).notNull(),
    kind: mysqlEnum("kind", ALERT_EVENT_KINDS).notNull(),
    personId: int("person_id").references(() => people.id),
    comment: text("comment"),
    value: varchar("value", { length: 32 }),
  },
  (t) => [index("alert_events_alert_idx").on(t.alertId, t.ts)],
);

export const OUTBOX_STATES = ["pending", "sending", "sent", "failed"] as const;

// Mail is written here in the same transaction as the state change that causes it, then sent
// by the mailer loop. dedupe_key is unique so the same event can never queue two mails.
export const outbox = mysqlTable(
  "outbox",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    dedupeKey: varchar("dedupe_key", { length: 160 }).notNull().unique(),
    toAddress: varchar("to_address", { length: 254 }).notNull(),
    subject: varchar("subject", { length: 300 }).notNull(),
    bodyText: text("body_text").notNull(),
    bodyHtml: text("body_html"),
    state: mysqlEnum("state", OUTBOX_STATES).notNull().default("pending"),
    attempts: int("attempts").notNull().default(0),
    nextAttemptTs: bigint("next_attempt_ts", { mode: "number" }).notNull(),
    lastError: varchar("last_error", { length: 500 }),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
    sentTs: bigint("sent_ts", { mode: "number" }),
    messageId: varchar("message_id", { length: 200 }),
    // a chart for the mailer to draw and attach inline when it sends (one spec or a list: lib/charts/alert-chart.ts, lib/charts/line-mail-chart.ts; drawn by ingest/mail-chart.ts)
    chart: json("chart"),
  },
  (t) => [index("outbox_state_idx").on(t.state, t.nextAttemptTs)],
);

// Who is on call when; escalation_order 1 is first called, 2 next, ...
export const oncallShifts = mysqlTable(
  "oncall_shifts",
  {
    id: int("id").autoincrement().primaryKey(),
    personId: int("person_id").notNull().references(() => people.id),
    startTs: bigint("start_ts", { mode: "number" }).notNull(),
    endTs: bigint("end_ts", { mode: "number" }).notNull(),
    escalationOrder: int("escalation_order").notNull().default(1),
    note: varchar("note", { length: 200 }),
  },
  (t) => [index("oncall_time_idx").on(t.startTs, t.endTs)],
);

export const lineNotes = mysqlTable(
  "line_notes",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    lineId: int("line_id").notNull().references(() => lines.id),
    pointId: int("point_id").references(() => points.id),
    ts: bigint("ts", { mode: "number" }).notNull(),
    text: varchar("text", { length: 500 }).notNull(),
    personId: int("person_id").notNull().references(() => people.id),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
  },
  (t) => [index("line_notes_line_idx").on(t.lineId, t.ts)],
);
