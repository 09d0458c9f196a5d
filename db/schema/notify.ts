// Messages to phones: text messages (SMS through the provider's SDK) and browser push, with
// their own outbox, and the push subscriptions people allowed on their phones. A person's mobile
// number and the severities they want texted or pushed are on `people` (db/schema/people.ts).
import { bigint, char, index, int, mysqlEnum, mysqlTable, text, varchar } from "drizzle-orm/mysql-core";
import { people } from "./people";
import { alerts } from "./alerts";

export const PHONE_CHANNELS = ["sms", "push"] as const;
export const PHONE_OUTBOX_STATES = ["pending", "sending", "sent", "failed"] as const;

// Queued in the same transaction as the escalation step that causes it; dedupe_key is unique so
// the same step never queues two texts. The notifier (ingest/notifier.ts) claims, sends, records
// the provider's id and delivery status, retries with backoff, and on giving up a text queues the
// same words as an e-mail (fallback_mail_key) so the message is never lost.
export const phoneOutbox = mysqlTable(
  "phone_outbox",
  {
    id: bigint("id", { mode: "number" }).autoincrement().primaryKey(),
    dedupeKey: varchar("dedupe_key", { length: 160 }).notNull().unique(),
    channel: mysqlEnum("channel", PHONE_CHANNELS).notNull(),
    personId: int("person_id").notNull().references(() => people.id),
    alertId: bigint("alert_id", { mode: "number" }).references(() => alerts.id),
    /** E.164 number for a text; the subscription id for a push */
    toAddress: varchar("to_address", { length: 40 }).notNull(),
    title: varchar("title", { length: 160 }).notNull(),
    body: varchar("body", { length: 640 }).notNull(),
    url: varchar("url", { length: 500 }),
    /** the e-mail address to fall back to when the text cannot be sent */
    fallbackEmail: varchar("fallback_email", { length: 254 }),
    state: mysqlEnum("state", PHONE_OUTBOX_STATES).notNull().default("pending"),
    attempts: int("attempts").notNull().default(0),
    nextAttemptTs: bigint("next_attempt_ts", { mode: "number" }).notNull(),
    lastError: varchar("last_error", { length: 500 }),
    /** the provider's message id (SMS sid) or the push service's answer */
    providerId: varchar("provider_id", { length: 120 }),
    /** the provider's own word for the delivery ("queued", "sent", "delivered", "failed", "gone") */
    deliveryStatus: varchar("delivery_status", { length: 40 }),
    fallbackMailKey: varchar("fallback_mail_key", { length: 160 }),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
    sentTs: bigint("sent_ts", { mode: "number" }),
  },
  (t) => [index("phone_outbox_state_idx").on(t.state, t.nextAttemptTs), index("phone_outbox_alert_idx").on(t.alertId)],
);

// A browser's push subscription (its endpoint and keys), one row per phone a person allowed.
// The endpoint is long, so uniqueness is on its SHA-256; a 404/410 from the push service deletes it.
export const pushSubscriptions = mysqlTable(
  "push_subscriptions",
  {
    id: int("id").autoincrement().primaryKey(),
    personId: int("person_id").notNull().references(() => people.id),
    endpointHash: char("endpoint_hash", { length: 64 }).notNull().unique(),
    endpoint: text("endpoint").notNull(),
    p256dh: varchar("p256dh", { length: 200 }).notNull(),
    auth: varchar("auth", { length: 100 }).notNull(),
    userAgent: varchar("user_agent", { length: 200 }),
    createdTs: bigint("created_ts", { mode: "number" }).notNull(),
    lastOkTs: bigint("last_ok_ts", { mode: "number" }),
  },
  (t) => [index("push_subscriptions_person_idx").on(t.personId)],
);
