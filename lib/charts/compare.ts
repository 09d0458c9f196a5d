// Compare on the line page (pure): overlay the same span of the previous shift, the day before or
// the week before on a chart. The earlier window is the shown one moved back by the offset; its
// values are laid on the shown chart's time points (the nearest earlier bucket within one bucket
// width, moved forward by the offset), so both lines share one time axis. Kept in the URL as
// ?compare=shift|day|week beside the range.
import { previousShift, shiftAt, type ShiftSpec } from "../plant-time";
import { DAY_MS } from "../vocabulary/time";

export const COMPARE_KINDS = ["shift", "day", "week"] as const;
export type CompareKind = (typeof COMPARE_KINDS)[number];

export const COMPARE_LABELS: Record<CompareKind, string> = { shift: "Previous shift", day: "Day before", week: "Week before" };

export function parseCompare(value: string | null): CompareKind | null {
  return value !== null && (COMPARE_KINDS as readonly string[]).includes(value) ? (value as CompareKind) : null;
}

/**
 * How far back the compared window lies. Day and week: 24 h and 7 × 24 h. Shift: the length of the
 * shift before the one the shown window starts in, so the shown part of this shift is laid over
 * the same part of the previous one (for three 8-hour shifts, 8 h).
 */
export function compareOffsetMs(kind: CompareKind, fromTs: number, spec: ShiftSpec): number {
  if (kind === "day") return DAY_MS;
  if (kind === "week") return 7 * DAY_MS;
  const s = shiftAt(fromTs, spec);
  return s.startTs - previousShift(s, spec).startTs;
}

/**
 * The earlier window's values on the shown chart's time points: for each x, the earlier sample at
 * or before x − offset, if it lies within `toleranceMs`; null (a gap) otherwise.
 * `earlier` is [ts, value] sorted by ts, with the earlier window's own timestamps.
 */
export function alignCompare(xs: readonly number[], earlier: ReadonlyArray<readonly [number, number | null]>, offsetMs: number, toleranceMs: number): Array<number | null> {
  const out: Array<number | null> = [];
  let j = 0;
  for (const x of xs) {
    const t = x - offsetMs;
    while (j + 1 < earlier.length && earlier[j + 1][0] <= t) j++;
    const e = earlier[j];
    out.push(e && e[0] <= t && t - e[0] <= toleranceMs ? e[1] : null);
  }
  return out;
}

/** The frozen link: a custom range of exactly the shown window, with the overlay if one is on. */
export function frozenViewQuery(fromTs: number, toTs: number, compare: CompareKind | null): string {
  return `?range=custom&from=${Math.round(fromTs)}&to=${Math.round(toTs)}${compare ? `&compare=${compare}` : ""}`;
}
