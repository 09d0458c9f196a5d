// The alerts of backfilled history: plays the readings the backfill writes, in reading time,
// through the same alert pipeline the worker runs (lib/alerts/alert-pipeline.ts: rules engine →
// one alert per condition → causes before symptoms), ticking it every HISTORY_TICK_MS of reading
// time so silence rules work, and keeps each alert's whole life (raised, worsened, eased,
// cleared) in memory until it clears. simulators/backfill-responses.ts then adds what people did
// about it; db/seed-alert-history.ts stores it in bulk. Pure: no I/O, time is reading time.
import { createAlertPipeline, type AlertPipeline } from "../lib/alerts/alert-pipeline";
import type { ConditionEvent } from "../lib/alerts/condition-merge";
import type { DependencyParent } from "../lib/alerts/dependency-hold";
import { CHANNELS, type Channel, type Reading, type RuleDefinitionInput, type Topology } from "../lib/rules/types";
import type { AlertState, RuleKind, Severity } from "../lib/vocabulary";

/** Reading time between pipeline ticks (the worker ticks every few seconds of wall time). */
export const HISTORY_TICK_MS = 10_000;

/** What the clear of an alert still open when the history ends says. */
export const HISTORY_END_REASON = "Cleared at the end of the recorded history; the live alerts engine raises it again if the condition persists";

/** The demo people who answer alerts (db/seed-alert-history.ts finds them by e-mail). */
export type Responder = "lead" | "engineer" | "oncall";

export type HistoryEventKind = "raised" | "worsened" | "eased" | "cleared" | "acknowledged" | "commented" | "shelved" | "unshelved" | "closed";

export type HistoryEvent = { ts: number; kind: HistoryEventKind; by: Responder | null; comment: string | null; value: string | null };

export type HistoryAlert = {
  ruleId: number;
  ruleVersion: number;
  kind: RuleKind;
  severity: Severity;
  subjectKey: string;
  startTs: number;
  endTs: number | null;
  closedTs: number | null;
  state: AlertState;
  message: string;
  peakValue: number;
  unit: string;
  chattering: boolean;
  expectedCrossingTs: number | null;
  worsenedTs: number | null;
  ackedBy: Responder | null;
  ackedTs: number | null;
  events: HistoryEvent[];
};

const CHANNEL_SET: ReadonlySet<string> = new Set(CHANNELS);
export const isRuleChannel = (c: string): c is Channel => CHANNEL_SET.has(c);

const num = (v: number) => (Number.isFinite(v) ? String(Number(v.toPrecision(8))).slice(0, 32) : null);

export type AlertHistoryPlayer = {
  /** Readings in time order (within and across calls). */
  push(readings: readonly Reading[]): void;
  /** Let reading time pass without readings (ticks up to ts). */
  advanceTo(ts: number): void;
  /** Alerts that have cleared since the last call, oldest first. */
  drainCleared(): HistoryAlert[];
  /** Ends the history at endTs: alerts still open are cleared there (HISTORY_END_REASON). Returns them. */
  finish(endTs: number): HistoryAlert[];
  readonly readings: number;
  readonly pipeline: AlertPipeline;
};

export function createAlertHistoryPlayer(opts: {
  rules: readonly RuleDefinitionInput[];
  topology: Topology;
  parents?: readonly DependencyParent[];
  fromMs: number;
}): AlertHistoryPlayer {
  const pipeline = createAlertPipeline({ rules: opts.rules, topology: opts.topology, parents: opts.parents ?? [] });
  const open = new Map<string, HistoryAlert>(); // conditionKey → its alert
  let cleared: HistoryAlert[] = [];
  let nextTick = Math.ceil(opts.fromMs / HISTORY_TICK_MS) * HISTORY_TICK_MS;
  let readings = 0;

  function take(events: readonly ConditionEvent[]): void {
    for (const e of events) {
      const a = open.get(e.conditionKey);
      if (e.type === "raise") {
        if (a !== undefined) continue; // the merger opens one alert per condition; a second raise would be a bug upstream
        open.set(e.conditionKey, {
          ruleId: e.ruleId,
          ruleVersion: e.ruleVersion,
          kind: e.kind,
          severity: e.severity,
          subjectKey: e.subjectKey,
          startTs: e.raisedTs,
          endTs: null,
          closedTs: null,
          state: "active_unacked",
          message: e.message,
          peakValue: e.peakValue,
          unit: e.unit,
          chattering: e.chattering,
          expectedCrossingTs: e.expectedCrossingTs ?? null,
          worsenedTs: null,
          ackedBy: null,
          ackedTs: null,
          events: [
            {
              ts: e.ts,
              kind: "raised",
              by: null,
              comment: e.conditionSinceTs !== undefined ? `Condition since ${new Date(e.conditionSinceTs).toISOString()}` : null,
              value: num(e.value),
            },
          ],
        });
        continue;
      }
      if (a === undefined) continue; // an alert raised before the history began
      a.peakValue = e.peakValue;
      a.chattering ||= e.chattering;
      if (e.expectedCrossingTs !== undefined) a.expectedCrossingTs = e.expectedCrossingTs;
      const ts = Math.max(e.ts, a.startTs);
      if (e.type === "update") {
        a.message = e.message;
      } else if (e.type === "escalate" || e.type === "worse") {
        const before = a.severity;
        a.severity = e.severity;
        a.kind = e.kind;
        a.message = e.message;
        a.worsenedTs = ts;
        const comment = e.type === "escalate" ? `Severity ${e.previousSeverity ?? before} → ${e.severity}` : `Peak ${num(e.peakValue) ?? "?"} ${e.unit}`;
        a.events.push({ ts, kind: "worsened", by: null, comment, value: num(e.peakValue) });
      } else if (e.type === "ease") {
        a.events.push({ ts, kind: "eased", by: null, comment: `Severity ${e.previousSeverity ?? a.severity} → ${e.severity}`, value: num(e.value) });
        a.severity = e.severity;
        a.kind = e.kind;
      } else {
        clear(a, ts, e.message);
        open.delete(e.conditionKey);
      }
    }
  }

  function clear(a: HistoryAlert, ts: number, message: string | null, reason?: string): void {
    a.endTs = ts;
    a.state = "cleared_unacked";
    if (message !== null) a.message = message;
    a.events.push({ ts, kind: "cleared", by: null, comment: (reason ?? message)?.slice(0, 300) ?? null, value: null });
    cleared.push(a);
  }

  function advanceTo(ts: number): void {
    while (nextTick <= ts) {
      take(pipeline.tick(nextTick));
      nextTick += HISTORY_TICK_MS;
    }
  }

  return {
    push(list) {
      for (const r of list) {
        advanceTo(r.ts);
        take(pipeline.push(r));
      }
      readings += list.length;
    },
    advanceTo,
    drainCleared() {
      const out = cleared;
      cleared = [];
      return out;
    },
    finish(endTs) {
      advanceTo(endTs);
      for (const a of open.values()) clear(a, Math.max(endTs, a.startTs), null, HISTORY_END_REASON);
      open.clear();
      const out = cleared;
      cleared = [];
      return out;
    },
    get readings() {
      return readings;
    },
    pipeline,
  };
}
