// Reading single cells of an instrument's CSV export: numbers with decimal commas, typographic
// minus signs or units, and dates in the usual orders, in plant time unless a zone is written.
import { TZDate } from "@date-fns/tz";
import type { DateOrder } from "./fields";

/** "12,5" with decimal commas, "−3.4" with a typographic minus, "+12" and "12.5 s" all read. */
export function parseNumberCell(cell: string, decimalComma: boolean): number | null {
  let s = cell.trim().replace(/[\u2212\u2013]/g, "-").replace(/\s+/g, "");
  s = s.replace(/(ms|s|sec|mv|v|mm|cm|in|°c|°f|%rh|%)$/i, "");
  if (decimalComma) {
    if (/^[+-]?\d{1,3}(\.\d{3})+(,\d+)?$/.test(s)) s = s.replace(/\./g, "");
    s = s.replace(",", ".");
  }
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

export const DMY_OR_MDY = /^(\d{1,2})[./-](\d{1,2})[./-](\d{4}|\d{2})$/;
const YMD = /^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})$/;
const TIME = /^(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,3}))?)?\s*(am|pm)?$/i;

function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

/**
 * Epoch ms of a date/time cell, or a reason it cannot be read. Accepted: ISO 8601 with a zone
 * (taken as is); "YYYY-MM-DD[ T]HH:MM[:SS]", "DD/MM/YYYY HH:MM", "DD.MM.YYYY HH:MM" and
 * "MM/DD/YYYY" (per `dateOrder`) in plant local time; epoch seconds or milliseconds.
 */
export function parseDateCell(dateCell: string, timeCell: string | null, dateOrder: DateOrder, timeZone: string): { ok: true; ts: number } | { ok: false; reason: string } {
  const raw = `${dateCell.trim()}${timeCell !== null && timeCell.trim() ? ` ${timeCell.trim()}` : ""}`;
  const bad = (why = "is not a date this import can read") => ({ ok: false as const, reason: `date "${raw}" ${why}` });
  if (!dateCell.trim()) return { ok: false, reason: "no date" };

  if (/^\d{10}$/.test(raw)) return { ok: true, ts: Number(raw) * 1000 };
  if (/^\d{13}$/.test(raw)) return { ok: true, ts: Number(raw) };

  // ISO 8601 with an explicit zone
  if (/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/i.test(raw)) {
    const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(raw)!;
    if (!validParts(+m[1], +m[2], +m[3], +m[4], +m[5], 0)) return bad("is not a valid date");
    const ts = Date.parse(raw);
    return Number.isFinite(ts) ? { ok: true, ts } : bad();
  }

  const [datePart, ...rest] = raw.replace("T", " ").split(/\s+/);
  const timePart = rest.join(" ");
  let year: number, month: number, day: number;
  let m = YMD.exec(datePart);
  if (m) {
    [year, month, day] = [+m[1], +m[2], +m[3]];
  } else if ((m = DMY_OR_MDY.exec(datePart))) {
    const a = +m[1];
    const b = +m[2];
    year = m[3].length === 2 ? 2000 + +m[3] : +m[3];
    [day, month] = dateOrder === "dmy" ? [a, b] : [b, a];
  } else return bad();

  let hour = 0,
    minute = 0,
    second = 0,
    ms = 0;
  if (timePart) {
    const t = TIME.exec(timePart);
    if (!t) return bad();
    hour = +t[1];
    minute = +t[2];
    second = t[3] ? +t[3] : 0;
    ms = t[4] ? Math.round(Number(`0.${t[4]}`) * 1000) : 0;
    if (t[5]) {
      if (hour < 1 || hour > 12) return bad("is not a valid date");
      const pm = t[5].toLowerCase() === "pm";
      hour = (hour % 12) + (pm ? 12 : 0);
    }
  }
  if (!validParts(year, month, day, hour, minute, second)) return bad("is not a valid date");
  const ts = new TZDate(year, month - 1, day, hour, minute, second, ms, timeZone).getTime();
  return Number.isFinite(ts) ? { ok: true, ts } : bad();
}

function validParts(year: number, month: number, day: number, hour: number, minute: number, second: number): boolean {
  if (year < 1990 || year > 2100) return false;
  if (month < 1 || month > 12) return false;
  if (day < 1 || day > daysInMonth(year, month)) return false;
  return hour >= 0 && hour <= 23 && minute >= 0 && minute <= 59 && second >= 0 && second <= 59;
}
