// Dates, durations and figures as the equipment, checks and devices pages show them, always in
// the plant's time zone (a technician reads the plant clock, not UTC).
import { TZDate } from "@date-fns/tz";

const pad = (n: number) => String(n).padStart(2, "0");
const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

/** "3 Dec 2026" */
export function fmtDate(ts: number | null, timeZone: string): string {
  if (ts === null) return "—";
  const d = new TZDate(ts, timeZone);
  return `${d.getDate()} ${MONTHS[d.getMonth()]} ${d.getFullYear()}`;
}

/** "3 Dec 2026, 14:05" */
export function fmtDateTime(ts: number | null, timeZone: string): string {
  if (ts === null) return "—";
  const d = new TZDate(ts, timeZone);
  return `${fmtDate(ts, timeZone)}, ${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** "2026-12-03T14:05" for <input type="datetime-local"> */
export function toLocalInput(ts: number, timeZone: string): string {
  const d = new TZDate(ts, timeZone);
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** "2026-12-03" in plant time, for date inputs and comparisons with DATE columns */
export function toLocalDateIso(ts: number, timeZone: string): string {
  const d = new TZDate(ts, timeZone);
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

/** "3 Dec 2026" from a "2026-12-03" DATE column */
export function fmtIsoDate(date: string | null): string {
  if (!date) return "—";
  const [y, m, d] = date.split("-").map(Number);
  return `${d} ${MONTHS[m - 1]} ${y}`;
}

/** "just now", "12 min ago", "3 h ago", "5 days ago" */
export function fmtAgo(ts: number | null, nowMs: number): string {
  if (ts === null) return "never";
  const s = Math.max(0, Math.round((nowMs - ts) / 1000));
  if (s < 60) return "just now";
  if (s < 3600) return `${Math.round(s / 60)} min ago`;
  if (s < 86_400) return `${Math.round(s / 3600)} h ago`;
  const days = Math.round(s / 86_400);
  return days === 1 ? "1 day ago" : `${days} days ago`;
}

/** Whole days until a due time; negative when overdue by at least a whole day. */
export function wholeDaysLeft(dueTs: number, nowMs: number): number {
  return dueTs >= nowMs ? Math.floor((dueTs - nowMs) / 86_400_000) : -Math.floor((nowMs - dueTs) / 86_400_000);
}

/** "6 days overdue", "overdue", "due today", "due in 3 days" */
export function fmtDaysLeft(daysLeft: number, overdue = daysLeft < 0): string {
  if (overdue && daysLeft >= 0) return "overdue";
  if (daysLeft < 0) return `${-daysLeft} day${daysLeft === -1 ? "" : "s"} overdue`;
  if (daysLeft === 0) return "due today";
  return `due in ${daysLeft} day${daysLeft === 1 ? "" : "s"}`;
}

export function fmtNumber(v: number | null, digits = 1, unit = ""): string {
  if (v === null || !Number.isFinite(v)) return "—";
  const s = v.toFixed(digits).replace("-", "−");
  return unit ? `${s} ${unit}` : s;
}

export function fmtSigned(v: number | null, digits = 0, unit = ""): string {
  if (v === null) return "—";
  const s = `${v > 0 ? "+" : v < 0 ? "−" : "±"}${Math.abs(v).toFixed(digits)}`;
  return unit ? `${s} ${unit}` : s;
}

export function fmtBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${Math.round(n / 1024)} kB`;
  return `${(n / 1024 / 1024).toFixed(1)} MB`;
}
