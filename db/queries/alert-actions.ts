// People's actions on an alert: acknowledge, comment, shelve, unshelve. The state changes come
// from lib/rules' alert lifecycle; every change writes its alert_events rows in the same
// transaction.
import { eq } from "drizzle-orm";
import type { Db } from "../client";
import { alertEvents, alerts } from "../schema";
import { applyAlertAction, type AlertAction } from "../../lib/rules";
import { AppError, notFound } from "../../lib/errors";
import type { AlertState } from "../../lib/vocabulary";
import type { AlertChange } from "../../lib/views/alerts";
import { lifecycleColumns, lifecycleOfRow, rowOfLifecycle } from "./alert-rows";
import { retryTransient } from "../transient";

export type RespondInput =
  | { alertId: number; type: "ack"; comment?: string }
  | { alertId: number; type: "comment"; comment: string }
  | { alertId: number; type: "shelve"; untilTs: number; reason: string }
  | { alertId: number; type: "unshelve"; comment?: string };

/**
 * Applies a person's action to an alert (row locked for the transaction), writes the events and
 * returns the change. An action the lifecycle refuses (already acknowledged, closed, …) is a 409
 * with the lifecycle's own words.
 */
export async function respondToAlert(db: Db, input: RespondInput, personId: number, nowMs = Date.now()): Promise<AlertChange> {
  return retryTransient(() => respondOnce(db, input, personId, nowMs));
}

async function respondOnce(db: Db, input: RespondInput, personId: number, nowMs: number): Promise<AlertChange> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select(lifecycleColumns).from(alerts).where(eq(alerts.id, input.alertId)).for("update");
    if (!row) throw notFound("No such alert.");
    const change = (state: AlertState, shelved: boolean): AlertChange => ({
      alertId: row.id,
      lineId: row.lineId,
      areaId: row.areaId,
      state,
      severity: row.severity,
      ts: nowMs,
      shelved,
    });

    if (input.type === "comment") {
      await tx.insert(alertEvents).values({ alertId: row.id, ts: nowMs, kind: "commented", personId, comment: input.comment });
      return change(row.state, row.shelvedUntilTs !== null && row.shelvedUntilTs > nowMs);
    }

    // actions are dated no earlier than the raise (clocks of app and worker may differ a little)
    const ts = Math.max(nowMs, row.startTs);
    const action: AlertAction =
      input.type === "ack"
        ? { type: "ack", ts, actorId: personId }
        : input.type === "shelve"
          ? { type: "shelve", ts, untilTs: input.untilTs, reason: input.reason, actorId: personId }
          : { type: "unshelve", ts, actorId: personId };
    const before = lifecycleOfRow(row);
    const result = applyAlertAction(before, action);
    if (result.error) throw new AppError("conflict", result.error.message);
    const next = result.state;
    await tx.update(alerts).set(rowOfLifecycle(next)).where(eq(alerts.id, row.id));

    const events: (typeof alertEvents.$inferInsert)[] = [];
    if (result.shelveExpired) events.push({ alertId: row.id, ts, kind: "unshelved", personId: null, comment: "Shelving ran out" });
    if (input.type === "ack") {
      events.push({ alertId: row.id, ts, kind: "acknowledged", personId, comment: input.comment || null });
      if (next.state === "closed") events.push({ alertId: row.id, ts, kind: "closed", personId, comment: null });
    } else if (input.type === "shelve") {
      events.push({ alertId: row.id, ts, kind: "shelved", personId, comment: input.reason.trim(), value: String(input.untilTs) });
    } else {
      events.push({ alertId: row.id, ts, kind: "unshelved", personId, comment: input.comment || null });
    }
    await tx.insert(alertEvents).values(events);
    return change(next.state, next.shelved);
  });
}
