// The alerts told to on call in one message with a given alert (alerts.notify_group, set by
// ingest/alerts-notify-send.ts): the alert page says "Sent together with …" and lists them.
import { and, asc, eq, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { alerts } from "../schema";
import type { AlertListItem } from "../../lib/views/alerts";
import { listAlerts } from "./alert-list";

/** Every alert of the group (the given one included), in the list's order; empty when it went out alone. */
export async function listNotifyGroupAlerts(db: Db, notifyGroup: string | null | undefined): Promise<AlertListItem[]> {
  if (!notifyGroup) return [];
  const rows = await db.select({ id: alerts.id }).from(alerts).where(eq(alerts.notifyGroup, notifyGroup.slice(0, 80))).orderBy(asc(alerts.startTs)).limit(200);
  if (rows.length < 2) return [];
  return listAlerts(db, { ids: rows.map((r) => r.id), limit: 200 });
}

/** The alerts of a group still waiting for an acknowledgement (the board's "Acknowledge all"). */
export async function listAckableInNotifyGroup(db: Db, notifyGroup: string): Promise<number[]> {
  const rows = await db
    .select({ id: alerts.id })
    .from(alerts)
    .where(and(eq(alerts.notifyGroup, notifyGroup.slice(0, 80)), inArray(alerts.state, ["active_unacked", "cleared_unacked"])))
    .orderBy(asc(alerts.id))
    .limit(200);
  return rows.map((r) => r.id);
}
