// Words for alerts shared by the pages, the route handlers and the e-mails (plain TS, no JSX:
// the mailer process imports it too). The state codes (shape + word) come from the one set in
// components/ui/state-badge.tsx; this file only says which code each alert shows.
import { STATE_SYMBOLS, STATE_WORDS, type PointState } from "../ui/state-badge";

export const RULE_KIND_LABELS = {
  charge_high: "Charge over limit",
  charge_rate: "Charge rising fast",
  rh_low: "Humidity low",
  rh_forecast: "Humidity falling toward limit",
  sensor_silent: "Sensor silent",
  sensor_flat: "Sensor reading flat",
  effect_loss: "Neutralizer losing effect",
} as const;
export type RuleKindName = keyof typeof RULE_KIND_LABELS;

export const SEVERITY_LABELS = { low: "Low", medium: "Medium", high: "High" } as const;
export type SeverityName = keyof typeof SEVERITY_LABELS;
export const SEVERITY_RANK: Record<SeverityName, number> = { low: 1, medium: 2, high: 3 };

export const ALERT_STATE_LABELS = {
  active_unacked: "Active, not acknowledged",
  active_acked: "Active, acknowledged",
  cleared_unacked: "Cleared, not acknowledged",
  closed: "Closed",
} as const;
export type AlertStateName = keyof typeof ALERT_STATE_LABELS;

/** Short words for the state column. */
export const ALERT_STATE_SHORT: Record<AlertStateName, string> = {
  active_unacked: "Active · unacked",
  active_acked: "Active · acked",
  cleared_unacked: "Cleared · unacked",
  closed: "Closed",
};

/**
 * The state code an alert shows: shelved alerts "shelved"; a closed or cleared one "normal";
 * silent and flat sensors "silent"; charge and humidity beyond their limit, and a neutralizer
 * that no longer works, "over"; early warnings (rate, forecast) "near".
 */
export function alertStateCode(a: { kind: RuleKindName; state: AlertStateName; shelved: boolean }): PointState {
  if (a.shelved && a.state !== "closed") return "shelved";
  if (a.state === "closed" || a.state === "cleared_unacked") return "normal";
  switch (a.kind) {
    case "sensor_silent":
    case "sensor_flat":
      return "silent";
    case "charge_rate":
    case "rh_forecast":
      return "near";
    default:
      return "over";
  }
}

/** "◆ Over" — the plain-text code for e-mails. */
export function stateCodeText(code: PointState): string {
  return `${STATE_SYMBOLS[code]} ${STATE_WORDS[code]}`;
}

export function isRuleKindName(v: string): v is RuleKindName {
  return v in RULE_KIND_LABELS;
}
