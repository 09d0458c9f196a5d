// Number wording for alerts (pages and e-mails alike): a kind's value with its unit, durations.
// Plain TS, no JSX, so the mailer can use it.
import type { RuleKindName } from "./labels";

const MINUS = "\u2212";

function signed(v: number, decimals = 1): string {
  const text = Math.abs(v).toFixed(decimals);
  return v < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}

/** "−14.2 kV", "3.1 kV/min", "27.4 %", "4 min 10 s silent", "reduction 31 %". */
export function formatAlertValue(kind: RuleKindName, value: number | null): string {
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
      return `${formatDurationMs(value * 1000)} silent`;
    case "sensor_flat":
      return `range ${Number(value.toFixed(3))}`;
    case "effect_loss":
      return `reduction ${signed(value * 100, 0)} %`;
  }
}

/** "45 s", "12 min", "3 h 05 min", "2 d 4 h". */
export function formatDurationMs(ms: number): string {
  const s = Math.max(0, Math.round(ms / 1000));
  if (s < 90) return `${s} s`;
  const min = Math.round(s / 60);
  if (min < 90) return `${min} min`;
  const h = Math.floor(min / 60);
  if (h < 48) return `${h} h ${String(min % 60).padStart(2, "0")} min`;
  return `${Math.floor(h / 24)} d ${h % 24} h`;
}
