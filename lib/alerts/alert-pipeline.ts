/**
 * The alert pipeline the live worker, the demo backfill and `npm run bench:alerts` share:
 * rules engine (one transition per rule and subject) → one alert per condition
 * (condition-merge.ts) → causes before symptoms (dependency-hold.ts). Pure: time is reading
 * time, and ticks come from the caller.
 */
import { createRuleEngine, type RuleEngine } from "../rules/engine";
import type { AlertTransition, Reading, RuleDefinitionInput, Topology } from "../rules/types";
import { createConditionMerger, type ConditionEvent, type ConditionMerger, type ConditionMergerState } from "./condition-merge";
import { createDependencyHold, DEPENDENCY_GRACE_MS, type DependencyHold, type DependencyHoldState, type DependencyParent } from "./dependency-hold";

export type AlertPipeline = {
  push(reading: Reading): ConditionEvent[];
  tick(nowTs: number): ConditionEvent[];
  /** Conditions whose rules the engine no longer holds ease or clear (after a rules reload). */
  prune(nowTs: number): ConditionEvent[];
  /** The engine underneath (its snapshot and active alerts). */
  readonly engine: RuleEngine;
  readonly merger: ConditionMerger;
  readonly hold: DependencyHold;
  /** What to save beside the engine's own state (JSON). */
  snapshot(): AlertPipelineState;
};

export type AlertPipelineState = { merger: ConditionMergerState; hold: DependencyHoldState };

export type AlertPipelineOptions = {
  rules: readonly RuleDefinitionInput[];
  topology: Topology;
  parents?: readonly DependencyParent[];
  engineState?: unknown;
  mergerState?: ConditionMergerState;
  /** Or a merger already built (lib/alerts/condition-merge.ts mergerFromActiveAlerts). */
  merger?: ConditionMerger;
  holdState?: unknown;
  /** Take an existing engine instead of building one (the worker reloads rules this way). */
  engine?: RuleEngine;
};

/**
 * One reading can move the milder rule's peak past "clearly worse" and raise the more severe
 * rule at the same moment: the escalation says all the worse would, so the worse is dropped
 * (one "got worse", one message).
 */
function dropWorseBeforeEscalation(events: ConditionEvent[]): ConditionEvent[] {
  if (events.length < 2) return events;
  const escalated = new Set(events.filter((e) => e.type === "escalate").map((e) => `${e.conditionKey}|${e.ts}`));
  if (escalated.size === 0) return events;
  return events.filter((e) => e.type !== "worse" || !escalated.has(`${e.conditionKey}|${e.ts}`));
}

export function createAlertPipeline(options: AlertPipelineOptions): AlertPipeline {
  const engine = options.engine ?? createRuleEngine({ rules: options.rules, topology: options.topology, state: options.engineState });
  const merger = options.merger ?? createConditionMerger(options.mergerState);
  const hold = createDependencyHold(options.parents ?? [], DEPENDENCY_GRACE_MS, options.holdState);

  function through(transitions: AlertTransition[], ts: number): ConditionEvent[] {
    const out: ConditionEvent[] = [];
    for (const t of transitions) for (const e of merger.push(t)) for (const h of hold.push(e)) out.push(h);
    for (const e of hold.advance(ts)) out.push(e);
    return dropWorseBeforeEscalation(out);
  }

  return {
    push: (reading) => through(engine.push(reading), reading.ts),
    tick: (nowTs) => through(engine.tick(nowTs), nowTs),
    prune: (nowTs) => {
      const active = new Set(engine.activeAlerts().map((a) => `${a.ruleId}|${a.subjectKey}`));
      const out: ConditionEvent[] = [];
      for (const e of merger.prune((ruleId, subjectKey) => active.has(`${ruleId}|${subjectKey}`), nowTs)) out.push(...hold.push(e));
      return out;
    },
    engine,
    merger,
    hold,
    snapshot: () => ({ merger: merger.snapshot(), hold: hold.snapshot() }),
  };
}
