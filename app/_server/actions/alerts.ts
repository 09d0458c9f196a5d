// Alert actions (shift leads and up): acknowledge, comment, shelve for a stated time with a
// reason, unshelve. Each checks the permission itself (defineAction), applies the ISA-18.2
// lifecycle in one transaction (db/queries/alerts.ts) and announces the change on
// `stillfield/internal/alerts`, so every open page (alerts list, line pages) refreshes.
import "server-only";
import mqtt, { type MqttClient } from "mqtt";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { respondToAlert } from "@/db/queries/alert-actions";
import { listAckableInNotifyGroup } from "@/db/queries/alert-notify-group";
import { AppError } from "@/lib/errors";
import type { AlertChange } from "@/lib/views/alerts";
import { internalTopics } from "@/lib/contract/topics";
import { MAX_SHELVE_MS, MAX_SHELVE_REASON_LENGTH } from "@/lib/rules";
import { SERVICE_ACCOUNTS } from "@/lib/settings";
import { defineAction } from "../action";

// ---- announcing changes (one service-account connection per app process) ----

const holder = globalThis as unknown as { __stillfieldAlertPublisher?: MqttClient };

function publisher(): MqttClient {
  if (!holder.__stillfieldAlertPublisher) {
    const env = getEnv();
    const client = mqtt.connect({
      host: env.MQTT_HOST,
      port: env.MQTT_PORT,
      username: SERVICE_ACCOUNTS.app,
      password: env.MQTT_APP_PASSWORD,
      clientId: `stillfield-app-alerts-${process.pid}-${Math.random().toString(36).slice(2, 8)}`,
      clean: true,
      reconnectPeriod: 5_000,
      connectTimeout: 5_000,
    });
    let lastLog = 0;
    client.on("error", (err) => {
      // mqtt.js retries on its own; say so once a minute, not on every attempt
      if (Date.now() - lastLog < 60_000) return;
      lastLog = Date.now();
      console.error("alert publisher: broker error (retrying):", err.message);
    });
    holder.__stillfieldAlertPublisher = client;
  }
  return holder.__stillfieldAlertPublisher;
}

/** Ends the announcing connection (tests and scripts, so the process can exit). */
export async function closeAlertPublisher(): Promise<void> {
  const client = holder.__stillfieldAlertPublisher;
  holder.__stillfieldAlertPublisher = undefined;
  if (client) await new Promise<void>((resolve) => client.end(true, {}, () => resolve()));
}

/** Best effort: the database is the truth; a missed announcement only delays a page's refresh. */
export function announceAlertChange(change: AlertChange): void {
  try {
    const { shelved: _shelved, ...message } = change;
    publisher().publish(internalTopics.alerts, JSON.stringify(message), { qos: 1 });
  } catch (err) {
    console.error("alert publisher: could not announce a change:", err);
  }
}

// ---- actions ----

const alertId = z.coerce.number({ message: "Which alert?" }).int().positive();
const optionalComment = z
  .string()
  .trim()
  .max(1000, { message: "At most 1000 characters" })
  .optional()
  .transform((v) => (v ? v : undefined));

export const ackAlertAction = defineAction("alert.respond", z.object({ alertId, comment: optionalComment }), async (input, session) => {
  const change = await respondToAlert(getDb(), { alertId: input.alertId, type: "ack", comment: input.comment }, session.personId);
  announceAlertChange(change);
  return change;
});

/** A storm group's key (alerts.notify_group, ingest/alerts-notify-send.ts): "area:3:<ts>:<id>". */
const notifyGroup = z.string({ message: "Which group?" }).trim().max(80).regex(/^(area|alert):\d+:\d+:\d+$/, { message: "Which group?" });

/** Acknowledges every alert of a storm group still waiting; one taken meanwhile by someone else is skipped. */
export const ackAlertGroupAction = defineAction("alert.respond", z.object({ group: notifyGroup }), async (input, session) => {
  const ids = await listAckableInNotifyGroup(getDb(), input.group);
  let acknowledged = 0;
  for (const id of ids) {
    try {
      announceAlertChange(await respondToAlert(getDb(), { alertId: id, type: "ack" }, session.personId));
      acknowledged++;
    } catch (err) {
      // acknowledged (or closed) by someone else between the list and this step: nothing left to do for it
      if (err instanceof AppError && err.code === "conflict") continue;
      throw err;
    }
  }
  return { acknowledged };
});

export const commentAlertAction = defineAction(
  "alert.respond",
  z.object({ alertId, comment: z.string({ message: "Write a comment" }).trim().min(1, { message: "Write a comment" }).max(1000, { message: "At most 1000 characters" }) }),
  async (input, session) => {
    const change = await respondToAlert(getDb(), { alertId: input.alertId, type: "comment", comment: input.comment }, session.personId);
    announceAlertChange(change);
    return change;
  },
);

const MAX_SHELVE_MIN = MAX_SHELVE_MS / 60_000;

export const shelveAlertSchema = z.object({
  alertId,
  /** how long, in minutes (the form's choice); or untilTs (epoch ms) from the API */
  durationMin: z.coerce
    .number({ message: "Choose for how long" })
    .int()
    .min(1, { message: "At least 1 minute" })
    .max(MAX_SHELVE_MIN, { message: `At most ${MAX_SHELVE_MIN / 1440} days` })
    .optional(),
  untilTs: z.coerce.number().int().positive().optional(),
  reason: z
    .string({ message: "Give a reason" })
    .trim()
    .min(3, { message: "Give a reason (a few words: why is it safe to silence this?)" })
    .max(Math.min(300, MAX_SHELVE_REASON_LENGTH), { message: "At most 300 characters" }),
});

export const shelveAlertAction = defineAction(
  "alert.respond",
  shelveAlertSchema.refine((v) => v.durationMin !== undefined || v.untilTs !== undefined, { message: "Choose for how long", path: ["durationMin"] }),
  async (input, session) => {
    const now = Date.now();
    const untilTs = input.untilTs ?? now + (input.durationMin ?? 0) * 60_000;
    const change = await respondToAlert(getDb(), { alertId: input.alertId, type: "shelve", untilTs, reason: input.reason }, session.personId, now);
    announceAlertChange(change);
    return { ...change, untilTs };
  },
);

export const unshelveAlertAction = defineAction("alert.respond", z.object({ alertId, comment: optionalComment }), async (input, session) => {
  const change = await respondToAlert(getDb(), { alertId: input.alertId, type: "unshelve", comment: input.comment }, session.personId);
  announceAlertChange(change);
  return change;
});
