// Evaluators for a hall's humidity: rh_low (RH under a limit) and rh_forecast (the fitted RH
// line reaches the limit within the horizon). Kind by kind: evaluators.ts.
import { type AlertRecord, type SampleWindowState, sampleWindowStateSchema } from "./engine-state";
import { type EvalContext, readingKey, subjectKeyOfArea, BaseEvaluator, noWindowSchema } from "./evaluator-base";
import { formatDuration, formatLimit, formatMagnitude, formatSigned } from "./format";
import { stepHysteresis } from "./hysteresis";
import type { AreaInfo } from "./topology-index";
import type { AlertTransition, Reading, RhForecastRule, RhLowRule, TransitionType } from "./types";
import { createSampleWindow, fitSampleWindow, getFittedValue, isSampleWindowFull, pushSample } from "./windows";

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
