// Plant time: clock times, calendar days, shifts and weeks in the plant's own time zone (plant
// settings, lib/plant-settings.ts), whatever zone the server or the browser runs in. The one
// plant-time module for the Floor, the charts, the reports, the mailer and the equipment pages.
//
// Shifts are given by their local start times; a shift ends where the next one starts, so on
// the days the clocks change one shift is an hour shorter or longer — as the people on it live
// it (the Night shift on the night the clocks go forward is 7 h, on the night they go back 9 h).
// Each local wall-clock time is built with TZDate; a start time inside the spring-forward gap
// moves to the first moment after the gap. Two shifts listed with the same start time: the
// later in the list wins (the first would have no length). Pure: date-fns + @date-fns/tz only.
import { TZDate, tz } from "@date-fns/tz";
import { format } from "date-fns";

export type ShiftDefinition = { name: string; start: string };
export type ShiftSpec = { timeZone: string; shifts: readonly ShiftDefinition[] };

export type ShiftWindow = {
  name: string;
  /** index in the settings' shift list */
  index: number;
  /** local calendar date on which the shift starts, YYYY-MM-DD */
  date: string;
  startTs: number;
  endTs: number;
  timeZone: string;
};

export type DateWindow = { startTs: number; endTs: number; timeZone: string; firstDate: string; lastDate: string };

const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;
const HHMM_RE = /^([01]?\d|2[0-3]):([0-5]\d)$/;

// ---------------------------------------------------------------------------------------------
// Zones, clock times and calendar dates

/** True when the runtime knows this IANA zone name. */
export function isValidTimeZone(timeZone: string): boolean {
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone }).format(0);
    return true;
  } catch {
    return false;
  }
}

/** A plant-local clock string, e.g. "14:02" or "Tue 6 Jan 14:02" (date-fns pattern). */
export function formatPlantTime(ts: number, timeZone: string, pattern = "HH:mm"): string {
  return format(ts, pattern, { in: tz(timeZone) });
}

/**
 * "14:02" when `ts` is on the same plant day as `nowTs`, else "6 Jan 14:02"; for empty states
 * such as "No readings from this sensor since 14:02".
 */
export function formatPlantSince(ts: number, nowTs: number, timeZone: string): string {
  const sameDay = localDateOf(ts, timeZone) === localDateOf(nowTs, timeZone);
  return formatPlantTime(ts, timeZone, sameDay ? "HH:mm" : "d MMM HH:mm");
}

/** Value for an <input type="datetime-local"> showing `ts` in plant time ("2026-01-06T14:02"). */
export function toPlantLocalInput(ts: number, timeZone: string): string {
  return formatPlantTime(ts, timeZone, "yyyy-MM-dd'T'HH:mm");
}

/** Reads "YYYY-MM-DDTHH:MM" (as typed in plant time) back to epoch ms; null when unreadable. */
export function fromPlantLocalInput(text: string, timeZone: string): number | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(text.trim());
  if (!m) return null;
  const [y, mo, d, h, mi, s] = [m[1], m[2], m[3], m[4], m[5], m[6] ?? "0"].map(Number);
  if (mo < 1 || mo > 12 || d < 1 || d > 31 || h > 23 || mi > 59 || s > 59) return null;
  const ts = new TZDate(y, mo - 1, d, h, mi, s, timeZone).getTime();
  return Number.isFinite(ts) ? ts : null;
}

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

/** YYYY-MM-DD plus (or minus) whole days, on the calendar (no time zone involved). */
export function addDaysToDate(date: string, days: number): string {
  const { y, m, d } = parseDate(date);
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10);
}

/** The instant of a local wall-clock time on a local date in `timeZone`, epoch ms. */
export function localTimeToTs(date: string, minutesAfterMidnight: number, timeZone: string): number {
  const { y, m, d } = parseDate(date);
  return new TZDate(y, m - 1, d, Math.floor(minutesAfterMidnight / 60), minutesAfterMidnight % 60, timeZone).getTime();
}

/** Local calendar date (YYYY-MM-DD) of an instant in `timeZone`. */
export function localDateOf(ts: number, timeZone: string): string {
  return formatPlantTime(ts, timeZone, "yyyy-MM-dd");
}

/** The plant day before the one holding `nowMs`: its date and [fromTs, toTs), with the local hour and weekday now. */
export function previousPlantDay(nowMs: number, timeZone: string): { date: string; fromTs: number; toTs: number; hourNow: number; weekday: number } {
  const today = localDateOf(nowMs, timeZone);
  const date = addDaysToDate(today, -1);
  const local = new TZDate(nowMs, timeZone);
  return { date, fromTs: localTimeToTs(date, 0, timeZone), toTs: localTimeToTs(today, 0, timeZone), hourNow: local.getHours(), weekday: local.getDay() };
}

// ---------------------------------------------------------------------------------------------
// Shifts

function minutesOf(hhmm: string): number {
  const m = HHMM_RE.exec(hhmm.trim());
  if (!m) throw new RangeError(`A shift start must be HH:MM, 24-hour (got ${JSON.stringify(hhmm)}).`);
  return Number(m[1]) * 60 + Number(m[2]);
}

/** The shifts in order of start time, a same-time duplicate giving way to the later one in the list. */
function orderedShifts(spec: ShiftSpec): { name: string; index: number; minutes: number }[] {
  if (spec.shifts.length === 0) throw new RangeError("The plant has no shifts defined.");
  const list = spec.shifts.map((s, index) => ({ name: s.name, index, minutes: minutesOf(s.start) })).sort((a, b) => a.minutes - b.minutes || a.index - b.index);
  return list.filter((s, i) => i === list.length - 1 || list[i + 1].minutes !== s.minutes);
}

/** The shifts that start on a local date, in order of start time. */
export function shiftsOfDate(date: string, spec: ShiftSpec): ShiftWindow[] {
  const list = orderedShifts(spec);
  return list.map((s, i) => {
    const next = list[i + 1];
    const startTs = localTimeToTs(date, s.minutes, spec.timeZone);
    const endTs = next ? localTimeToTs(date, next.minutes, spec.timeZone) : localTimeToTs(addDaysToDate(date, 1), list[0].minutes, spec.timeZone);
    return { name: s.name, index: s.index, date, startTs, endTs, timeZone: spec.timeZone };
  });
}

/** The named shift starting on a local date, or null when the plant has no shift of that name. */
export function shiftWindowFor(date: string, shiftName: string, spec: ShiftSpec): ShiftWindow | null {
  return shiftsOfDate(date, spec).find((s) => s.name === shiftName) ?? null;
}

/** The shift running at `ts` (start ≤ ts < end). */
export function shiftAt(ts: number, spec: ShiftSpec): ShiftWindow {
  const today = localDateOf(ts, spec.timeZone);
  // the shift holding ts started today or (e.g. the night shift) yesterday
  const candidates = [...shiftsOfDate(addDaysToDate(today, -1), spec), ...shiftsOfDate(today, spec)];
  const hit = candidates.find((s) => s.startTs <= ts && ts < s.endTs);
  if (!hit) throw new RangeError("No shift contains this time; check the plant's shift settings.");
  return hit;
}

/** The shifts overlapping [fromTs, toTs), oldest first. */
export function shiftsBetween(fromTs: number, toTs: number, spec: ShiftSpec, max = 500): ShiftWindow[] {
  const out: ShiftWindow[] = [];
  let cursor = fromTs;
  while (cursor < toTs && out.length < max) {
    const s = shiftAt(cursor, spec);
    out.push(s);
    cursor = s.endTs;
  }
  return out;
}

export function previousShift(window: ShiftWindow, spec: ShiftSpec): ShiftWindow {
  return shiftAt(window.startTs - 1, spec);
}

export function nextShift(window: ShiftWindow, spec: ShiftSpec): ShiftWindow {
  return shiftAt(window.endTs, spec);
}

/** The last shift that has ended by `nowTs` (the one a handover is written for; the equipment pages' "last shift"). */
export function lastCompletedShift(nowTs: number, spec: ShiftSpec): ShiftWindow {
  return previousShift(shiftAt(nowTs, spec), spec);
}

/** "Early · Mon 12 Jan 2026, 06:00–14:00" in the plant's time zone. */
export function describeShift(window: ShiftWindow): string {
  const day = formatPlantTime(window.startTs, window.timeZone, "EEE d MMM yyyy");
  const from = formatPlantTime(window.startTs, window.timeZone, "HH:mm");
  const to = formatPlantTime(window.endTs, window.timeZone, "HH:mm");
  const endDay = localDateOf(window.endTs, window.timeZone);
  return `${window.name} · ${day}, ${from}–${to}${endDay !== window.date ? " next day" : ""}`;
}

// ---------------------------------------------------------------------------------------------
// Weeks and date ranges

/** Monday of the ISO week holding a local date (YYYY-MM-DD). */
export function mondayOf(date: string): string {
  const { y, m, d } = parseDate(date);
  const dow = new Date(Date.UTC(y, m - 1, d)).getUTCDay(); // 0 = Sunday
  return addDaysToDate(date, -((dow + 6) % 7));
}

/** The local ISO week (Monday 00:00 to the next Monday 00:00) holding a local date. */
export function weekWindow(date: string, timeZone: string): DateWindow {
  const monday = mondayOf(date);
  return {
    startTs: localTimeToTs(monday, 0, timeZone),
    endTs: localTimeToTs(addDaysToDate(monday, 7), 0, timeZone),
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
