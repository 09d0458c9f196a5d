/**
 * Stillfield rules: pure alert logic shared by the ingest worker (live) and the limits editor
 * (backtest). See engine.ts for the engine's contract and evaluators.ts for each rule kind.
 */
export * from "./types";
export { createRuleEngine, replay, RuleEngineStateError, DEFAULT_TICK_EVERY_MS } from "./engine";
export type { CreateRuleEngineOptions, RuleEngine, ReplayOptions } from "./engine";
export { engineStateSchema, type EngineState } from "./engine-state";
export { getScopeLevel, matchesScope, resolveChargeLimit, resolveRulesForLocation } from "./scope";
export type { ResolvedRule, ScopeLevel, SubjectLocation } from "./scope";
export {
  MAX_CROSS_SENSOR_LAG_MS,
  subjectKeyOfArea,
  subjectKeyOfNeutralizer,
  subjectKeyOfPoint,
  subjectKeyOfSensor,
} from "./evaluators";
export { CHATTER_WINDOW_MS, CROSSING_SHIFT_MIN_MS, UPDATE_MIN_INTERVAL_MS } from "./hysteresis";
export { WINDOW_FULL_FRACTION, MIN_WINDOW_SAMPLES } from "./windows";
export { collectAlertEpisodes, type AlertEpisode } from "./episodes";
export { DEFAULT_RULES, DEFAULT_RULE_INPUTS } from "./defaults";
export * from "./alert-lifecycle";
