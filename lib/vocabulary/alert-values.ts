// An alert's value in words, with its kind's unit (alert list, e-mails, the limits replay).
import { formatDuration } from "./durations";
import type { RuleKind } from "./rule-kinds";

const MINUS = "\u2212";

function signed(v: number, decimals = 1): string {
  const text = Math.abs(v).toFixed(decimals);
  return v < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}

/** "−14.2 kV", "3.1 kV/min", "27.4 % RH", "2 min 30 s silent", "reduction 31 %". */
export function formatAlertValue(kind: RuleKind, value: number | null): string {
  if (value === null || !Number.isFinite(value)) return "–";
  switch (kind) {
    case "charge_high":
      return `${signed(value)} kV`;
    case "charge_rate":
      return `${signed(value)} kV/min`;
    case "rh_low":
    case "rh_forecast":
      return `${value.toFixed(1)} % RH`;
    case "sensor_silent":
      return `${formatDuration(value * 1000)} silent`;
    case "sensor_flat":
      return `range ${Number(value.toFixed(3))}`;
    case "effect_loss":
      return `reduction ${signed(value * 100, 0)} %`;
  }
}
