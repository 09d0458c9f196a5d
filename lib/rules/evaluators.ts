/**
 * One evaluator per (rule, subject): it keeps the rule's window for that subject, turns each
 * reading into raise/clear conditions, and words the alert messages. The shared state machine
 * is in hysteresis.ts; the engine (engine.ts) routes readings and ticks to evaluators.
 *
 * Kind by kind (what the value is, when it raises, when it clears):
 * - charge_high  value: charge_kv (signed). Raise |charge| > limitKv; clear |charge| < clearKv.
 * - charge_rate  value: rate in kV/min at which |charge| grows, from the least-squares slope of
 *                the signed charge over windowS, times the sign of the fitted charge at the
 *                window's end (so a charge moving away from zero in either polarity counts as
 *                rising, and one swinging through zero does not spike). Raise rate > limit;
 *                clear rate < clear rate. Not judged until the window is full.
 * - rh_low       value: rh_pct. Raise rh < limitPct; clear rh > clearPct.
 * - rh_forecast  value: rh_pct. Least-squares line of RH over windowMin; P = fitted RH now +
 *                slope × horizonMin. Raise when RH is still above the limit, the slope is
 *                negative and P ≤ limit (the line reaches the limit within the horizon); clear
 *                when P > limit + clearMarginPct. While RH is under the limit the alert stays
 *                until the projection recovers (the forecast came true). expectedCrossingTs is
 *                where the fitted line meets the limit, never earlier than the reading.
 * - sensor_flat  value: max − min over windowS. Raise when a full window varies by at most
 *                tolerance; clear when it varies by more than clearTolerance (default tolerance).
 * - effect_loss  value: reduction = 1 − mean|B| / mean|A| over windowS at A (before) and B
 *                (after). Raise reduction < minReductionFraction; clear reduction ≥
 *                clearReductionFraction (default minReductionFraction). When mean|A| is below
 *                minBeforeKv (default 1 kV) there is too little charge to judge: neither raise
 *                nor clear, an open alert stays. Evaluated at each B reading time t once A's
 *                readings have reached t, so the result does not depend on which sensor's data
 *                arrives first.
 * - sensor_silent see SensorSilentEvaluator.
 *
 * onlyWhileRunning: while the line is stopped the raise condition is false; an open alert clears
 * once the line has been stopped for the off-delay (or the value clears, whichever first).
 * Windowed kinds (charge_rate, sensor_flat, effect_loss) gated this way look only at readings
 * taken since the line last started, so they judge nothing until the line has run for 90 % of
 * the window after a start (no rate alert for every start-up ramp).
 */
import type { ZodType } from "zod";
import {
  createHysteresisState,
  effectWindowStateSchema,
  rangeWindowStateSchema,
  sampleWindowStateSchema,
  type AlertRecord,
  type EffectWindowState,
  type EvaluatorState,
  type RangeWindowState,
  type SampleWindowState,
} from "./engine-state";
import { formatDuration, formatLimit, formatMagnitude, formatPercentFraction, formatSigned } from "./format";
import { clearAlert, raiseAlert, stepHysteresis, type AlertHost, type WorseDirection } from "./hysteresis";
import type { AreaInfo, NeutralizerInfo, PointInfo, SensorInfo } from "./topology-index";
import {
  CHANNEL_UNITS,
  type AlertTransition,
  type ChargeHighRule,
  type ChargeRateRule,
  type EffectLossRule,
  type Reading,
  type RhForecastRule,
  type RhLowRule,
  type RuleDefinition,
  type SensorFlatRule,
  type SensorSilentRule,
  type TransitionType,
} from "./types";
import {
  createMeanBuffer,
  createRangeWindow,
  createSampleWindow,
  fitSampleWindow,
  getFittedValue,
  getRange,
  getWindowMean,
  isRangeWindowFull,
  isSampleWindowFull,
  pushMeanSample,
  pushRange,
  pushSample,
  trimMeanBuffer,
} from "./windows";

/**
 * How far one sensor's readings may run ahead of another's that the same rule combines with
 * (a neutralizer's before/after meters, a point and its line's running signal) while the
 * result stays independent of arrival order. Beyond it the engine drops what it held back.
 */
export const MAX_CROSS_SENSOR_LAG_MS = 15 * 60_000;
/** Hard cap on held-back evaluation times per neutralizer (only reached at absurd sample rates). */
const MAX_PENDING_EVALUATIONS = 100_000;

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

abstract class BaseEvaluator<R extends RuleDefinition, W> implements AlertHost {
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

const noWindowSchema = null;

// ---------------------------------------------------------------------------------------------

export class ChargeHighEvaluator extends BaseEvaluator<ChargeHighRule, null> {
  readonly worse = "magnitude";
  private stoppedClear = false;

  constructor(rule: ChargeHighRule, readonly point: PointInfo) {
    super(rule, subjectKeyOfPoint(point.pointId), "kV", point.lineId, [
      readingKey(point.fieldMeterSensorKey ?? "", "charge_kv"),
    ]);
  }
  createWindow(): null {
    return null;
  }
  windowSchema() {
    return noWindowSchema;
  }
  onReading(reading: Reading, ctx: EvalContext, out: AlertTransition[]): void {
    const t = reading.ts;
    const chargeKv = reading.value;
    const magnitudeKv = Math.abs(chargeKv);
    const [running, stopped] = this.gate(ctx, t);
    const valueClear = magnitudeKv < this.rule.params.clearKv;
    this.stoppedClear = stopped && !valueClear;
    stepHysteresis(this, t, running && magnitudeKv > this.rule.params.limitKv, valueClear || stopped, chargeKv, undefined, out);
  }
  describe(type: TransitionType, alert: AlertRecord): string {
    const { limitKv, clearKv } = this.rule.params;
    const where = this.point.label;
    if (type === "raise") return `Charge ${formatSigned(alert.value)} kV at ${where}, over the ${formatLimit(limitKv)} kV limit`;
    if (type === "update") {
      return `Charge at ${where} has reached ${formatSigned(alert.peakValue)} kV (limit ${formatLimit(limitKv)} kV); now ${formatSigned(alert.value)} kV`;
    }
    if (this.stoppedClear) {
      return `${this.point.lineName} stopped; charge alert at ${where} cleared (now ${formatSigned(alert.value)} kV, peak ${formatSigned(alert.peakValue)} kV)`;
    }
    return `Charge back to ${formatSigned(alert.value)} kV at ${where}, under the ${formatLimit(clearKv)} kV clear level (peak ${formatSigned(alert.peakValue)} kV)`;
  }
}

// ---------------------------------------------------------------------------------------------

export class ChargeRateEvaluator extends BaseEvaluator<ChargeRateRule, SampleWindowState> {
  readonly worse = "higher";
  private lastChargeKv = 0;
  private stoppedClear = false;

  constructor(rule: ChargeRateRule, readonly point: PointInfo) {
    super(rule, subjectKeyOfPoint(point.pointId), "kV/min", point.lineId, [
      readingKey(point.fieldMeterSensorKey ?? "", "charge_kv"),
    ]);
  }
  createWindow(): SampleWindowState {
    return createSampleWindow();
  }
  windowSchema() {
    return sampleWindowStateSchema;
  }
  onReading(reading: Reading, ctx: EvalContext, out: AlertTransition[]): void {
    const t = reading.ts;
    const windowMs = this.rule.params.windowS * 1000;
    const w = this.state.w;
    const [running, stopped, floorTs] = this.gate(ctx, t);
    pushSample(w, t, reading.value, Math.max(t - windowMs, floorTs));
    this.lastChargeKv = reading.value;
    if (!isSampleWindowFull(w, t, windowMs)) {
      this.stoppedClear = stopped;
      stepHysteresis(this, t, false, stopped, null, undefined, out);
      return;
    }
    const line = fitSampleWindow(w);
    const fittedNowKv = getFittedValue(line, t);
    const rateKvPerMin =
      fittedNowKv > 0 ? line.slopePerMin : fittedNowKv < 0 ? -line.slopePerMin : Math.abs(line.slopePerMin);
    const valueClear = rateKvPerMin < this.rule.params.clearRateKvPerMin;
    this.stoppedClear = stopped && !valueClear;
    stepHysteresis(this, t, running && rateKvPerMin > this.rule.params.rateKvPerMin, valueClear || stopped, rateKvPerMin, undefined, out);
  }
  describe(type: TransitionType, alert: AlertRecord): string {
    const { rateKvPerMin, clearRateKvPerMin, windowS } = this.rule.params;
    const where = this.point.label;
    const over = formatDuration(windowS * 1000);
    if (type === "raise") {
      return `Charge at ${where} rising ${formatSigned(alert.value)} kV/min over ${over} (limit ${formatLimit(rateKvPerMin)} kV/min), now ${formatSigned(this.lastChargeKv)} kV`;
    }
    if (type === "update") {
      return `Charge at ${where} rose up to ${formatSigned(alert.peakValue)} kV/min (limit ${formatLimit(rateKvPerMin)} kV/min), now ${formatSigned(this.lastChargeKv)} kV`;
    }
    if (this.stoppedClear) {
      return `${this.point.lineName} stopped; charge-rate alert at ${where} cleared (fastest ${formatSigned(alert.peakValue)} kV/min)`;
    }
    return `Charge at ${where} no longer rising fast: ${formatSigned(alert.value)} kV/min, under ${formatLimit(clearRateKvPerMin)} kV/min (fastest ${formatSigned(alert.peakValue)} kV/min)`;
  }
}

// ---------------------------------------------------------------------------------------------

export class RhLowEvaluator extends BaseEvaluator<RhLowRule, null> {
  readonly worse = "lower";

  constructor(rule: RhLowRule, readonly area: AreaInfo) {
    super(rule, subjectKeyOfArea(area.areaId), "%", null, [readingKey(area.climateSensorKey ?? "", "rh_pct")]);
  }
  createWindow(): null {
    return null;
  }
  windowSchema() {
    return noWindowSchema;
  }
  onReading(reading: Reading, _ctx: EvalContext, out: AlertTransition[]): void {
    const rhPct = reading.value;
    const { limitPct, clearPct } = this.rule.params;
    stepHysteresis(this, reading.ts, rhPct < limitPct, rhPct > clearPct, rhPct, undefined, out);
  }
  describe(type: TransitionType, alert: AlertRecord): string {
    const { limitPct, clearPct } = this.rule.params;
    const where = this.area.name;
    if (type === "raise") return `Relative humidity ${formatSigned(alert.value)} % in ${where}, under the ${formatLimit(limitPct)} % limit`;
    if (type === "update") {
      return `Relative humidity in ${where} down to ${formatSigned(alert.peakValue)} % (limit ${formatLimit(limitPct)} %); now ${formatSigned(alert.value)} %`;
    }
    return `Relative humidity back to ${formatSigned(alert.value)} % in ${where}, above the ${formatLimit(clearPct)} % clear level (lowest ${formatSigned(alert.peakValue)} %)`;
  }
}

// ---------------------------------------------------------------------------------------------

function inAbout(ms: number): string {
  const minutes = Math.round(ms / 60_000);
  return minutes < 1 ? "within a minute" : `in about ${formatDuration(minutes * 60_000)}`;
}

export class RhForecastEvaluator extends BaseEvaluator<RhForecastRule, SampleWindowState> {
  readonly worse = "lower";
  override carriesCrossing = true;
  private slopePctPerMin = 0;
  private lastTs = 0;

  constructor(rule: RhForecastRule, readonly area: AreaInfo) {
    super(rule, subjectKeyOfArea(area.areaId), "%", null, [readingKey(area.climateSensorKey ?? "", "rh_pct")]);
  }
  createWindow(): SampleWindowState {
    return createSampleWindow();
  }
  windowSchema() {
    return sampleWindowStateSchema;
  }
  onReading(reading: Reading, _ctx: EvalContext, out: AlertTransition[]): void {
    const t = reading.ts;
    const rhPct = reading.value;
    const { limitPct, horizonMin, windowMin, clearMarginPct } = this.rule.params;
    const windowMs = windowMin * 60_000;
    const w = this.state.w;
    pushSample(w, t, rhPct, t - windowMs);
    this.lastTs = t;
    if (!isSampleWindowFull(w, t, windowMs)) {
      stepHysteresis(this, t, false, false, null, undefined, out);
      return;
    }
    const line = fitSampleWindow(w);
    const slope = line.slopePerMin;
    this.slopePctPerMin = slope;
    const fittedNowPct = getFittedValue(line, t);
    const projectedPct = fittedNowPct + slope * horizonMin;
    const expectedCrossingTs =
      slope < 0 ? Math.round(t + Math.max(0, (fittedNowPct - limitPct) / -slope) * 60_000) : null;
    const raise = rhPct > limitPct && slope < 0 && projectedPct <= limitPct;
    const clear = projectedPct > limitPct + clearMarginPct;
    stepHysteresis(this, t, raise, clear, rhPct, expectedCrossingTs, out);
  }
  describe(type: TransitionType, alert: AlertRecord): string {
    const { limitPct, horizonMin } = this.rule.params;
    const where = this.area.name;
    if (type === "clear") {
      return `Relative humidity in ${where} no longer forecast to fall under ${formatLimit(limitPct)} % within ${formatDuration(horizonMin * 60_000)} (now ${formatSigned(alert.value)} %)`;
    }
    const falling = `${formatSigned(alert.value)} % and falling ${formatMagnitude(this.slopePctPerMin, 2)} %/min`;
    if (alert.expectedCrossingTs === null) {
      return `Relative humidity in ${where} is ${formatSigned(alert.value)} % and no longer falling, but not yet safely above the ${formatLimit(limitPct)} % limit`;
    }
    if (alert.value <= limitPct) {
      return `Relative humidity in ${where} has fallen to ${falling}, under the ${formatLimit(limitPct)} % limit as forecast`;
    }
    return `Relative humidity in ${where} is ${falling}: expected under the ${formatLimit(limitPct)} % limit ${inAbout(alert.expectedCrossingTs - this.lastTs)}`;
  }
}

// ---------------------------------------------------------------------------------------------

const FLAT_CHANNEL_WORDS: Record<SensorFlatRule["params"]["channel"], string> = {
  charge_kv: "charge",
  temp_c: "temperature",
  rh_pct: "relative humidity",
  speed_mpm: "speed",
};

export class SensorFlatEvaluator extends BaseEvaluator<SensorFlatRule, RangeWindowState> {
  readonly worse = "lower";
  private stoppedClear = false;

  constructor(rule: SensorFlatRule, readonly sensor: SensorInfo) {
    super(rule, subjectKeyOfSensor(sensor.sensorKey), CHANNEL_UNITS[rule.params.channel], sensor.lineId, [
      readingKey(sensor.sensorKey, rule.params.channel),
    ]);
  }
  createWindow(): RangeWindowState {
    return createRangeWindow();
  }
  windowSchema() {
    return rangeWindowStateSchema;
  }
  onReading(reading: Reading, ctx: EvalContext, out: AlertTransition[]): void {
    const t = reading.ts;
    const { windowS, tolerance, clearTolerance } = this.rule.params;
    const windowMs = windowS * 1000;
    const w = this.state.w;
    const [running, stopped, floorTs] = this.gate(ctx, t);
    pushRange(w, t, reading.value, Math.max(t - windowMs, floorTs));
    if (!isRangeWindowFull(w, t, windowMs)) {
      this.stoppedClear = stopped;
      stepHysteresis(this, t, false, stopped, null, undefined, out);
      return;
    }
    const range = getRange(w);
    const valueClear = range > (clearTolerance ?? tolerance);
    this.stoppedClear = stopped && !valueClear;
    stepHysteresis(this, t, running && range <= tolerance, valueClear || stopped, range, undefined, out);
  }
  describe(type: TransitionType, alert: AlertRecord): string {
    const { channel, windowS, tolerance } = this.rule.params;
    const word = FLAT_CHANNEL_WORDS[channel];
    const span = formatDuration(windowS * 1000);
    const unit = this.unit;
    const range = formatLimit(Number(alert.value.toFixed(3)));
    if (type === "clear") {
      if (this.stoppedClear) return `Line stopped; flat-reading alert on ${this.sensor.label} cleared`;
      return `${this.sensor.label} varies again: ${word} changed by ${range} ${unit} over ${span}`;
    }
    return `${this.sensor.label} reads flat: ${word} varied only ${range} ${unit} over ${span} (tolerance ${formatLimit(tolerance)} ${unit}); stuck or disconnected?`;
  }
}

// ---------------------------------------------------------------------------------------------

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

// ---------------------------------------------------------------------------------------------

/**
 * sensor_silent: silent at time τ when no reading of any channel arrived in the silentS before τ.
 * Transitions are computed at their exact times from reading times, so the result does not
 * depend on how often tick() is called (a tick only lets the engine notice a silence that is
 * still going on):
 * - raise at lastReadingTs + silentS + onDelayS (a sensor never heard from counts from the
 *   engine's first reading or tick);
 * - after a reading ends the silence, clear at that reading + offDelayS unless silence begins
 *   again first. value: seconds silent; peak: the longest silence.
 */
export class SensorSilentEvaluator extends BaseEvaluator<SensorSilentRule, null> {
  readonly worse = "higher";
  private neverHeard = false;

  constructor(rule: SensorSilentRule, readonly sensor: SensorInfo) {
    super(rule, subjectKeyOfSensor(sensor.sensorKey), "s", null, []);
  }
  createWindow(): null {
    return null;
  }
  windowSchema() {
    return noWindowSchema;
  }
  onReading(): void {
    // Readings reach this evaluator through advance() and onSensorReading(), driven by the engine.
  }

  private baseTs(ctx: EvalContext): number | null {
    return ctx.getSensorLastTs(this.sensor.sensorKey) ?? ctx.getStartTs();
  }

  /**
   * Emit what happens up to time `until` (strictly before it, or up to and including it).
   */
  advance(ctx: EvalContext, until: number, inclusive: boolean, out: AlertTransition[]): void {
    const base = this.baseTs(ctx);
    if (base === null) return;
    const silentMs = this.rule.params.silentS * 1000;
    const h = this.state.h;
    // At most: a pending clear fires, then a new silence raises.
    for (let step = 0; step < 2; step++) {
      if (h.phase === "normal" || h.alert === null) {
        const raiseTs = base + silentMs + this.rule.onDelayS * 1000;
        if (inclusive ? raiseTs <= until : raiseTs < until) {
          this.neverHeard = ctx.getSensorLastTs(this.sensor.sensorKey) === null;
          const silentS = (raiseTs - base) / 1000;
          raiseAlert(this, raiseTs, base + silentMs, silentS, silentS, null, out);
        }
        return;
      }
      if (h.sinceTs === null) return; // still silent; waiting for a reading
      const clearTs = h.sinceTs + this.rule.offDelayS * 1000;
      const silentAgainTs = base + silentMs;
      if (clearTs < silentAgainTs) {
        if (inclusive ? clearTs > until : clearTs >= until) return;
        clearAlert(this, clearTs, out);
        continue;
      }
      if (inclusive ? silentAgainTs <= until : silentAgainTs < until) h.sinceTs = null; // silence came back before the off-delay ran out
      return;
    }
  }

  /** A reading at t has just been recorded; `previousBaseTs` was the last one before it. */
  onSensorReading(ctx: EvalContext, t: number, previousBaseTs: number | null, out: AlertTransition[]): void {
    const h = this.state.h;
    if (h.phase === "active" && h.alert !== null) {
      if (previousBaseTs !== null) {
        const gapS = (t - previousBaseTs) / 1000;
        if (h.sinceTs === null) {
          h.alert.value = gapS;
          h.alert.peakValue = Math.max(h.alert.peakValue, gapS);
        }
      }
      if (h.sinceTs === null) h.sinceTs = t;
    }
    this.advance(ctx, t, true, out);
  }

  describe(type: TransitionType, alert: AlertRecord): string {
    const label = this.sensor.label;
    if (type === "clear") return `Data from ${label} again after ${formatDuration(alert.value * 1000)} of silence`;
    if (this.neverHeard) return `No data from ${label} since monitoring started ${formatDuration(alert.value * 1000)} ago`;
    return `No data from ${label} for ${formatDuration(alert.value * 1000)}`;
  }
}

export type AnyEvaluator =
  | ChargeHighEvaluator
  | ChargeRateEvaluator
  | RhLowEvaluator
  | RhForecastEvaluator
  | SensorFlatEvaluator
  | EffectLossEvaluator
  | SensorSilentEvaluator;
