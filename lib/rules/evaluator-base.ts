// What every rule evaluator shares: the context the engine passes in, the keys that route
// readings and name subjects, and the base class that holds one (rule, subject) state and
// restores it after a restart or a rule edit. The kinds themselves are in the *-evaluators.ts
// files beside this one; evaluators.ts lists them and documents each kind.
import type { ZodType } from "zod";
import { type AlertRecord, createHysteresisState, type EvaluatorState } from "./engine-state";
import type { AlertHost, WorseDirection } from "./hysteresis";
import type { AlertTransition, Reading, RuleDefinition, TransitionType } from "./types";

/**
 * How far one sensor's readings may run ahead of another's that the same rule combines with
 * (a neutralizer's before/after meters, a point and its line's running signal) while the
 * result stays independent of arrival order. Beyond it the engine drops what it held back.
 */
export const MAX_CROSS_SENSOR_LAG_MS = 15 * 60_000;
/** Hard cap on held-back evaluation times per neutralizer (only reached at absurd sample rates). */
export const MAX_PENDING_EVALUATIONS = 100_000;

export interface EvalContext {
  /**
   * Since when the line has been running without a stop, at reading time ts: null when it was
   * stopped; −Infinity when it has no running signal, has not reported yet, or has been
   * running since before anything the engine has seen.
   */
  getRunningSince(lineId: number | null, ts: number): number | null;
  /** Latest reading time of a sensor, any channel; null if never heard from. */
  getSensorLastTs(sensorKey: string): number | null;
  /** First reading or tick time the engine saw. */
  getStartTs(): number | null;
}

export function readingKey(sensorKey: string, channel: string): string {
  return `${sensorKey}\u0000${channel}`;
}

export function subjectKeyOfPoint(pointId: number): string {
  return `point:${pointId}`;
}
export function subjectKeyOfArea(areaId: number): string {
  return `area:${areaId}`;
}
export function subjectKeyOfSensor(sensorKey: string): string {
  return `sensor:${sensorKey}`;
}
export function subjectKeyOfNeutralizer(neutralizerId: number): string {
  return `neutralizer:${neutralizerId}`;
}

export abstract class BaseEvaluator<R extends RuleDefinition, W> implements AlertHost {
  state: EvaluatorState & { w: W };
  carriesCrossing = false;
  abstract readonly worse: WorseDirection;

  constructor(
    readonly rule: R,
    readonly subjectKey: string,
    readonly unit: string,
    /** Line whose running state gates this rule (null: not line-bound). */
    readonly lineId: number | null,
    /** Sensor channels whose readings this evaluator takes. */
    readonly readingKeys: string[],
  ) {
    this.state = {
      ruleId: rule.id,
      ruleVersion: rule.version,
      kind: rule.kind,
      severity: rule.severity,
      subjectKey,
      unit,
      h: createHysteresisState(),
      w: this.createWindow(),
    };
  }

  abstract createWindow(): W;
  abstract windowSchema(): ZodType<W> | null;
  abstract onReading(reading: Reading, ctx: EvalContext, out: AlertTransition[]): void;
  abstract describe(type: TransitionType, alert: AlertRecord): string;

  /**
   * The line gate at time t: [running, stopped, windowFloorTs]. Raise needs running; a stopped
   * gated line counts toward clearing; windowed kinds judge only readings taken since the line
   * last started (windowFloorTs), so a start-up ramp or a stopped web's steady zero never
   * counts as an excursion or a stuck sensor.
   */
  protected gate(ctx: EvalContext, t: number): [boolean, boolean, number] {
    if (!this.rule.onlyWhileRunning) return [true, false, Number.NEGATIVE_INFINITY];
    const since = ctx.getRunningSince(this.lineId, t);
    return since === null ? [false, true, t] : [true, false, since];
  }

  /**
   * Take over a saved state. Same rule version: everything. New version of the same rule: the
   * open alert (still naming the version that raised it) and the chattering clock, with fresh
   * delays and windows, since limits and window lengths may have changed.
   */
  restore(saved: EvaluatorState): void {
    const sameVersion = saved.ruleVersion === this.rule.version;
    const h = createHysteresisState();
    h.lastClearTs = saved.h.lastClearTs;
    if (saved.h.phase === "active" && saved.h.alert !== null) {
      h.phase = "active";
      h.alert = { ...saved.h.alert };
      if (sameVersion) h.sinceTs = saved.h.sinceTs;
    } else if (sameVersion) {
      h.sinceTs = saved.h.sinceTs;
      h.pendingPeak = saved.h.pendingPeak;
    }
    this.state.h = h;
    if (sameVersion) {
      const schema = this.windowSchema();
      if (schema !== null) {
        const parsed = schema.safeParse(saved.w);
        if (parsed.success) this.state.w = parsed.data;
      }
    }
  }
}

export const noWindowSchema = null;
