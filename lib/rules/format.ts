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

/** "45 s", "5 min 41 s", "12 min", "2 h 5 min". */
export function formatDuration(ms: number): string {
  const totalS = Math.max(0, Math.round(ms / 1000));
  if (totalS < 120) return `${totalS} s`;
  if (totalS < 600) {
    const s = totalS % 60;
    return s === 0 ? `${Math.floor(totalS / 60)} min` : `${Math.floor(totalS / 60)} min ${s} s`;
  }
  const totalMin = Math.round(totalS / 60);
  if (totalMin < 120) return `${totalMin} min`;
  const h = Math.floor(totalMin / 60);
  const min = totalMin % 60;
  return min === 0 ? `${h} h` : `${h} h ${min} min`;
}

/** 0.5 -> "50 %", 0.4967 -> "49.7 %" (one decimal, so 49.7 % is never shown as 50 %). */
export function formatPercentFraction(fraction: number): string {
  return `${formatLimit(Number((fraction * 100).toFixed(1)))} %`;
}
