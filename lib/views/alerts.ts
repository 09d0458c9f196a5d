// View types of the alert list and an alert's detail (db/queries/alert-list.ts reads them; the
// alerts board and its hooks draw them), and the change announced after a person's action.
import type { AlertState, RuleKind, Severity } from "../vocabulary";

export type AlertListItem = {
  id: number;
  ruleId: number;
  ruleVersion: number;
  ruleName: string | null;
  kind: RuleKind;
  severity: Severity;
  subjectKey: string;
  areaId: number | null;
  lineId: number | null;
  pointId: number | null;
  deviceId: number | null;
  neutralizerId: number | null;
  areaName: string | null;
  lineName: string | null;
  pointName: string | null;
  state: AlertState;
  message: string;
  startTs: number;
  endTs: number | null;
  closedTs: number | null;
  peakValue: number | null;
  expectedCrossingTs: number | null;
  chattering: boolean;
  shelvedUntilTs: number | null;
  shelvedReason: string | null;
  ackedBy: number | null;
  ackedByName: string | null;
  ackedTs: number | null;
  notifiedLevel: number;
  /** the line page to open: the alert's line, else the first line of its hall */
  linkLineId: number | null;
  /** found by the re-check of late readings (ingest/late-recheck.ts): when, and whether it paged nobody */
  foundLateTs?: number | null;
  foundLateQuiet?: boolean | null;
  /** the storm group it was told to on call in (alerts sent together share it), and when it last got worse */
  notifyGroup?: string | null;
  worsenedTs?: number | null;
};

export type AlertEvent = { id: number; ts: number; kind: string; personId: number | null; personName: string | null; comment: string | null; value: string | null };
export type AlertDetail = AlertListItem & { events: AlertEvent[] };

/** The change to announce on `stillfield/internal/alerts` after the transaction commits. */
export type AlertChange = { alertId: number; lineId: number | null; areaId: number | null; state: AlertState; severity: Severity; ts: number; shelved: boolean };
