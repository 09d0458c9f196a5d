/**
 * The life of one alert once raised, per the alarm states of ISA-18.2 / IEC 62682:
 *
 *   active_unacked --ack--> active_acked --clear--> closed
 *   active_unacked --clear--> cleared_unacked --ack--> closed
 *
 * Shelving is an attribute beside the state, not a state of its own: a shelved alert keeps
 * moving through the states above (it can clear, be acknowledged, close), but notifications are
 * held while it is shelved. Shelving is always for a stated time with a reason and ends on its
 * own at shelvedUntilTs; closing an alert ends its shelving.
 *
 * Pure: applyAlertAction(state, action) returns the next state, or the unchanged state and an
 * error that says why the action is not allowed now. Who may do what (roles) is checked by the
 * caller, not here.
 */
import { z } from "zod";
import { ALERT_STATES, type AlertState } from "../vocabulary/alert-states";

export { ALERT_STATES };
export type { AlertState };

/**
 * Longest a single shelving may last. ISA-18.2 requires shelving to be time-limited but sets no
 * figure; one week is this plant's setting (common practice, from memory).
 */
export const MAX_SHELVE_MS = 7 * 24 * 60 * 60 * 1000;
export const MAX_SHELVE_REASON_LENGTH = 500;

export type AlertLifecycleState = {
  state: AlertState;
  raisedTs: number;
  ackedTs: number | null;
  ackedBy: number | null;
  clearedTs: number | null;
  closedTs: number | null;
  shelved: boolean;
  shelvedTs: number | null;
  shelvedUntilTs: number | null;
  shelvedReason: string | null;
  shelvedBy: number | null;
};

const actorIdSchema = z.number().int().positive().nullable().optional();
const tsSchema = z.number().int();

export const alertActionSchema = z.discriminatedUnion("type", [
  /** Someone acknowledges the alert. */
  z.object({ type: z.literal("ack"), ts: tsSchema, actorId: actorIdSchema }),
  /** The rules engine reports the condition back to normal. */
  z.object({ type: z.literal("clear"), ts: tsSchema }),
  z.object({
    type: z.literal("shelve"),
    ts: tsSchema,
    untilTs: tsSchema,
    reason: z.string().trim().max(MAX_SHELVE_REASON_LENGTH),
    actorId: actorIdSchema,
  }),
  z.object({ type: z.literal("unshelve"), ts: tsSchema, actorId: actorIdSchema }),
  /** Time has reached shelvedUntilTs: the shelving ends on its own. */
  z.object({ type: z.literal("expire_shelve"), ts: tsSchema }),
]);
export type AlertAction = z.infer<typeof alertActionSchema>;

export type AlertActionErrorCode =
  | "alert_closed"
  | "already_acknowledged"
  | "already_cleared"
  | "not_shelved"
  | "shelve_not_expired"
  | "shelve_end_not_in_future"
  | "shelve_too_long"
  | "reason_required"
  | "before_raise";

export type AlertActionError = { code: AlertActionErrorCode; message: string };

export type AlertActionResult = {
  state: AlertLifecycleState;
  error?: AlertActionError;
  /** True when the action's time had passed shelvedUntilTs, so the shelving ended first. */
  shelveExpired?: boolean;
};

export function createAlertLifecycle(raisedTs: number): AlertLifecycleState {
  return {
    state: "active_unacked",
    raisedTs,
    ackedTs: null,
    ackedBy: null,
    clearedTs: null,
    closedTs: null,
    shelved: false,
    shelvedTs: null,
    shelvedUntilTs: null,
    shelvedReason: null,
    shelvedBy: null,
  };
}

function withoutShelve(state: AlertLifecycleState): AlertLifecycleState {
  return { ...state, shelved: false, shelvedTs: null, shelvedUntilTs: null, shelvedReason: null, shelvedBy: null };
}

/** End a shelving whose time is up (no change otherwise). */
export function expireShelve(state: AlertLifecycleState, nowTs: number): AlertLifecycleState {
  if (state.shelved && state.shelvedUntilTs !== null && nowTs >= state.shelvedUntilTs) return withoutShelve(state);
  return state;
}

/** Is the alert shelved at nowTs (taking expiry into account)? */
export function isShelvedAt(state: AlertLifecycleState, nowTs: number): boolean {
  return state.shelved && state.shelvedUntilTs !== null && nowTs < state.shelvedUntilTs;
}

function fail(state: AlertLifecycleState, code: AlertActionErrorCode, message: string): AlertActionResult {
  return { state, error: { code, message } };
}

export function applyAlertAction(state: AlertLifecycleState, action: AlertAction): AlertActionResult {
  if (action.ts < state.raisedTs) {
    return fail(state, "before_raise", "This action is dated before the alert was raised");
  }
  if (state.state === "closed") {
    const verb = { ack: "acknowledged", clear: "cleared", shelve: "shelved", unshelve: "unshelved", expire_shelve: "unshelved" }[action.type];
    return fail(state, "alert_closed", `This alert is closed and cannot be ${verb}`);
  }

  if (action.type === "expire_shelve") {
    if (!state.shelved) return fail(state, "not_shelved", "This alert is not shelved");
    if (state.shelvedUntilTs !== null && action.ts < state.shelvedUntilTs) {
      return fail(state, "shelve_not_expired", "The shelving has not run out yet");
    }
    return { state: withoutShelve(state), shelveExpired: true };
  }

  const current = expireShelve(state, action.ts);
  const shelveExpired = current !== state;
  const done = (next: AlertLifecycleState): AlertActionResult => (shelveExpired ? { state: next, shelveExpired } : { state: next });

  switch (action.type) {
    case "ack": {
      if (current.state === "active_acked") return fail(state, "already_acknowledged", "This alert is already acknowledged");
      const acked = { ...current, ackedTs: action.ts, ackedBy: action.actorId ?? null };
      if (current.state === "active_unacked") return done({ ...acked, state: "active_acked" });
      // cleared_unacked: acknowledging a cleared alert closes it.
      return done(withoutShelve({ ...acked, state: "closed", closedTs: action.ts }));
    }
    case "clear": {
      if (current.state === "cleared_unacked") return fail(state, "already_cleared", "This alert has already cleared");
      if (current.state === "active_acked") {
        return done(withoutShelve({ ...current, state: "closed", clearedTs: action.ts, closedTs: action.ts }));
      }
      return done({ ...current, state: "cleared_unacked", clearedTs: action.ts });
    }
    case "shelve": {
      if (action.reason.trim().length === 0) return fail(state, "reason_required", "Give a reason for shelving this alert");
      if (action.untilTs <= action.ts) return fail(state, "shelve_end_not_in_future", "The shelving must end after it starts");
      if (action.untilTs - action.ts > MAX_SHELVE_MS) {
        return fail(state, "shelve_too_long", "An alert can be shelved for at most 7 days at a time");
      }
      return done({
        ...current,
        shelved: true,
        shelvedTs: action.ts,
        shelvedUntilTs: action.untilTs,
        shelvedReason: action.reason.trim(),
        shelvedBy: action.actorId ?? null,
      });
    }
    case "unshelve": {
      if (!current.shelved) {
        return fail(state, "not_shelved", shelveExpired ? "The shelving has already run out" : "This alert is not shelved");
      }
      return done(withoutShelve(current));
    }
  }
}
