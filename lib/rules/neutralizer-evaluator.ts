// The effect_loss evaluator: how much a neutralizer reduces charge, from the field meters
// before and after it, independent of which meter's data arrives first. Kind by kind: evaluators.ts.
import { type AlertRecord, type EffectWindowState, effectWindowStateSchema } from "./engine-state";
import { MAX_CROSS_SENSOR_LAG_MS, MAX_PENDING_EVALUATIONS, type EvalContext, readingKey, subjectKeyOfNeutralizer, BaseEvaluator } from "./evaluator-base";
import { formatDuration, formatMagnitude, formatPercentFraction } from "./format";
import { stepHysteresis } from "./hysteresis";
import type { NeutralizerInfo } from "./topology-index";
import type { AlertTransition, EffectLossRule, Reading, TransitionType } from "./types";
import { createMeanBuffer, getWindowMean, pushMeanSample, trimMeanBuffer } from "./windows";

export class EffectLossEvaluator extends BaseEvaluator<EffectLossRule, EffectWindowState> {
  readonly worse = "lower";
  private meanBeforeKv = 0;
  private meanAfterKv = 0;
  private stoppedClear = false;
  private readonly beforeKey: string;

  constructor(rule: EffectLossRule, readonly neutralizer: NeutralizerInfo) {
    const beforeKey = neutralizer.before.fieldMeterSensorKey ?? "";
    const afterKey = neutralizer.after.fieldMeterSensorKey ?? "";
    super(rule, subjectKeyOfNeutralizer(neutralizer.neutralizerId), "fraction", neutralizer.lineId, [
      readingKey(beforeKey, "charge_kv"),
      readingKey(afterKey, "charge_kv"),
    ]);
    this.beforeKey = beforeKey;
  }
  createWindow(): EffectWindowState {
    return { before: createMeanBuffer(), after: createMeanBuffer(), pending: [] };
  }
  windowSchema() {
    return effectWindowStateSchema;
  }
  onReading(reading: Reading, ctx: EvalContext, out: AlertTransition[]): void {
    const w = this.state.w;
    if (reading.sensorKey === this.beforeKey) {
      pushMeanSample(w.before, reading.ts, reading.value);
    } else {
      pushMeanSample(w.after, reading.ts, reading.value);
      w.pending.push(reading.ts);
    }
    const beforeLastTs = w.before.lastTs;
    while (w.pending.length > 0 && beforeLastTs !== null && w.pending[0] <= beforeLastTs) {
      const t = w.pending.shift();
      if (t !== undefined) this.evaluateAt(t, ctx, out);
    }
    this.trim();
  }

  private evaluateAt(t: number, ctx: EvalContext, out: AlertTransition[]): void {
    const { windowS, minReductionFraction, clearReductionFraction, minBeforeKv } = this.rule.params;
    const windowMs = windowS * 1000;
    const [running, stopped, floorTs] = this.gate(ctx, t);
    const meanBefore = getWindowMean(this.state.w.before, t, windowMs, floorTs);
    const meanAfter = getWindowMean(this.state.w.after, t, windowMs, floorTs);
    if (meanBefore === null || meanAfter === null || meanBefore < minBeforeKv) {
      // Not judged: too little data, or too little charge before the neutralizer.
      this.stoppedClear = stopped;
      stepHysteresis(this, t, false, stopped, null, undefined, out);
      return;
    }
    this.meanBeforeKv = meanBefore;
    this.meanAfterKv = meanAfter;
    const reduction = 1 - meanAfter / meanBefore;
    const valueClear = reduction >= (clearReductionFraction ?? minReductionFraction);
    this.stoppedClear = stopped && !valueClear;
    stepHysteresis(this, t, running && reduction < minReductionFraction, valueClear || stopped, reduction, undefined, out);
  }

  /** Keep only what future evaluations can still need (see MAX_CROSS_SENSOR_LAG_MS). */
  private trim(): void {
    const w = this.state.w;
    const windowMs = this.rule.params.windowS * 1000;
    if (w.after.lastTs !== null) {
      while (w.pending.length > 0 && w.after.lastTs - w.pending[0] > MAX_CROSS_SENSOR_LAG_MS) w.pending.shift();
    }
    if (w.pending.length > MAX_PENDING_EVALUATIONS) w.pending.splice(0, w.pending.length - MAX_PENDING_EVALUATIONS);
    const nextEvaluationTs = w.pending.length > 0 ? w.pending[0] : w.after.lastTs;
    if (nextEvaluationTs !== null) trimMeanBuffer(w.after, nextEvaluationTs - windowMs);
    if (w.before.lastTs !== null) {
      const lagFloor = w.before.lastTs - windowMs - MAX_CROSS_SENSOR_LAG_MS;
      const needed = nextEvaluationTs !== null ? nextEvaluationTs - windowMs : lagFloor;
      trimMeanBuffer(w.before, Math.max(lagFloor, Math.min(needed, w.before.lastTs - windowMs)));
    }
  }

  describe(type: TransitionType, alert: AlertRecord): string {
    const { windowS, minReductionFraction, clearReductionFraction } = this.rule.params;
    const label = this.neutralizer.label;
    const span = formatDuration(windowS * 1000);
    const means = `mean ${formatMagnitude(this.meanBeforeKv)} kV before, ${formatMagnitude(this.meanAfterKv)} kV after over ${span}`;
    if (type === "clear") {
      if (this.stoppedClear) {
        return `${this.neutralizer.after.lineName} stopped; effect alert for ${label} cleared (worst reduction ${formatPercentFraction(alert.peakValue)})`;
      }
      return `${label} works again: reduces charge ${formatPercentFraction(alert.value)} (${means}; clear at ${formatPercentFraction(clearReductionFraction ?? minReductionFraction)})`;
    }
    if (alert.value < 0) {
      return `${label} is not reducing charge: charge after it is higher than before it (${means}; needs ${formatPercentFraction(minReductionFraction)} less)`;
    }
    return `${label} reduces charge only ${formatPercentFraction(alert.value)} (${means}; needs ${formatPercentFraction(minReductionFraction)})`;
  }
}
