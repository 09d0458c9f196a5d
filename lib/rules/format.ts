/**
 * Number and duration wording for alert messages (plain English, units always shown).
 */

const MINUS = "\u2212";

/** 1 decimal by default; negative numbers with a true minus sign; never "−0.0". */
export function formatSigned(value: number, decimals = 1): string {
  const text = Math.abs(value).toFixed(decimals);
  const isZero = Number(text) === 0;
  return value < 0 && !isZero ? `${MINUS}${text}` : text;
}

/** A magnitude without sign (limits, means of |charge|). */
export function formatMagnitude(value: number, decimals = 1): string {
  return Math.abs(value).toFixed(decimals);
}

/** A limit as the engineer typed it: "12", "12.5", "0.05". */
export function formatLimit(value: number): string {
  return String(Number(value.toPrecision(6)));
}

/** The one duration wording (lib/vocabulary/durations.ts). */
export { formatDuration } from "../vocabulary/durations";

/** 0.5 -> "50 %", 0.4967 -> "49.7 %" (one decimal, so 49.7 % is never shown as 50 %). */
export function formatPercentFraction(fraction: number): string {
  return `${formatLimit(Number((fraction * 100).toFixed(1)))} %`;
}
