/**
 * The raise/clear state machine every rule kind shares (ISA-18.2 / IEC 62682 alarm practice):
 *
 * - normal: the raise condition must hold at every evaluation for onDelayS of reading time
 *   (t − first true ≥ onDelay) before the alert is raised; one evaluation without it resets the
 *   on-delay.
 * - active: the clear condition must hold at every evaluation for offDelayS before the alert
 *   clears; one evaluation without it (a value back inside the deadband or beyond the limit)
 *   resets the off-delay.
 * - Inside the deadband neither condition holds, so an oscillating value raises nothing new and
 *   clears nothing.
 *
 * Time is only ever reading time (or tick time for sensor_silent); evaluations happen when data
 * arrives, so with sparse data an on-delay ends at the first reading at or after it.
 */
import type { AlertRecord, EvaluatorState } from "./engine-state";
import type { AlertTransition, RuleDefinition, TransitionType } from "./types";

/** A raise within this long after the previous clear of the same rule and subject is chattering (ISA-18.2 practice: 60 s, from memory). */
export const CHATTER_WINDOW_MS = 60_000;
/** At most one `update` transition per active alert per this much reading time. */
export const UPDATE_MIN_INTERVAL_MS = 60_000;

/** A forecast crossing that moves by less than this is not worth an update. */
export const CROSSING_SHIFT_MIN_MS = 60_000;

/** Which way is worse for a kind's value: the peak keeps the worst. */
export type WorseDirection = "higher" | "lower" | "magnitude";

export function pickWorse(direction: WorseDirection, a: number, b: number): number {
  switch (direction) {
    case "higher":
      return b > a ? b : a;
    case "lower":
      return b < a ? b : a;
    case "magnitude":
      return Math.abs(b) > Math.abs(a) ? b : a;
  }
}

/** What the state machine needs from an evaluator. */
export interface AlertHost {
  readonly rule: RuleDefinition;
  readonly subjectKey: string;
  readonly unit: string;
  readonly worse: WorseDirection;
  /** True for kinds whose transitions carry expectedCrossingTs (rh_forecast). */
  readonly carriesCrossing: boolean;
  state: EvaluatorState;
  describe(type: TransitionType, alert: AlertRecord): string;
}

function makeTransition(
  host: AlertHost,
  type: TransitionType,
  ts: number,
  alert: AlertRecord,
  chattering: boolean,
): AlertTransition {
  const transition: AlertTransition = {
    ruleId: host.rule.id,
    ruleVersion: alert.ruleVersion,
    subjectKey: host.subjectKey,
    kind: host.rule.kind,
    severity: host.rule.severity,
    type,
    ts,
    raisedTs: alert.raisedTs,
    value: alert.value,
    peakValue: alert.peakValue,
    unit: host.unit,
    message: alert.message,
    chattering,
  };
  if (type === "raise") transition.conditionSinceTs = alert.conditionSinceTs;
  if (host.carriesCrossing) transition.expectedCrossingTs = alert.expectedCrossingTs;
  return transition;
}

export function raiseAlert(
  host: AlertHost,
  t: number,
  conditionSinceTs: number,
  value: number,
  peakValue: number,
  expectedCrossingTs: number | null,
  out: AlertTransition[],
): void {
  const h = host.state.h;
  const chattering = h.lastClearTs !== null && t - h.lastClearTs <= CHATTER_WINDOW_MS;
  const alert: AlertRecord = {
    ruleVersion: host.rule.version,
    raisedTs: t,
    conditionSinceTs,
    value,
    peakValue,
    expectedCrossingTs,
    lastEmittedTs: t,
    lastEmittedPeak: peakValue,
    lastEmittedCrossingTs: expectedCrossingTs,
    message: "",
  };
  h.phase = "active";
  h.alert = alert;
  h.sinceTs = null;
  h.pendingPeak = null;
  alert.message = host.describe("raise", alert);
  out.push(makeTransition(host, "raise", t, alert, chattering));
}

export function clearAlert(host: AlertHost, t: number, out: AlertTransition[]): void {
  const h = host.state.h;
  const alert = h.alert;
  if (alert === null) return;
  alert.message = host.describe("clear", alert);
  out.push(makeTransition(host, "clear", t, alert, false));
  h.phase = "normal";
  h.alert = null;
  h.sinceTs = null;
  h.pendingPeak = null;
  h.lastClearTs = t;
}

/** Rounding noise in running sums must not count as a new peak. */
function differs(a: number, b: number): boolean {
  return Math.abs(a - b) > 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
}

function maybeUpdate(host: AlertHost, t: number, alert: AlertRecord, out: AlertTransition[]): void {
  const changed =
    differs(alert.peakValue, alert.lastEmittedPeak) ||
    (alert.expectedCrossingTs === null) !== (alert.lastEmittedCrossingTs === null) ||
    (alert.expectedCrossingTs !== null &&
      alert.lastEmittedCrossingTs !== null &&
      Math.abs(alert.expectedCrossingTs - alert.lastEmittedCrossingTs) >= CROSSING_SHIFT_MIN_MS);
  if (!changed || t - alert.lastEmittedTs < UPDATE_MIN_INTERVAL_MS) return;
  alert.lastEmittedTs = t;
  alert.lastEmittedPeak = alert.peakValue;
  alert.lastEmittedCrossingTs = alert.expectedCrossingTs;
  alert.message = host.describe("update", alert);
  out.push(makeTransition(host, "update", t, alert, false));
}

/**
 * One evaluation at reading time t.
 * @param raise  the raise condition holds (already false when the line gate says so)
 * @param clear  the clear condition holds (value past the clear level, or the gated line stopped)
 * @param value  the kind's measure at t, or null when it could not be judged (no value/peak update)
 * @param expectedCrossingTs  rh_forecast's projected crossing (null: none); undefined for other kinds
 */
export function stepHysteresis(
  host: AlertHost,
  t: number,
  raise: boolean,
  clear: boolean,
  value: number | null,
  expectedCrossingTs: number | null | undefined,
  out: AlertTransition[],
): void {
  // No closures in here: this runs for every reading of every rule.
  const h = host.state.h;
  if (h.phase === "normal" || h.alert === null) {
    if (!raise || value === null) {
      h.sinceTs = null;
      h.pendingPeak = null;
      return;
    }
    if (h.sinceTs === null) {
      h.sinceTs = t;
      h.pendingPeak = value;
    } else {
      h.pendingPeak = pickWorse(host.worse, h.pendingPeak ?? value, value);
    }
    if (t - h.sinceTs >= host.rule.onDelayS * 1000) {
      raiseAlert(host, t, h.sinceTs, value, h.pendingPeak, expectedCrossingTs ?? null, out);
    }
    return;
  }

  const alert = h.alert;
  if (value !== null) {
    alert.value = value;
    alert.peakValue = pickWorse(host.worse, alert.peakValue, value);
  }
  if (expectedCrossingTs !== undefined) alert.expectedCrossingTs = expectedCrossingTs;
  if (clear) {
    if (h.sinceTs === null) h.sinceTs = t;
    if (t - h.sinceTs >= host.rule.offDelayS * 1000) {
      clearAlert(host, t, out);
      return;
    }
  } else {
    h.sinceTs = null;
  }
  maybeUpdate(host, t, alert, out);
}
