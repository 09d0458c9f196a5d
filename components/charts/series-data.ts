// Turning history buckets and live samples into the column arrays uPlot draws, with explicit
// gaps (null) where a sensor sent nothing, so a silent hour is not drawn as a straight line.

/** [ts, min, mean, max] (as served by /api/history) */
export type Bucket = [number, number, number, number];
export type Sample = [number, number];

export type Columns = { xs: number[]; min: Array<number | null>; mean: Array<number | null>; max: Array<number | null> };

/** History up to the first live sample, then the live samples; only what lies in [fromTs, toTs]. */
export function mergeHistoryAndLive(history: readonly Bucket[] | undefined, live: readonly Sample[], fromTs: number, toTs: number): Bucket[] {
  const firstLive = live.length ? live[0][0] : Infinity;
  const out: Bucket[] = [];
  for (const b of history ?? []) if (b[0] >= fromTs && b[0] <= toTs && b[0] < firstLive) out.push(b);
  for (const [ts, v] of live) if (ts >= fromTs && ts <= toTs) out.push([ts, v, v, v]);
  return out;
}

/** A break in the line when two neighbours are further apart than this. */
export function gapThresholdMs(bucketMs: number): number {
  return Math.max(3 * bucketMs, 10_000);
}

export function toColumns(buckets: readonly Bucket[], gapMs: number): Columns {
  const cols: Columns = { xs: [], min: [], mean: [], max: [] };
  let prev = -Infinity;
  for (const [ts, mn, mean, mx] of buckets) {
    if (ts - prev > gapMs && cols.xs.length) {
      cols.xs.push(prev + 1);
      cols.min.push(null);
      cols.mean.push(null);
      cols.max.push(null);
    }
    cols.xs.push(ts);
    cols.min.push(mn);
    cols.mean.push(mean);
    cols.max.push(mx);
    prev = ts;
  }
  return cols;
}

/** Values of `other` at each x (nearest bucket within the tolerance), else null. */
export function alignMeans(xs: readonly number[], other: readonly Bucket[], toleranceMs: number): Array<number | null> {
  const out: Array<number | null> = [];
  let j = 0;
  for (const x of xs) {
    while (j + 1 < other.length && Math.abs(other[j + 1][0] - x) <= Math.abs(other[j][0] - x)) j++;
    const b = other[j];
    out.push(b && Math.abs(b[0] - x) <= toleranceMs ? b[2] : null);
  }
  return out;
}

/** Whether the min/max band shows anything (rollup buckets with spread). */
export function hasSpread(buckets: readonly Bucket[]): boolean {
  return buckets.some((b) => b[3] - b[1] > 1e-9);
}

/** Symmetric charge range around zero that always shows the limit. */
export function symmetricRange(min: number | null, max: number | null, limit: number | null): [number, number] {
  const m = Math.max(Math.abs(min ?? 0), Math.abs(max ?? 0), limit ? limit * 1.2 : 0, 1);
  const nice = m <= 5 ? Math.ceil(m) : m <= 20 ? Math.ceil(m / 2) * 2 : Math.ceil(m / 5) * 5;
  return [-nice, nice];
}
