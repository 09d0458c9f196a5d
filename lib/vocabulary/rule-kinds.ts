// Rule kinds and severities: the value lists (the schema's enums use them), their words, the
// state code an alert of each kind shows while active, and the severities' rank.
import type { PointState } from "./point-states";

export const RULE_KINDS = [
  "charge_high",
  "charge_rate",
  "rh_low",
  "rh_forecast",
  "sensor_silent",
  "sensor_flat",
  "effect_loss",
] as const;
export type RuleKind = (typeof RULE_KINDS)[number];

export const RULE_KIND_WORDS: Record<RuleKind, string> = {
  charge_high: "Charge over limit",
  charge_rate: "Charge rising fast",
  rh_low: "Humidity low",
  rh_forecast: "Humidity falling toward limit",
  sensor_silent: "Sensor silent",
  sensor_flat: "Sensor reading flat",
  effect_loss: "Neutralizer losing effect",
};

/**
 * The code an active alert of each kind shows: silent and flat sensors "silent"; early warnings
 * (rate, forecast) "near"; a value beyond its limit and a neutralizer that no longer works "over".
 */
export const RULE_KIND_STATE: Record<RuleKind, PointState> = {
  charge_high: "over",
  charge_rate: "near",
  rh_low: "over",
  rh_forecast: "near",
  sensor_silent: "silent",
  sensor_flat: "silent",
  effect_loss: "over",
};

export function isRuleKind(v: string): v is RuleKind {
  return (RULE_KINDS as readonly string[]).includes(v);
}

export const SEVERITIES = ["low", "medium", "high"] as const;
export type Severity = (typeof SEVERITIES)[number];

export const SEVERITY_WORDS: Record<Severity, string> = { low: "Low", medium: "Medium", high: "High" };

/** Higher is more severe. */
export const SEVERITY_RANK: Record<Severity, number> = { low: 1, medium: 2, high: 3 };

/** Most severe first, then by the given tie-break. */
export function compareSeverityDesc(a: Severity, b: Severity): number {
  return SEVERITY_RANK[b] - SEVERITY_RANK[a];
}
