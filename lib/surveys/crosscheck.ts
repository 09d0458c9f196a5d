/**
 * Fixed-meter cross-check: a handheld reading taken next to a fixed field meter while the line
 * runs steadily checks that meter. Both read the surface's potential at their calibrated
 * distance, so the handheld's flat-surface equivalent is compared with the fixed meter's mean
 * over the moments around the handheld reading. A difference beyond the set share (default
 * 20 %) flags the fixed meter "check calibration". Pure, no I/O.
 */
import { mean, standardDeviation } from "simple-statistics";

/** Default share of the handheld value a fixed meter may differ by (plant setting, common practice). */
export const DEFAULT_CROSSCHECK_SHARE = 0.2;

/** Fixed-meter values within this many ms either side of the handheld reading are compared. */
export const CROSSCHECK_WINDOW_MS = 60_000;

/**
 * The line counts as steady when the fixed meter's readings in the window have a coefficient of
 * variation (deviation ÷ |mean|) of at most 15 % (common practice, from memory: a splice, a roll
 * change or a speed ramp scatters readings far more than that).
 */
export const STEADY_MAX_VARIATION = 0.15;
export const STEADY_MIN_SAMPLES = 3;

/** Below 1 kV both meters are near their noise; the share is taken of at least this (kV). */
export const CROSSCHECK_MIN_LEVEL_KV = 1;

export type CrossCheckResult =
  | { judged: false; reason: string; fixedMeanKv: number | null }
  | { judged: true; handheldKv: number; fixedMeanKv: number; diffShare: number; allowedShare: number; flagged: boolean; text: string };

export function crossCheckFixedMeter(input: {
  /** handheld flat-surface equivalent at the calibrated distance, kV, signed */
  handheldKv: number;
  /** fixed meter's charge_kv values in the window around the handheld reading */
  fixedKv: readonly number[];
  running: boolean;
  allowedShare?: number;
}): CrossCheckResult {
  const allowedShare = input.allowedShare ?? DEFAULT_CROSSCHECK_SHARE;
  if (!(allowedShare > 0 && allowedShare < 10)) throw new RangeError(`The allowed share must be above 0 (got ${allowedShare}).`);
  if (!Number.isFinite(input.handheldKv)) throw new RangeError("The handheld reading must be a finite number.");
  const values = input.fixedKv.filter((v) => Number.isFinite(v));
  const fixedMeanKv = values.length ? mean(values) : null;
  if (!input.running) return { judged: false, reason: "The line was stopped: a fixed meter is checked only while the line runs.", fixedMeanKv };
  if (values.length < STEADY_MIN_SAMPLES || fixedMeanKv === null) {
    return { judged: false, reason: `The fixed meter sent fewer than ${STEADY_MIN_SAMPLES} readings around that moment.`, fixedMeanKv };
  }
  const level = Math.max(Math.abs(fixedMeanKv), CROSSCHECK_MIN_LEVEL_KV);
  const variation = standardDeviation(values) / level;
  if (variation > STEADY_MAX_VARIATION) {
    return { judged: false, reason: `The line was not steady (fixed meter varied by ${Math.round(variation * 100)} % around that moment).`, fixedMeanKv };
  }
  const diffShare = Math.abs(fixedMeanKv - input.handheldKv) / Math.max(Math.abs(input.handheldKv), CROSSCHECK_MIN_LEVEL_KV);
  const flagged = diffShare > allowedShare;
  const pct = Math.round(diffShare * 100);
  return {
    judged: true,
    handheldKv: input.handheldKv,
    fixedMeanKv,
    diffShare,
    allowedShare,
    flagged,
    text: flagged
      ? `Fixed meter reads ${fixedMeanKv.toFixed(1)} kV against ${input.handheldKv.toFixed(1)} kV handheld: ${pct} % apart, more than ${Math.round(allowedShare * 100)} %. Check its calibration.`
      : `Fixed meter agrees with the handheld within ${pct} % (allowed ${Math.round(allowedShare * 100)} %).`,
  };
}
