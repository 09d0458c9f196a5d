// Plant time: shift boundaries and clock times in the plant's own time zone (from the "plant"
// settings, lib/plant-settings.ts), whatever zone the server or the browser runs in.
// Shifts are given by their local start times; a shift ends where the next one starts, so on
// the days the clocks change one shift is an hour shorter or longer — as the people on it live it.
// Pure: date-fns + @date-fns/tz only.
import { TZDate } from "@date-fns/tz";
import { format } from "date-fns";
import type { PlantSettings } from "./plant-settings";

export type ShiftSpec = Pick<PlantSettings, "timeZone" | "shifts">;

export type ShiftWindow = {
  name: string;
  /** index in the settings' shift list */
  index: number;
  startTs: number;
  endTs: number;
};

/** True when the runtime knows this IANA zone name. */
export function isValidTimeZone(timeZone: string): boolean {
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone }).format(0);
    return true;
  } catch {
    return false;
  }
}

function parseHm(hm: string): { h: number; m: number } {
  const [h, m] = hm.split(":").map(Number);
  return { h, m };
}

/** Local start instants of every shift on the plant days around `ts` (yesterday … tomorrow), sorted. */
function boundariesAround(ts: number, spec: ShiftSpec): Array<{ ts: number; index: number }> {
  const local = new TZDate(ts, spec.timeZone);
  const y = local.getFullYear();
  const mo = local.getMonth();
  const d = local.getDate();
  const out: Array<{ ts: number; index: number }> = [];
  for (let dayOffset = -1; dayOffset <= 1; dayOffset++) {
    spec.shifts.forEach((s, index) => {
      const { h, m } = parseHm(s.start);
      out.push({ ts: new TZDate(y, mo, d + dayOffset, h, m, spec.timeZone).getTime(), index });
    });
  }
  out.sort((a, b) => a.ts - b.ts || a.index - b.index);
  // two shifts with the same start time: the later in the list wins (the first has no length)
  return out.filter((b, i) => i === out.length - 1 || out[i + 1].ts !== b.ts);
}

/** The shift running at `ts`. */
export function shiftAt(ts: number, spec: ShiftSpec): ShiftWindow {
  const bounds = boundariesAround(ts, spec);
  let i = bounds.length - 1;
  while (i > 0 && bounds[i].ts > ts) i--;
  const start = bounds[i];
  // a single shift a day: it runs until the same time tomorrow
  let end = bounds[i + 1];
  if (!end) end = boundariesAround(start.ts + 36 * 3_600_000, spec).find((b) => b.ts > start.ts)!;
  return { name: spec.shifts[start.index].name, index: start.index, startTs: start.ts, endTs: end.ts };
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

/** A plant-local clock string, e.g. "14:02" or "Tue 6 Jan 14:02" (date-fns pattern). */
export function formatPlantTime(ts: number, timeZone: string, pattern = "HH:mm"): string {
  return format(new TZDate(ts, timeZone), pattern);
}

/**
 * "14:02" when `ts` is on the same plant day as `nowTs`, else "6 Jan 14:02"; for empty states
 * such as "No readings from this sensor since 14:02".
 */
export function formatPlantSince(ts: number, nowTs: number, timeZone: string): string {
  const sameDay = formatPlantTime(ts, timeZone, "yyyy-MM-dd") === formatPlantTime(nowTs, timeZone, "yyyy-MM-dd");
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
