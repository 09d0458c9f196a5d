// Units and number formats for what Stillfield shows: charge (kV by default, V on request,
// always signed), temperature (°C or °F), humidity, line speed. Pure: the Floor, the line
// page, the wallboard, e-mails and reports all format through here so a value reads the same
// everywhere. Figures use the true minus sign (U+2212) so a column of signed values lines up
// with tabular figures.
import { z } from "zod";

export const CHARGE_UNITS = ["kV", "V"] as const;
export type ChargeUnit = (typeof CHARGE_UNITS)[number];
export const TEMP_UNITS = ["C", "F"] as const;
export type TempUnit = (typeof TEMP_UNITS)[number];

export const unitPrefsSchema = z.object({
  chargeUnit: z.enum(CHARGE_UNITS),
  tempUnit: z.enum(TEMP_UNITS),
});
export type UnitPrefs = z.infer<typeof unitPrefsSchema>;

export const DEFAULT_UNIT_PREFS: UnitPrefs = { chargeUnit: "kV", tempUnit: "C" };

export const MINUS = "\u2212";

export type Polarity = "pos" | "neg" | "zero";

/** Sign of a charge reading; values that round to 0.0 in the shown unit are "zero". */
export function chargePolarity(chargeKv: number, unit: ChargeUnit = "kV"): Polarity {
  const shown = unit === "kV" ? Math.round(chargeKv * 10) / 10 : Math.round(chargeKv * 1000);
  if (shown > 0) return "pos";
  if (shown < 0) return "neg";
  return "zero";
}

/** kV → the display unit's number (V = kV × 1000). */
export function chargeInUnit(chargeKv: number, unit: ChargeUnit): number {
  return unit === "V" ? chargeKv * 1000 : chargeKv;
}

/** The display unit's number → kV (for limits typed in V). */
export function chargeToKv(value: number, unit: ChargeUnit): number {
  return unit === "V" ? value / 1000 : value;
}

function signed(text: string, value: number): string {
  if (value > 0) return `+${text}`;
  if (value < 0) return `${MINUS}${text}`;
  return text;
}

/**
 * Signed charge with one decimal in kV ("+3.4", "−12.0") or whole volts ("+3400", "−12000").
 * A value rounding to zero is shown unsigned ("0.0" / "0").
 */
export function formatCharge(chargeKv: number, unit: ChargeUnit = "kV", opts: { withUnit?: boolean } = {}): string {
  if (!Number.isFinite(chargeKv)) return "–";
  const value = chargeInUnit(chargeKv, unit);
  const digits = unit === "kV" ? 1 : 0;
  const rounded = Number(value.toFixed(digits));
  const magnitude = Math.abs(rounded).toLocaleString("en-GB", { minimumFractionDigits: digits, maximumFractionDigits: digits, useGrouping: unit === "V" });
  const text = signed(magnitude, rounded);
  return opts.withUnit ? `${text} ${unit}` : text;
}

/** A limit as a magnitude with both signs, e.g. "±12.0 kV". */
export function formatChargeLimit(limitKv: number, unit: ChargeUnit = "kV"): string {
  const value = chargeInUnit(Math.abs(limitKv), unit);
  const digits = unit === "kV" ? 1 : 0;
  return `±${value.toLocaleString("en-GB", { minimumFractionDigits: digits, maximumFractionDigits: digits, useGrouping: unit === "V" })} ${unit}`;
}

/** °C → °F: F = C × 9/5 + 32 (definition of the Fahrenheit scale). */
export function celsiusToFahrenheit(tempC: number): number {
  return (tempC * 9) / 5 + 32;
}

export function tempInUnit(tempC: number, unit: TempUnit): number {
  return unit === "F" ? celsiusToFahrenheit(tempC) : tempC;
}

export function tempUnitLabel(unit: TempUnit): string {
  return unit === "F" ? "°F" : "°C";
}

/** Temperature with one decimal, e.g. "21.4 °C" or "70.5 °F". */
export function formatTemp(tempC: number, unit: TempUnit = "C", opts: { withUnit?: boolean } = { withUnit: true }): string {
  if (!Number.isFinite(tempC)) return "–";
  const v = tempInUnit(tempC, unit);
  const text = Number(v.toFixed(1)) === 0 ? "0.0" : v < 0 ? `${MINUS}${Math.abs(v).toFixed(1)}` : v.toFixed(1);
  return opts.withUnit === false ? text : `${text} ${tempUnitLabel(unit)}`;
}

/** Relative humidity with no decimals above 10 % and one below (dry halls need the detail). */
export function formatRh(rhPct: number, opts: { withUnit?: boolean } = { withUnit: true }): string {
  if (!Number.isFinite(rhPct)) return "–";
  const text = rhPct < 10 ? rhPct.toFixed(1) : rhPct.toFixed(0);
  return opts.withUnit === false ? text : `${text} %`;
}

/** Absolute humidity, g/m³, one decimal. */
export function formatAbsoluteHumidity(gPerM3: number): string {
  if (!Number.isFinite(gPerM3)) return "–";
  return `${gPerM3.toFixed(1)} g/m³`;
}

/** Line speed, whole metres per minute. */
export function formatSpeed(speedMpm: number, opts: { withUnit?: boolean } = { withUnit: true }): string {
  if (!Number.isFinite(speedMpm)) return "–";
  const text = Math.round(speedMpm).toLocaleString("en-GB");
  return opts.withUnit === false ? text : `${text} m/min`;
}

/** Parses stored unit preferences (e.g. from localStorage); falls back to the given defaults. */
export function parseUnitPrefs(raw: unknown, fallback: UnitPrefs = DEFAULT_UNIT_PREFS): UnitPrefs {
  const parsed = unitPrefsSchema.safeParse(raw);
  return parsed.success ? parsed.data : fallback;
}
