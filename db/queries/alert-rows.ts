// An alert row <-> the alert lifecycle of lib/rules/alert-lifecycle.ts, for the modules that
// change alerts (alert-actions.ts for people, alert-transitions.ts for the alerts runner).
import type { Db } from "../client";
import { alerts } from "../schema";
import type { AlertLifecycleState } from "../../lib/rules";
import type { AlertState } from "../../lib/vocabulary";

/** What the runner and the app's actions write with (a Db or a transaction). */
export type DbWriter = Pick<Db, "select" | "insert" | "update">;

type LifecycleRow = {
  state: AlertState;
  startTs: number;
  endTs: number | null;
  closedTs: number | null;
  ackedBy: number | null;
  ackedTs: number | null;
  shelvedUntilTs: number | null;
  shelvedReason: string | null;
};

export function lifecycleOfRow(r: LifecycleRow): AlertLifecycleState {
  return {
    state: r.state,
    raisedTs: r.startTs,
    ackedTs: r.ackedTs,
    ackedBy: r.ackedBy,
    clearedTs: r.endTs,
    closedTs: r.closedTs,
    shelved: r.shelvedUntilTs !== null,
    shelvedTs: null,
    shelvedUntilTs: r.shelvedUntilTs,
    shelvedReason: r.shelvedReason,
    shelvedBy: null,
  };
}

export function rowOfLifecycle(s: AlertLifecycleState) {
  return {
    state: s.state,
    endTs: s.clearedTs,
    closedTs: s.closedTs,
    ackedBy: s.ackedBy,
    ackedTs: s.ackedTs,
    shelvedUntilTs: s.shelved ? s.shelvedUntilTs : null,
    shelvedReason: s.shelved ? (s.shelvedReason ?? "").slice(0, 300) : null,
  };
}

export const lifecycleColumns = {
  id: alerts.id,
  lineId: alerts.lineId,
  areaId: alerts.areaId,
  severity: alerts.severity,
  state: alerts.state,
  startTs: alerts.startTs,
  endTs: alerts.endTs,
  closedTs: alerts.closedTs,
  ackedBy: alerts.ackedBy,
  ackedTs: alerts.ackedTs,
  shelvedUntilTs: alerts.shelvedUntilTs,
  shelvedReason: alerts.shelvedReason,
};
