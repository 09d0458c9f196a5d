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
export {
  MAX_CROSS_SENSOR_LAG_MS,
  readingKey,
  subjectKeyOfArea,
  subjectKeyOfNeutralizer,
  subjectKeyOfPoint,
  subjectKeyOfSensor,
  type EvalContext,
} from "./evaluator-base";
export { ChargeHighEvaluator, ChargeRateEvaluator } from "./charge-evaluators";
export { RhForecastEvaluator, RhLowEvaluator } from "./humidity-evaluators";
export { EffectLossEvaluator } from "./neutralizer-evaluator";
export { SensorFlatEvaluator, SensorSilentEvaluator } from "./sensor-health-evaluators";
import type { ChargeHighEvaluator, ChargeRateEvaluator } from "./charge-evaluators";
import type { RhForecastEvaluator, RhLowEvaluator } from "./humidity-evaluators";
import type { EffectLossEvaluator } from "./neutralizer-evaluator";
import type { SensorFlatEvaluator, SensorSilentEvaluator } from "./sensor-health-evaluators";

export type AnyEvaluator =
  | ChargeHighEvaluator
  | ChargeRateEvaluator
  | RhLowEvaluator
  | RhForecastEvaluator
  | SensorFlatEvaluator
  | EffectLossEvaluator
  | SensorSilentEvaluator;
