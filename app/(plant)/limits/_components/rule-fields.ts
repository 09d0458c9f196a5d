// What the limits editor asks for, per kind of rule: the parameter fields with their units and
// the words that explain them. Validation itself is the rules engine's schema, on the server.
import type { RuleKind } from "@/lib/vocabulary";

export type ParamField = {
  key: string;
  label: string;
  unit: string;
  hint?: string;
  step?: string;
  optional?: boolean;
  /** a select instead of a number */
  choices?: Array<{ value: string; label: string }>;
  /** shown as a percentage but stored as a fraction */
  percentOfFraction?: boolean;
};

export const PARAM_FIELDS: Record<RuleKind, ParamField[]> = {
  charge_high: [
    { key: "limitKv", label: "Limit", unit: "kV", hint: "Raised when |charge| stays above this for the on-delay.", step: "0.1" },
    { key: "clearKv", label: "Clear level", unit: "kV", hint: "Clears when |charge| is back below this (below the limit: the deadband).", step: "0.1" },
  ],
  charge_rate: [
    { key: "rateKvPerMin", label: "Rate limit", unit: "kV/min", hint: "Raised when |charge| grows faster than this (least-squares slope).", step: "0.1" },
    { key: "clearRateKvPerMin", label: "Clear rate", unit: "kV/min", hint: "Clears when it grows slower than this.", step: "0.1" },
    { key: "windowS", label: "Trend window", unit: "s", hint: "How much recent data the slope is fitted over.", step: "1" },
  ],
  rh_low: [
    { key: "limitPct", label: "Limit", unit: "% RH", hint: "Raised when the hall's humidity stays below this.", step: "0.5" },
    { key: "clearPct", label: "Clear level", unit: "% RH", hint: "Clears when it is back above this (above the limit: the deadband).", step: "0.5" },
  ],
  rh_forecast: [
    { key: "limitPct", label: "Humidity limit", unit: "% RH", hint: "The level the trend is projected against.", step: "0.5" },
    { key: "horizonMin", label: "Warn this far ahead", unit: "min", hint: "Raised when the trend line reaches the limit within this time.", step: "1" },
    { key: "windowMin", label: "Trend window", unit: "min", hint: "How much recent data the trend is fitted over.", step: "1" },
    { key: "clearMarginPct", label: "Clear margin", unit: "% RH", hint: "Clears when the projection is this far above the limit.", step: "0.5", optional: true },
  ],
  sensor_silent: [{ key: "silentS", label: "Silent after", unit: "s", hint: "Raised when no reading of any channel arrives for this long.", step: "1" }],
  sensor_flat: [
    {
      key: "channel",
      label: "Channel",
      unit: "",
      choices: [
        { value: "charge_kv", label: "Charge (kV)" },
        { value: "rh_pct", label: "Relative humidity (%)" },
        { value: "temp_c", label: "Temperature (°C)" },
        { value: "speed_mpm", label: "Speed (m/min)" },
      ],
    },
    { key: "windowS", label: "Window", unit: "s", hint: "A full window is judged.", step: "1" },
    { key: "tolerance", label: "Flat if it varies at most", unit: "(channel unit)", step: "0.01" },
    { key: "clearTolerance", label: "Clear when it varies more than", unit: "(channel unit)", step: "0.01", optional: true },
  ],
  effect_loss: [
    { key: "minReductionFraction", label: "Needed reduction", unit: "%", hint: "Raised when charge after the neutralizer is not this much lower than before it.", step: "1", percentOfFraction: true },
    { key: "clearReductionFraction", label: "Clear at reduction", unit: "%", step: "1", optional: true, percentOfFraction: true },
    { key: "windowS", label: "Averaging window", unit: "s", step: "1" },
    { key: "minBeforeKv", label: "Judge only above", unit: "kV before", hint: "Below this mean charge before the neutralizer there is too little to judge.", step: "0.1", optional: true },
  ],
};

/** Kinds whose subjects are halls: they can be set plant-wide or per hall only. */
export const HALL_KINDS: ReadonlySet<RuleKind> = new Set(["rh_low", "rh_forecast"]);
/** Kinds that never depend on the line running. */
export const NOT_LINE_GATED: ReadonlySet<RuleKind> = new Set(["rh_low", "rh_forecast", "sensor_silent"]);

export function summarizeParams(kind: RuleKind, params: unknown): string {
  if (!params || typeof params !== "object") return "";
  const p = Object.fromEntries(Object.entries(params));
  const n = (k: string) => (typeof p[k] === "number" ? String(p[k]) : "–");
  const pct = (k: string) => (typeof p[k] === "number" ? `${Math.round(Number(p[k]) * 100)} %` : "–");
  switch (kind) {
    case "charge_high":
      return `over ${n("limitKv")} kV, clear under ${n("clearKv")} kV`;
    case "charge_rate":
      return `rising over ${n("rateKvPerMin")} kV/min (clear under ${n("clearRateKvPerMin")}) over ${n("windowS")} s`;
    case "rh_low":
      return `under ${n("limitPct")} %, clear over ${n("clearPct")} %`;
    case "rh_forecast":
      return `reaching ${n("limitPct")} % within ${n("horizonMin")} min (trend over ${n("windowMin")} min)`;
    case "sensor_silent":
      return `no data for ${n("silentS")} s`;
    case "sensor_flat":
      return `${typeof p.channel === "string" ? p.channel : "charge_kv"} varies ≤ ${n("tolerance")} over ${n("windowS")} s`;
    case "effect_loss":
      return `reduction under ${pct("minReductionFraction")} over ${n("windowS")} s`;
  }
}
