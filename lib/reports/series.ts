/**
 * Time series arithmetic for reports: time spent beyond a limit, the excursions themselves, the
 * worst and the lowest reading. Pure, no I/O.
 *
 * Model (sample-and-hold): a reading stands for the time from its timestamp until the next
 * reading of the same sensor, but for no longer than `maxHoldMs`; past that the sensor is taken
 * as silent and the time counts as "no data", neither over nor under. A reading taken before the
 * window still counts for the part of its hold that falls inside the window.
 *
 * The same function serves 1-minute rollups: feed one sample per bucket with the bucket's
 * extreme value (see `bucketExtreme`) and `maxHoldMs` = 60 000; the result is then "minutes in
 * which any reading was beyond the limit", an upper bound of the true time.
 */

export type Sample = { ts: number; value: number };

/**
 * What "beyond the limit" means:
 * - 'magnitude_above': |value| > limit (charge of either polarity, limit in kV);
 * - 'below': value < limit (humidity below a minimum, %).
 * Strict, as in the rules engine: a value equal to the limit is not beyond it.
 */
export type LimitTest = { kind: "magnitude_above"; limit: number } | { kind: "below"; limit: number };

export type Window = { startTs: number; endTs: number };

export type Excursion = {
  startTs: number;
  endTs: number;
  /** The reading furthest beyond the limit during the excursion (signed for charge). */
  peakValue: number;
};

export type TimeOverLimit = {
  /** Time beyond the limit inside the window, ms. */
  overMs: number;
  /** Time covered by readings inside the window, ms (window length minus silent gaps). */
  coveredMs: number;
  /** Contiguous stretches beyond the limit, clipped to the window, oldest first. */
  excursions: Excursion[];
};

export function isBeyond(value: number, test: LimitTest): boolean {
  return test.kind === "magnitude_above" ? Math.abs(value) > test.limit : value < test.limit;
}

/** How far a value is beyond the limit in the test's direction (larger is worse). */
function severityOf(value: number, test: LimitTest): number {
  return test.kind === "magnitude_above" ? Math.abs(value) : -value;
}

function assertWindow(window: Window, maxHoldMs: number): void {
  if (!Number.isFinite(window.startTs) || !Number.isFinite(window.endTs) || window.endTs < window.startTs) {
    throw new RangeError("The window must have a start before its end.");
  }
  if (!(maxHoldMs > 0)) throw new RangeError("The hold time must be above 0 ms.");
}

function sortedByTs(samples: readonly Sample[]): readonly Sample[] {
  for (let i = 1; i < samples.length; i++) {
    if (samples[i].ts < samples[i - 1].ts) return [...samples].sort((a, b) => a.ts - b.ts);
  }
  return samples;
}

/**
 * Time beyond a limit inside a window, with the coverage and the excursions (sample-and-hold,
 * each reading held until the next one or `maxHoldMs`, whichever comes first).
 */
export function timeOverLimit(samples: readonly Sample[], test: LimitTest, window: Window, maxHoldMs: number): TimeOverLimit {
  assertWindow(window, maxHoldMs);
  const list = sortedByTs(samples);
  let overMs = 0;
  let coveredMs = 0;
  const excursions: Excursion[] = [];
  for (let i = 0; i < list.length; i++) {
    const s = list[i];
    if (!Number.isFinite(s.value) || !Number.isFinite(s.ts)) continue;
    if (s.ts >= window.endTs) break;
    const nextTs = i + 1 < list.length ? list[i + 1].ts : Number.POSITIVE_INFINITY;
    const segStart = Math.max(s.ts, window.startTs);
    const segEnd = Math.min(nextTs, s.ts + maxHoldMs, window.endTs);
    if (segEnd <= segStart) continue;
    coveredMs += segEnd - segStart;
    if (!isBeyond(s.value, test)) continue;
    overMs += segEnd - segStart;
    const last = excursions[excursions.length - 1];
    if (last && last.endTs === segStart) {
      last.endTs = segEnd;
      if (severityOf(s.value, test) > severityOf(last.peakValue, test)) last.peakValue = s.value;
    } else {
      excursions.push({ startTs: segStart, endTs: segEnd, peakValue: s.value });
    }
  }
  return { overMs, coveredMs, excursions };
}

/** The reading of largest magnitude in [startTs, endTs), the earliest on a tie; null if none. */
export function worstReading(samples: readonly Sample[], window?: Window): Sample | null {
  let best: Sample | null = null;
  for (const s of samples) {
    if (!Number.isFinite(s.value)) continue;
    if (window && (s.ts < window.startTs || s.ts >= window.endTs)) continue;
    if (!best || Math.abs(s.value) > Math.abs(best.value) || (Math.abs(s.value) === Math.abs(best.value) && s.ts < best.ts)) best = s;
  }
  return best;
}

/** The lowest reading in [startTs, endTs), the earliest on a tie; null if none. */
export function lowestReading(samples: readonly Sample[], window?: Window): Sample | null {
  let best: Sample | null = null;
  for (const s of samples) {
    if (!Number.isFinite(s.value)) continue;
    if (window && (s.ts < window.startTs || s.ts >= window.endTs)) continue;
    if (!best || s.value < best.value || (s.value === best.value && s.ts < best.ts)) best = s;
  }
  return best;
}

/** The value of a rollup bucket furthest from zero (keeps its sign): max or min, whichever is larger in magnitude. */
export function bucketExtreme(min: number, max: number): number {
  return Math.abs(min) > Math.abs(max) ? min : max;
}
