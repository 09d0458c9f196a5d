// Evaluators for charge at a measuring point: charge_high (the signed reading past a limit)
// and charge_rate (how fast |charge| grows). Kind by kind: evaluators.ts.
import { type AlertRecord, type SampleWindowState, sampleWindowStateSchema } from "./engine-state";
import { type EvalContext, readingKey, subjectKeyOfPoint, BaseEvaluator, noWindowSchema } from "./evaluator-base";
import { formatDuration, formatLimit, formatSigned } from "./format";
import { stepHysteresis } from "./hysteresis";
import type { PointInfo } from "./topology-index";
import type { AlertTransition, ChargeHighRule, ChargeRateRule, Reading, TransitionType } from "./types";
import { createSampleWindow, fitSampleWindow, getFittedValue, isSampleWindowFull, pushSample } from "./windows";

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
    // the charge's polarity from the middle of the window (the fitted line there is the window's
    // mean), not from its end: a steep drop from 15 to 3 kV extrapolates below zero at the end and
    // would read as a negative charge rising fast
    const polarityKv = getFittedValue(line, t - windowMs / 2);
    const rateKvPerMin =
      polarityKv > 0 ? line.slopePerMin : polarityKv < 0 ? -line.slopePerMin : Math.abs(line.slopePerMin);
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
