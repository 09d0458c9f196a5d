/**
 * Shift and week boundaries for reports, in the plant's time zone (plant settings: shifts as
 * local start times, a shift ends where the next begins; default Early 06:00, Late 14:00,
 * Night 22:00, Europe/London). Pure: date-fns + @date-fns/tz, no I/O.
 *
 * Daylight-saving days are handled by building each local wall-clock time with TZDate, so the
 * Night shift on the night the clocks go forward is 7 h long and on the night they go back 9 h.
 * A local start time that does not exist that night (inside the spring-forward gap) moves to
 * the first moment after the gap.
 */
import { TZDate, tz } from "@date-fns/tz";
import { format } from "date-fns";

export type ShiftDefinition = { name: string; start: string };
export type ShiftSettings = { timeZone: string; shifts: readonly ShiftDefinition[] };

export type ShiftWindow = {
  name: string;
  /** Local calendar date on which the shift starts, YYYY-MM-DD. */
  date: string;
  startTs: number;
  endTs: number;
  timeZone: string;
};

export type DateWindow = { startTs: number; endTs: number; timeZone: string; firstDate: string; lastDate: string };

const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;
const HHMM_RE = /^([01]\d|2[0-3]):([0-5]\d)$/;

function parseDate(date: string): { y: number; m: number; d: number } {
  const m = DATE_RE.exec(date);
  if (!m) throw new RangeError(`A date must be YYYY-MM-DD (got ${JSON.stringify(date)}).`);
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const check = new Date(Date.UTC(y, mo - 1, d));
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d) {
    throw new RangeError(`No such date: ${date}.`);
  }
  return { y, m: mo, d };
}

/** True for a real calendar date written YYYY-MM-DD. */
export function isValidDate(date: string): boolean {
  try {
    parseDate(date);
    return true;
  } catch {
    return false;
  }
}

function minutesOf(hhmm: string): number {
  const m = HHMM_RE.exec(hhmm);
  if (!m) throw new RangeError(`A shift start must be HH:MM, 24-hour (got ${JSON.stringify(hhmm)}).`);
  return Number(m[1]) * 60 + Number(m[2]);
}

/** YYYY-MM-DD plus (or minus) whole days, on the calendar (no time zone involved). */
export function addDaysToDate(date: string, days: number): string {
  const { y, m, d } = parseDate(date);
  const t = new Date(Date.UTC(y, m - 1, d + days));
  return t.toISOString().slice(0, 10);
}

/** The instant of a local wall-clock time on a local date in `timeZone`, epoch ms. */
export function localTimeToTs(date: string, minutesAfterMidnight: number, timeZone: string): number {
  const { y, m, d } = parseDate(date);
  return new TZDate(y, m - 1, d, Math.floor(minutesAfterMidnight / 60), minutesAfterMidnight % 60, timeZone).getTime();
}

/** Local calendar date (YYYY-MM-DD) of an instant in `timeZone`. */
export function localDateOf(ts: number, timeZone: string): string {
  return format(ts, "yyyy-MM-dd", { in: tz(timeZone) });
}

function sortedShifts(settings: ShiftSettings): { name: string; minutes: number }[] {
  if (settings.shifts.length === 0) throw new RangeError("The plant has no shifts defined.");
  const list = settings.shifts.map((s) => ({ name: s.name, minutes: minutesOf(s.start) })).sort((a, b) => a.minutes - b.minutes);
  for (let i = 1; i < list.length; i++) {
    if (list[i].minutes === list[i - 1].minutes) throw new RangeError(`Two shifts start at the same time (${list[i - 1].name}, ${list[i].name}).`);
  }
  return list;
}

/** The shifts that start on a local date, in order of start time. */
export function shiftsOfDate(date: string, settings: ShiftSettings): ShiftWindow[] {
  const list = sortedShifts(settings);
  return list.map((s, i) => {
    const next = list[i + 1];
    const startTs = localTimeToTs(date, s.minutes, settings.timeZone);
    const endTs = next
      ? localTimeToTs(date, next.minutes, settings.timeZone)
      : localTimeToTs(addDaysToDate(date, 1), list[0].minutes, settings.timeZone);
    return { name: s.name, date, startTs, endTs, timeZone: settings.timeZone };
  });
}

/** The named shift starting on a local date, or null when the plant has no shift of that name. */
export function shiftWindowFor(date: string, shiftName: string, settings: ShiftSettings): ShiftWindow | null {
  return shiftsOfDate(date, settings).find((s) => s.name === shiftName) ?? null;
}

/** The shift that contains an instant (start ≤ ts < end). */
export function shiftContaining(ts: number, settings: ShiftSettings): ShiftWindow {
  const today = localDateOf(ts, settings.timeZone);
  // a shift containing ts started today or (e.g. the night shift) yesterday
  const candidates = [...shiftsOfDate(addDaysToDate(today, -1), settings), ...shiftsOfDate(today, settings)];
  const hit = candidates.find((s) => s.startTs <= ts && ts < s.endTs);
  if (!hit) throw new RangeError("No shift contains this time; check the plant's shift settings.");
  return hit;
}

export function previousShift(window: ShiftWindow, settings: ShiftSettings): ShiftWindow {
  return shiftContaining(window.startTs - 1, settings);
}

export function nextShift(window: ShiftWindow, settings: ShiftSettings): ShiftWindow {
  return shiftContaining(window.endTs, settings);
}

/** The last shift that has ended by `nowTs` (the one a handover is usually written for). */
export function lastCompletedShift(nowTs: number, settings: ShiftSettings): ShiftWindow {
  return previousShift(shiftContaining(nowTs, settings), settings);
}

/** Monday of the ISO week holding a local date (YYYY-MM-DD). */
export function mondayOf(date: string): string {
  const { y, m, d } = parseDate(date);
  const dow = new Date(Date.UTC(y, m - 1, d)).getUTCDay(); // 0 = Sunday
  return addDaysToDate(date, -((dow + 6) % 7));
}

/** The local ISO week (Monday 00:00 to the next Monday 00:00) holding a local date. */
export function weekWindow(date: string, timeZone: string): DateWindow {
  const monday = mondayOf(date);
  const nextMonday = addDaysToDate(monday, 7);
  return {
    startTs: localTimeToTs(monday, 0, timeZone),
    endTs: localTimeToTs(nextMonday, 0, timeZone),
    timeZone,
    firstDate: monday,
    lastDate: addDaysToDate(monday, 6),
  };
}

/** Local days firstDate 00:00 to (lastDate + 1) 00:00. */
export function dateRangeWindow(firstDate: string, lastDate: string, timeZone: string): DateWindow {
  if (lastDate < firstDate) throw new RangeError("The end date is before the start date.");
  return {
    startTs: localTimeToTs(firstDate, 0, timeZone),
    endTs: localTimeToTs(addDaysToDate(lastDate, 1), 0, timeZone),
    timeZone,
    firstDate,
    lastDate,
  };
}

/** "Early · Mon 12 Jan 2026, 06:00–14:00" in the plant's time zone. */
export function describeShift(window: ShiftWindow): string {
  const zone = tz(window.timeZone);
  const day = format(window.startTs, "EEE d MMM yyyy", { in: zone });
  const from = format(window.startTs, "HH:mm", { in: zone });
  const to = format(window.endTs, "HH:mm", { in: zone });
  const endDay = localDateOf(window.endTs, window.timeZone);
  return `${window.name} · ${day}, ${from}–${to}${endDay !== window.date ? " next day" : ""}`;
}
