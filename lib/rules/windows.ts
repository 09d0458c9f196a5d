/**
 * Sliding time windows over one sensor channel, holding only what their rule needs:
 * - sample windows (times and values) for least-squares trends (simple-statistics),
 * - range windows (monotonic queues) for max − min in O(1) amortised per reading,
 * - mean buffers (running sums) for the mean |charge| over any recent span.
 *
 * A window [t − W, t] is "full" when it holds at least MIN_WINDOW_SAMPLES readings and its
 * oldest reading is at least WINDOW_FULL_FRACTION × W before t, so that jittered sampling
 * (a 1 Hz sensor whose stamps wander by a few ms) still counts as full. Partial windows (start
 * up, or just after a gap) are not judged.
 */
import { linearRegression } from "simple-statistics";
import type { MeanBufferState, RangeWindowState, SampleWindowState } from "./engine-state";

export const WINDOW_FULL_FRACTION = 0.9;
export const MIN_WINDOW_SAMPLES = 3;

function isFull(count: number, oldestTs: number, t: number, windowMs: number): boolean {
  return count >= MIN_WINDOW_SAMPLES && t - oldestTs >= WINDOW_FULL_FRACTION * windowMs;
}

// ---------------------------------------------------------------------------------------------
// Sample window + least-squares line
// ---------------------------------------------------------------------------------------------

export function createSampleWindow(): SampleWindowState {
  return { ts: [], values: [] };
}

/** Add a reading and drop those older than `cutoff` (normally ts − window). */
export function pushSample(w: SampleWindowState, ts: number, value: number, cutoff: number): void {
  w.ts.push(ts);
  w.values.push(value);
  while (w.ts.length > 0 && w.ts[0] < cutoff) {
    w.ts.shift();
    w.values.shift();
  }
}

export function isSampleWindowFull(w: SampleWindowState, t: number, windowMs: number): boolean {
  return w.ts.length > 0 && isFull(w.ts.length, w.ts[0], t, windowMs);
}

export type FittedLine = {
  /** Slope in value units per minute. */
  slopePerMin: number;
  /** Fitted value at originTs. */
  interceptAtOrigin: number;
  /** The window's first reading time (x = 0). */
  originTs: number;
};

/** The fitted line's value at time atTs. */
export function getFittedValue(line: FittedLine, atTs: number): number {
  return line.interceptAtOrigin + line.slopePerMin * ((atTs - line.originTs) / 60_000);
}

// Re-used [x, y] pairs so that a fit allocates nothing per reading.
const pairPool: [number, number][] = [];
const pairView: [number, number][] = [];

/**
 * Least-squares line through the window (simple-statistics linearRegression), with x in
 * minutes since the window's first reading so the sums stay well conditioned.
 */
export function fitSampleWindow(w: SampleWindowState): FittedLine {
  const n = w.ts.length;
  const t0 = w.ts[0];
  while (pairPool.length < n) pairPool.push([0, 0]);
  pairView.length = n;
  for (let i = 0; i < n; i++) {
    const pair = pairPool[i];
    pair[0] = (w.ts[i] - t0) / 60_000;
    pair[1] = w.values[i];
    pairView[i] = pair;
  }
  const { m, b } = linearRegression(pairView);
  return { slopePerMin: m, interceptAtOrigin: b, originTs: t0 };
}

// ---------------------------------------------------------------------------------------------
// Range window (max − min)
// ---------------------------------------------------------------------------------------------

export function createRangeWindow(): RangeWindowState {
  return { ts: [], maxQueue: [], minQueue: [] };
}

/** Add a reading and drop those older than `cutoff` (normally ts − window). */
export function pushRange(w: RangeWindowState, ts: number, value: number, cutoff: number): void {
  w.ts.push(ts);
  while (w.maxQueue.length > 0 && w.maxQueue[w.maxQueue.length - 1][1] <= value) w.maxQueue.pop();
  w.maxQueue.push([ts, value]);
  while (w.minQueue.length > 0 && w.minQueue[w.minQueue.length - 1][1] >= value) w.minQueue.pop();
  w.minQueue.push([ts, value]);
  while (w.ts.length > 0 && w.ts[0] < cutoff) w.ts.shift();
  while (w.maxQueue.length > 0 && w.maxQueue[0][0] < cutoff) w.maxQueue.shift();
  while (w.minQueue.length > 0 && w.minQueue[0][0] < cutoff) w.minQueue.shift();
}

export function isRangeWindowFull(w: RangeWindowState, t: number, windowMs: number): boolean {
  return w.ts.length > 0 && isFull(w.ts.length, w.ts[0], t, windowMs);
}

/** max − min over the window (0 when empty). */
export function getRange(w: RangeWindowState): number {
  if (w.maxQueue.length === 0 || w.minQueue.length === 0) return 0;
  return w.maxQueue[0][1] - w.minQueue[0][1];
}

// ---------------------------------------------------------------------------------------------
// Mean buffer (mean |value| over [from, to])
// ---------------------------------------------------------------------------------------------

export function createMeanBuffer(): MeanBufferState {
  return { ts: [], cum: [], cumBefore: 0, lastTs: null };
}

export function pushMeanSample(b: MeanBufferState, ts: number, value: number): void {
  const prev = b.cum.length > 0 ? b.cum[b.cum.length - 1] : b.cumBefore;
  b.ts.push(ts);
  b.cum.push(prev + Math.abs(value));
  b.lastTs = ts;
}

/** Drop samples older than `cutoff`; re-base the running sums now and then to keep precision. */
export function trimMeanBuffer(b: MeanBufferState, cutoff: number): void {
  let drop = 0;
  while (drop < b.ts.length && b.ts[drop] < cutoff) drop++;
  if (drop > 0) {
    b.cumBefore = b.cum[drop - 1];
    b.ts.splice(0, drop);
    b.cum.splice(0, drop);
  }
  if (b.cumBefore > 1e6) {
    const base = b.cumBefore;
    for (let i = 0; i < b.cum.length; i++) b.cum[i] -= base;
    b.cumBefore = 0;
  }
}

function lowerBound(ts: number[], x: number): number {
  let lo = 0;
  let hi = ts.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (ts[mid] < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** First index whose ts is above x. */
function upperBound(ts: number[], x: number): number {
  let lo = 0;
  let hi = ts.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (ts[mid] <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Mean |value| over [max(to − windowMs, floorTs), to], or null when the readings there do not
 * make a full window of windowMs.
 */
export function getWindowMean(
  b: MeanBufferState,
  to: number,
  windowMs: number,
  floorTs = Number.NEGATIVE_INFINITY,
): number | null {
  const first = lowerBound(b.ts, Math.max(to - windowMs, floorTs));
  const last = upperBound(b.ts, to) - 1;
  const count = last - first + 1;
  if (count <= 0 || !isFull(count, b.ts[first], to, windowMs)) return null;
  const sumBefore = first > 0 ? b.cum[first - 1] : b.cumBefore;
  return (b.cum[last] - sumBefore) / count;
}
