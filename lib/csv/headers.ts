// Recognising a column by its header ("Decay + (ms)", "Temp °F", "Datum") and the unit written in it.
import type { ImportField, ImportKind, UnitField, Units } from "./fields";

export function normalizeHeader(h: string): string {
  return h
    .toLowerCase()
    .replace(/[\u2212\u2013\u2014]/g, "-")
    .replace(/\s+/g, " ")
    .trim();
}

type Matcher = (h: string) => boolean;

const has = (re: RegExp): Matcher => (h) => re.test(h);
// a sign that is not a hyphen inside a word ("decay-time" has no polarity)
const isPositive: Matcher = (h) => /(^|[^a-z])(pos|positive|plus)/.test(h) || h.includes("+");
const isNegative: Matcher = (h) => !isPositive(h) && (/(^|[^a-z])(neg|negative|minus)/.test(h) || /(^|[^a-z])-|-([^a-z]|$)/.test(h));

const MATCHERS: Record<ImportField, Matcher> = {
  date: has(/^(date|datum|timestamp|date ?\/? ?time|datetime|zeit ?stempel|recorded|logged)|(^|\W)(date|timestamp)(\W|$)/),
  time: has(/^(time|time of day|uhrzeit|zeit|heure|hora|clock)(\W|$)/),
  tag: has(/neutrali[sz]er|ioni[sz](er|ing)|(^|\W)(tag|bar|equipment|asset)(\W|$)|unit id/),
  decayPos: (h) => /decay|discharge|t ?\+|t ?pos/.test(h) && isPositive(h) && !/neg|minus/.test(h),
  decayNeg: (h) => /decay|discharge|t ?-|t ?neg/.test(h) && isNegative(h),
  offset: has(/offset|balance|float/),
  plateDistance: has(/(plate|test).*dist|distance/),
  instrument: has(/instrument|meter|monitor|serial|s\/n|device/),
  temp: (h) => /temp|°c|°f|deg ?[cf]|celsius|fahrenheit/.test(h) && !/dew|frost/.test(h),
  rh: has(/(^|\W)(rh|r\.h\.|humidity|hum|feuchte)(\W|$)|%\s*rh|rel\.? ?hum/),
};

export function matchField(kind: ImportKind, header: string): ImportField | null {
  const h = normalizeHeader(header);
  if (!h) return null;
  // order matters: a "Date/Time" column is the date, "Time" alone is the time of day
  const order: ImportField[] =
    kind === "check_log" ? ["decayPos", "decayNeg", "offset", "plateDistance", "tag", "instrument", "date", "time"] : ["rh", "temp", "date", "time"];
  for (const f of order) {
    if (f === "time" && MATCHERS.date(h)) continue;
    if (MATCHERS[f](h)) return f;
  }
  return null;
}

export function unitFromHeader(field: UnitField, header: string): Units[UnitField] | null {
  const h = normalizeHeader(header);
  switch (field) {
    case "decayPos":
    case "decayNeg":
      if (/(\(|\[|\s|^)ms(\)|\]|\s|$)|milli/.test(h)) return "ms";
      if (/(\(|\[|\s)(s|sec|secs|seconds)(\)|\]|\s|$)/.test(h)) return "s";
      return null;
    case "offset":
      if (/(\(|\[|\s)mv(\)|\]|\s|$)/.test(h)) return "mV";
      if (/(\(|\[|\s)v(\)|\]|\s|$)|volt/.test(h)) return "V";
      return null;
    case "plateDistance":
      if (/(\(|\[|\s)mm(\)|\]|\s|$)/.test(h)) return "mm";
      if (/(\(|\[|\s)cm(\)|\]|\s|$)/.test(h)) return "cm";
      if (/(\(|\[|\s)(in|inch|inches|")(\)|\]|\s|$)/.test(h)) return "in";
      return null;
    case "temp":
      if (/°\s*f|deg ?f|fahrenheit|\(f\)|\[f\]/.test(h)) return "°F";
      if (/°\s*c|deg ?c|celsius|\(c\)|\[c\]/.test(h)) return "°C";
      return null;
    case "rh":
      return "%RH";
  }
}
