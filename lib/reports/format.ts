/**
 * Wording of figures in reports, e-mails and CSV: times in the plant's time zone, signed
 * charges with a true minus sign, durations. Pure.
 */
import { tz } from "@date-fns/tz";
import { format } from "date-fns";
import { formatSigned } from "../rules/format";

export { formatDuration } from "../vocabulary/durations";

/** "14:05" (or another date-fns pattern) in the plant's time zone. */
export function formatTs(ts: number, timeZone: string, pattern = "HH:mm"): string {
  return format(ts, pattern, { in: tz(timeZone) });
}

/** "Mon 12 Jan 14:05" in the plant's time zone. */
export function formatDayTime(ts: number, timeZone: string): string {
  return formatTs(ts, timeZone, "EEE d MMM HH:mm");
}

/** "12 Jan 2026" in the plant's time zone. */
export function formatDay(ts: number, timeZone: string): string {
  return formatTs(ts, timeZone, "d MMM yyyy");
}

/** "2026-01-12 14:05:09" local, for CSV cells. */
export function formatCsvTime(ts: number | null | undefined, timeZone: string): string {
  return ts === null || ts === undefined ? "" : formatTs(ts, timeZone, "yyyy-MM-dd HH:mm:ss");
}

/** A charge with its sign always shown: "+12.3 kV", "−4.0 kV". */
export function formatKv(value: number, decimals = 1): string {
  const text = formatSigned(value, decimals);
  return `${value > 0 && Number(Math.abs(value).toFixed(decimals)) !== 0 ? "+" : ""}${text} kV`;
}

export function formatPct(value: number, decimals = 1): string {
  return `${value.toFixed(decimals)} %`;
}

/** Share of a whole as a whole-number percentage, "—" for an empty whole. */
export function formatShare(part: number, whole: number): string {
  if (!(whole > 0)) return "—";
  return `${Math.round((100 * part) / whole)} %`;
}
