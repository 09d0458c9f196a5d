/**
 * One alert per condition. The rules engine raises one alert per rule and subject, so one
 * excursion at one point passes the 12 kV rule and then the 20 kV rule, and a hall drying out
 * trips the forecast and then the low-humidity rule. This layer turns the engine's transitions
 * into one alert per subject and condition family:
 *
 * - the first raise of a family on a subject opens the alert (its identity: that rule, subject
 *   and raise time, so stored rows keep their key);
 * - a raise of a more severe rule of the same family while it is open escalates it (medium →
 *   high) and is notified again, instead of opening a second alert;
 * - while open, a peak past `worseByFraction` beyond the peak last notified is "worse" and is
 *   notified again (charge kinds only: a higher kV is plainly worse);
 * - a clear of the most severe rule while a milder one still holds eases the alert one step
 *   (high → medium); the alert clears when the last of its rules clears (clears in steps).
 *
 * Pure and deterministic; the worker, the backfill and `npm run bench:alerts` all use it
 * through lib/alerts/alert-pipeline.ts.
 */
import type { ActiveAlert, AlertTransition } from "../rules/types";
import { SEVERITY_RANK, type RuleKind, type Severity } from "../vocabulary";

export type ConditionFamily = "charge" | "humidity" | "sensor" | "effect";

/** Which kinds tell of the same condition on the same subject. */
export const CONDITION_FAMILY: Record<RuleKind, ConditionFamily> = {
  charge_high: "charge",
  charge_rate: "charge",
  rh_low: "humidity",
  rh_forecast: "humidity",
  sensor_silent: "sensor",
  sensor_flat: "sensor",
  effect_loss: "effect",
};

/**
 * A peak this much beyond the one last notified is notified again (plant setting, from memory:
 * a quarter more charge is a clearly worse excursion, not noise).
 */
export const WORSE_BY_FRACTION = 0.25;

export type ConditionEventType = "raise" | "escalate" | "worse" | "ease" | "update" | "clear";

export type ConditionEvent = {
  type: ConditionEventType;
  /** family|subjectKey */
  conditionKey: string;
  family: ConditionFamily;
  subjectKey: string;
  /** The rule that opened the alert, its version and raise time: the alert's identity. */
  ruleId: number;
  ruleVersion: number;
  raisedTs: number;
  ts: number;
  /** The kind and severity the alert has after this event. */
  kind: RuleKind;
  severity: Severity;
  /** On escalate and ease: the severity before. */
  previousSeverity?: Severity;
  value: number;
  peakValue: number;
  unit: string;
  message: string;
  chattering: boolean;
  conditionSinceTs?: number;
  expectedCrossingTs?: number | null;
  /** True when this event should reach people (a raise, a worse band or a worse peak). */
  notify: boolean;
};

type ActiveRule = { ruleId: number; kind: RuleKind; severity: Severity };

type OpenCondition = {
  family: ConditionFamily;
  subjectKey: string;
  ruleId: number;
  ruleVersion: number;
  raisedTs: number;
  kind: RuleKind;
  severity: Severity;
  rules: Map<number, ActiveRule>;
  peakValue: number;
  notifiedPeak: number;
  unit: string;
};

export type ConditionMergerState = { open: Array<Omit<OpenCondition, "rules"> & { rules: ActiveRule[] }> };

/** Whether saved JSON looks like a merger's state (the worker checks before trusting it). */
export function isConditionMergerState(v: unknown): v is ConditionMergerState {
  if (typeof v !== "object" || v === null || !Array.isArray((v as { open?: unknown }).open)) return false;
  return (v as { open: unknown[] }).open.every((o) => {
    if (typeof o !== "object" || o === null) return false;
    const c = o as Record<string, unknown>;
    return typeof c.family === "string" && typeof c.subjectKey === "string" && Number.isInteger(c.ruleId) && Number.isFinite(c.raisedTs) && typeof c.severity === "string" && Array.isArray(c.rules);
  });
}

function strongest(rules: Iterable<ActiveRule>): ActiveRule | null {
  let best: ActiveRule | null = null;
  for (const r of rules) if (best === null || SEVERITY_RANK[r.severity] > SEVERITY_RANK[best.severity]) best = r;
  return best;
}

function worsePeak(family: ConditionFamily, a: number, b: number): number {
  if (family === "charge") return Math.abs(b) > Math.abs(a) ? b : a;
  if (family === "humidity") return b < a ? b : a;
  return b;
}

export type ConditionMerger = {
  push(t: AlertTransition): ConditionEvent[];
  snapshot(): ConditionMergerState;
  /** Open conditions, for reconciling with stored rows. */
  openKeys(): Array<{ ruleId: number; subjectKey: string; raisedTs: number }>;
  /**
   * Drops the rules the engine no longer holds active (a rule removed, disabled or reloaded
   * without its state): a condition eases, or clears when none of its rules is left.
   */
  prune(isActive: (ruleId: number, subjectKey: string) => boolean, ts: number): ConditionEvent[];
};

/**
 * A merger holding what an engine holds active now (no saved merger state: the first start
 * after an upgrade, or a lost snapshot). The raises are replayed in raise order; their events
 * are dropped (the stored rows already tell of them).
 */
export function mergerFromActiveAlerts(active: readonly ActiveAlert[], worseByFraction = WORSE_BY_FRACTION): ConditionMerger {
  const m = createConditionMerger(undefined, worseByFraction);
  for (const a of [...active].sort((x, y) => x.raisedTs - y.raisedTs || x.ruleId - y.ruleId)) {
    m.push({ ...a, type: "raise", ts: a.raisedTs, chattering: false, expectedCrossingTs: a.expectedCrossingTs });
  }
  return m;
}

export function createConditionMerger(state?: ConditionMergerState, worseByFraction = WORSE_BY_FRACTION): ConditionMerger {
  const open = new Map<string, OpenCondition>();
  for (const o of state?.open ?? []) open.set(`${o.family}|${o.subjectKey}`, { ...o, rules: new Map(o.rules.map((r) => [r.ruleId, r])) });

  function event(c: OpenCondition, t: AlertTransition, type: ConditionEventType, notify: boolean, previousSeverity?: Severity): ConditionEvent {
    return {
      type,
      conditionKey: `${c.family}|${c.subjectKey}`,
      family: c.family,
      subjectKey: c.subjectKey,
      ruleId: c.ruleId,
      ruleVersion: c.ruleVersion,
      raisedTs: c.raisedTs,
      ts: t.ts,
      kind: c.kind,
      severity: c.severity,
      ...(previousSeverity !== undefined ? { previousSeverity } : {}),
      value: t.value,
      peakValue: c.peakValue,
      unit: c.unit,
      message: t.message,
      chattering: t.chattering,
      ...(type === "raise" && t.conditionSinceTs !== undefined ? { conditionSinceTs: t.conditionSinceTs } : {}),
      ...(t.expectedCrossingTs !== undefined ? { expectedCrossingTs: t.expectedCrossingTs } : {}),
      notify,
    };
  }

  function push(t: AlertTransition): ConditionEvent[] {
    const family = CONDITION_FAMILY[t.kind];
    const key = `${family}|${t.subjectKey}`;
    const c = open.get(key);
    if (t.type === "raise") {
      if (c === undefined) {
        const fresh: OpenCondition = {
          family,
          subjectKey: t.subjectKey,
          ruleId: t.ruleId,
          ruleVersion: t.ruleVersion,
          raisedTs: t.raisedTs,
          kind: t.kind,
          severity: t.severity,
          rules: new Map([[t.ruleId, { ruleId: t.ruleId, kind: t.kind, severity: t.severity }]]),
          peakValue: t.peakValue,
          notifiedPeak: t.peakValue,
          unit: t.unit,
        };
        open.set(key, fresh);
        return [event(fresh, t, "raise", true)];
      }
      c.rules.set(t.ruleId, { ruleId: t.ruleId, kind: t.kind, severity: t.severity });
      c.peakValue = worsePeak(family, c.peakValue, t.peakValue);
      if (SEVERITY_RANK[t.severity] > SEVERITY_RANK[c.severity]) {
        const before = c.severity;
        c.severity = t.severity;
        c.kind = t.kind;
        c.unit = t.unit;
        c.notifiedPeak = c.peakValue;
        return [event(c, t, "escalate", true, before)];
      }
      return [];
    }
    if (c === undefined || !c.rules.has(t.ruleId)) return []; // a rule of an alert this layer never opened
    if (t.type === "update") {
      c.peakValue = worsePeak(family, c.peakValue, t.peakValue);
      const top = strongest(c.rules.values());
      if (top !== null && top.ruleId !== t.ruleId && top.kind === c.kind && SEVERITY_RANK[top.severity] > SEVERITY_RANK[t.severity]) return [];
      if (family === "charge" && Math.abs(c.peakValue) >= Math.abs(c.notifiedPeak) * (1 + worseByFraction)) {
        c.notifiedPeak = c.peakValue;
        return [event(c, t, "worse", true)];
      }
      return [event(c, t, "update", false)];
    }
    // clear: the rule's final peak counts (a silence's length is known only when it ends)
    c.peakValue = worsePeak(family, c.peakValue, t.peakValue);
    c.rules.delete(t.ruleId);
    const top = strongest(c.rules.values());
    if (top === null) {
      open.delete(key);
      return [event(c, t, "clear", false)];
    }
    if (SEVERITY_RANK[top.severity] < SEVERITY_RANK[c.severity]) {
      const before = c.severity;
      c.severity = top.severity;
      c.kind = top.kind;
      return [event(c, t, "ease", false, before)];
    }
    return [];
  }

  function prune(isActive: (ruleId: number, subjectKey: string) => boolean, ts: number): ConditionEvent[] {
    const out: ConditionEvent[] = [];
    for (const c of [...open.values()]) {
      for (const r of [...c.rules.values()]) {
        if (isActive(r.ruleId, c.subjectKey)) continue;
        const gone: AlertTransition = {
          ruleId: r.ruleId,
          ruleVersion: c.ruleVersion,
          subjectKey: c.subjectKey,
          kind: r.kind,
          severity: r.severity,
          type: "clear",
          ts,
          raisedTs: c.raisedTs,
          value: c.peakValue,
          peakValue: c.peakValue,
          unit: c.unit,
          message: "Its rule was removed, disabled or no longer applies here",
          chattering: false,
        };
        out.push(...push(gone));
      }
    }
    return out;
  }

  return {
    push,
    prune,
    snapshot: () => ({ open: [...open.values()].map((c) => ({ ...c, rules: [...c.rules.values()] })) }),
    openKeys: () => [...open.values()].map((c) => ({ ruleId: c.ruleId, subjectKey: c.subjectKey, raisedTs: c.raisedTs })),
  };
}
