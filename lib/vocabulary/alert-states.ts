// Alert states (ISA-18.2 / IEC 62682 lifecycle, see lib/rules/alert-lifecycle.ts): the value list
// (the schema's enum uses it), long and short words, rank, and the state code an alert shows.
import type { PointState } from "./point-states";
import { RULE_KIND_STATE, type RuleKind } from "./rule-kinds";

export const ALERT_STATES = ["active_unacked", "active_acked", "cleared_unacked", "closed"] as const;
export type AlertState = (typeof ALERT_STATES)[number];

/** Not closed: still on the alert list. */
export const OPEN_ALERT_STATES: readonly AlertState[] = ["active_unacked", "active_acked", "cleared_unacked"];
/** The condition is still there (not yet cleared). */
export const ACTIVE_ALERT_STATES: readonly AlertState[] = ["active_unacked", "active_acked"];

export const ALERT_STATE_WORDS: Record<AlertState, string> = {
  active_unacked: "Active, not acknowledged",
  active_acked: "Active, acknowledged",
  cleared_unacked: "Cleared, not acknowledged",
  closed: "Closed",
};

/** Short words for a state column. */
export const ALERT_STATE_SHORT: Record<AlertState, string> = {
  active_unacked: "Active · unacked",
  active_acked: "Active · acked",
  cleared_unacked: "Cleared · unacked",
  closed: "Closed",
};

/** Higher needs attention sooner. */
export const ALERT_STATE_RANK: Record<AlertState, number> = { active_unacked: 3, cleared_unacked: 2, active_acked: 1, closed: 0 };

export function isAlertState(v: string): v is AlertState {
  return (ALERT_STATES as readonly string[]).includes(v);
}

/**
 * The state code an alert shows. Once its condition has ended (cleared or closed) it shows
 * "normal" — the value is back inside its limit — whatever its shelving; while the condition
 * lasts, a shelved alert shows "shelved" and any other its kind's code (RULE_KIND_STATE).
 *
 * This is the one mapping for the alert list, e-mails and reports. (Before, the reports kept
 * showing the kind's code for an alert that had cleared, while the alert list showed "OK"; the
 * list's meaning is the one kept, because the code says how things stand, and the state words
 * beside it say what happened.)
 */
export function alertPointState(a: { kind: RuleKind; ended: boolean; shelved: boolean }): PointState {
  if (a.ended) return "normal";
  if (a.shelved) return "shelved";
  return RULE_KIND_STATE[a.kind];
}

/** The code of an alert row as it stands now (alert list, e-mails). */
export function alertStateCode(a: { kind: RuleKind; state: AlertState; shelved: boolean }): PointState {
  return alertPointState({ kind: a.kind, ended: a.state === "closed" || a.state === "cleared_unacked", shelved: a.shelved });
}

/** The code of an alert as it stood at `atTs` (reports: the end of the shift or week). */
export function alertStateCodeAt(a: { kind: RuleKind; endTs: number | null; shelvedUntilTs: number | null }, atTs: number): PointState {
  return alertPointState({
    kind: a.kind,
    ended: a.endTs !== null && a.endTs <= atTs,
    shelved: a.shelvedUntilTs !== null && a.shelvedUntilTs > atTs,
  });
}

/**
 * Words for the entries of an alert's history (alert_events.kind). "Notified" says who was told,
 * not how: a notification may go by e-mail, text or push.
 */
export const ALERT_EVENT_WORDS: Record<string, string> = {
  raised: "Raised",
  updated: "Peak moved",
  cleared: "Cleared (back to normal)",
  acknowledged: "Acknowledged",
  commented: "Comment",
  shelved: "Shelved",
  unshelved: "Unshelved",
  closed: "Closed",
  notified: "On-call told",
  escalated: "Escalated",
  worsened: "Got worse",
  eased: "Eased",
  held: "Recorded, nobody told",
};
