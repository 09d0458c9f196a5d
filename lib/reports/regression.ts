/**
 * Least-squares straight line for reports (|charge| against RH, |charge| against speed), a thin
 * wrapper around simple-statistics `linearRegression` + `rSquared` that refuses fits which mean
 * nothing (too few pairs, no spread in x) instead of returning NaN. Pure, no I/O.
 */
import { linearRegression, linearRegressionLine, rSquared } from "simple-statistics";

export type Pair = readonly [x: number, y: number];

export type LineFit = {
  /** y per unit of x (for |charge| vs RH: kV per % RH). */
  slope: number;
  /** y at x = 0. */
  intercept: number;
  /** Coefficient of determination, 0–1 for a least-squares line; null when y does not vary (nothing to explain). */
  rSquared: number | null;
  n: number;
  xMin: number;
  xMax: number;
};

/** Fewest pairs for a fit worth showing: two points always fit a line exactly. */
export const MIN_PAIRS_FOR_FIT = 3;

/**
 * Ordinary least-squares line y = slope·x + intercept through the finite pairs, with r².
 * Null with fewer than MIN_PAIRS_FOR_FIT finite pairs or when every x is the same.
 */
export function fitLeastSquares(pairs: readonly Pair[]): LineFit | null {
  const data = pairs.filter(([x, y]) => Number.isFinite(x) && Number.isFinite(y)).map(([x, y]) => [x, y]);
  if (data.length < MIN_PAIRS_FOR_FIT) return null;
  let xMin = Number.POSITIVE_INFINITY;
  let xMax = Number.NEGATIVE_INFINITY;
  let yMin = Number.POSITIVE_INFINITY;
  let yMax = Number.NEGATIVE_INFINITY;
  for (const [x, y] of data) {
    xMin = Math.min(xMin, x);
    xMax = Math.max(xMax, x);
    yMin = Math.min(yMin, y);
    yMax = Math.max(yMax, y);
  }
  if (xMin === xMax) return null;
  const { m, b } = linearRegression(data);
  const r2 = yMin === yMax ? null : rSquared(data, linearRegressionLine({ m, b }));
  return { slope: m, intercept: b, rSquared: r2, n: data.length, xMin, xMax };
}

/**
 * Every k-th pair so that at most `maxPoints` remain, for plotting (the fit uses all pairs).
 * Deterministic, keeps the first pair.
 */
export function thinPairs<T>(pairs: readonly T[], maxPoints: number): T[] {
  if (maxPoints < 1) return [];
  if (pairs.length <= maxPoints) return [...pairs];
  const step = pairs.length / maxPoints;
  const out: T[] = [];
  for (let i = 0; i < maxPoints; i++) out.push(pairs[Math.floor(i * step)]);
  return out;
}
