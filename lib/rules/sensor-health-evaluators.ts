// Evaluators that watch the sensors themselves: sensor_flat (a reading that stops varying,
// stuck or disconnected) and sensor_silent (no data). Kind by kind: evaluators.ts.
import { type AlertRecord, type RangeWindowState, rangeWindowStateSchema } from "./engine-state";
import { type EvalContext, readingKey, subjectKeyOfSensor, BaseEvaluator, noWindowSchema } from "./evaluator-base";
import { formatDuration, formatLimit } from "./format";
import { clearAlert, raiseAlert, stepHysteresis } from "./hysteresis";
import type { SensorInfo } from "./topology-index";
import { type AlertTransition, CHANNEL_UNITS, type Reading, type SensorFlatRule, type SensorSilentRule, type TransitionType } from "./types";
import { createRangeWindow, getRange, isRangeWindowFull, pushRange } from "./windows";

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
