/**
 * Neutralizer performance: the effect seen in line data (charge before vs after the neutralizer),
 * the pass/fail judgement of a charged-plate verification (decay time per polarity and offset
 * voltage), and the trend of decay time across checks to predict when cleaning is due.
 *
 * Pure functions, no I/O. Impossible inputs throw a RangeError.
 * Cleaning or touching emitters: isolate the power unit first and follow the plant's lockout
 * procedure; neutralizer power units carry several kilovolts.
 */

import { linearRegression, mean, median } from "simple-statistics";

import { NEUTRALIZER_KIND_SPECS, type NeutralizerKind } from "./neutralizer-kinds";
import { DAY_MS } from "../vocabulary/time";

/**
 * Start and end voltages of the usual charged-plate decay test, V: the plate is charged to
 * ±1000 V and the time to fall to ±100 V is the decay time (ANSI/ESD STM3.1-2015 and
 * IEC 61340-4-7:2017 test method, from memory).
 */
export const DECAY_TEST_FROM_V = 1000;
export const DECAY_TEST_TO_V = 100;

/**
 * The charged plate of the test method: 20 pF (±2 pF) on a 150 mm × 150 mm (6 in × 6 in)
 * conductive plate (ANSI/ESD STM3.1-2015 and IEC 61340-4-7:2017, from memory). A monitor with
 * another plate gives decay times that are not comparable, so each check records its plate.
 */
export const STANDARD_PLATE = { capacitancePf: 20, widthMm: 150, lengthMm: 150 } as const;

/** Editions of the published documents the check pages cite (one home for the wording). */
export const CHECK_STANDARD_EDITIONS = {
  testMethodAnsi: "ANSI/ESD STM3.1-2015",
  testMethodIec: "IEC 61340-4-7:2017",
  program: "ANSI/ESD S20.20-2021",
  periodic: "ANSI/ESD SP3.3-2016",
} as const;

export interface CheckLimits {
  /** Longest acceptable decay time, s, for either polarity. */
  maxDecayS: number;
  /** Largest acceptable offset (balance) voltage magnitude, V. */
  maxOffsetAbsV: number;
}

/**
 * Offset (balance) limit, V: ANSI/ESD S20.20-2021 requires an ionizer's offset within ±35 V
 * (discharge time user-defined), measured per ANSI/ESD STM3.1 (from memory). S20.20 was written
 * for handling electrostatic-discharge-sensitive electronic parts; a web line can usually live
 * with more, so this is a strict starting value, not a rule for converting.
 */
export const DEFAULT_OFFSET_LIMIT_V = 35;

/**
 * Limits for a kind the plant has not set: the kind's decay-time default
 * (lib/physics/neutralizer-kinds.ts, common practice) and the ±35 V offset of ANSI/ESD S20.20.
 */
export function defaultCheckLimits(kind: NeutralizerKind): CheckLimits {
  return { maxDecayS: NEUTRALIZER_KIND_SPECS[kind].defaultMaxDecayS, maxOffsetAbsV: DEFAULT_OFFSET_LIMIT_V };
}

/**
 * Limits used when nothing is known about the unit (kind "other"): 20 s is Stillfield's
 * generous starting value, not a figure from the standards, which leave the decay limit to the
 * user; ±35 V is ANSI/ESD S20.20's offset limit.
 */
export const DEFAULT_CHECK_LIMITS: CheckLimits = defaultCheckLimits("other");

function assertFinite(name: string, value: number): void {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number (got ${String(value)}).`);
  }
}

function magnitudes(name: string, valuesKv: readonly number[]): number[] {
  if (!Array.isArray(valuesKv) || valuesKv.length === 0) {
    throw new RangeError(`${name} needs at least one reading.`);
  }
  return valuesKv.map((v, i) => {
    assertFinite(`${name} reading ${i + 1}`, v);
    return Math.abs(v);
  });
}

export type EffectMethod = "mean" | "median";

/**
 * Effect of a neutralizer from line data: the fraction of charge removed between the point
 * before it and the point after it, over the same time window.
 *   'mean' (default): effect = 1 − mean|after| / mean|before|
 *   'median':         effect = 1 − median|after| / median|before|
 * Magnitudes are used because either polarity is charge to be removed. The median form is
 * robust to short spikes (a splice, a hand near the sensor); the two series need not have the
 * same length. 1 means all charge removed, 0 no effect; a negative value means more charge after
 * than before (a neutralizer out of balance or adding charge). Returns null when there is no
 * charge before (the effect is undefined).
 */
export function effectFraction(
  beforeKv: readonly number[],
  afterKv: readonly number[],
  method: EffectMethod = "mean",
): number | null {
  const before = magnitudes("Charge before", beforeKv);
  const after = magnitudes("Charge after", afterKv);
  const centre = method === "median" ? median : mean;
  const beforeLevel = centre(before);
  if (beforeLevel === 0) return null;
  return 1 - centre(after) / beforeLevel;
}

export interface CheckReadings {
  /** Decay time from +1000 V to +100 V, s; null if not measured. */
  decayPosS: number | null;
  /** Decay time from −1000 V to −100 V, s; null if not measured. */
  decayNegS: number | null;
  /** Offset (balance) voltage, V, signed; null if not measured. */
  offsetV: number | null;
}

export interface CheckPartJudgement {
  pass: boolean;
  reason: string;
}

export interface CheckJudgement {
  pass: boolean;
  positive: CheckPartJudgement;
  negative: CheckPartJudgement;
  offset: CheckPartJudgement;
  /** Reasons of the parts that failed, in order positive, negative, offset; empty on a pass. */
  failures: string[];
}

function formatNumber(value: number): string {
  return String(Number(value.toPrecision(3)));
}

function judgeDecay(label: string, decayS: number | null, maxDecayS: number): CheckPartJudgement {
  if (decayS === null) return { pass: false, reason: `${label} decay time not recorded.` };
  if (typeof decayS !== "number" || Number.isNaN(decayS) || decayS < 0) {
    throw new RangeError(`${label} decay time must be 0 s or more (got ${String(decayS)}).`);
  }
  // Infinity is allowed: it records a plate that never reached 100 V within the test time.
  if (decayS <= maxDecayS) {
    return { pass: true, reason: `${label} decay ${formatNumber(decayS)} s is within the ${formatNumber(maxDecayS)} s limit.` };
  }
  return { pass: false, reason: `${label} decay ${formatNumber(decayS)} s is over the ${formatNumber(maxDecayS)} s limit.` };
}

/**
 * Pass/fail of a charged-plate verification against the neutralizer's limits: each polarity
 * passes when its decay time ≤ maxDecayS, the offset passes when |offsetV| ≤ maxOffsetAbsV, and
 * the check passes only when all three do. A part that was not measured fails (a verification
 * needs both polarities and the offset). Limits default to DEFAULT_CHECK_LIMITS (kind "other").
 */
export function judgeCheck(readings: CheckReadings, limits: CheckLimits = DEFAULT_CHECK_LIMITS): CheckJudgement {
  assertFinite("Decay time limit", limits.maxDecayS);
  assertFinite("Offset limit", limits.maxOffsetAbsV);
  if (limits.maxDecayS <= 0) throw new RangeError("Decay time limit must be above 0 s.");
  if (limits.maxOffsetAbsV < 0) throw new RangeError("Offset limit cannot be negative.");

  const positive = judgeDecay("Positive", readings.decayPosS, limits.maxDecayS);
  const negative = judgeDecay("Negative", readings.decayNegS, limits.maxDecayS);

  let offset: CheckPartJudgement;
  if (readings.offsetV === null) {
    offset = { pass: false, reason: "Offset voltage not recorded." };
  } else {
    assertFinite("Offset voltage", readings.offsetV);
    const within = Math.abs(readings.offsetV) <= limits.maxOffsetAbsV;
    offset = {
      pass: within,
      reason: `Offset ${formatNumber(readings.offsetV)} V is ${within ? "within" : "outside"} ±${formatNumber(limits.maxOffsetAbsV)} V.`,
    };
  }

  const failures = [positive, negative, offset].filter((p) => !p.pass).map((p) => p.reason);
  return { pass: failures.length === 0, positive, negative, offset, failures };
}

export interface DecayCheckPoint {
  /** Time of the check, epoch ms. */
  ts: number;
  /** Decay time measured, s. Pass the longer of the two polarities to project the earlier date. */
  decayS: number;
}

export interface DecayTrend {
  /** Least-squares slope, s of decay time per day. */
  slopeSPerDay: number;
  /** Fitted decay time at `originTs`, s. */
  interceptS: number;
  /** Time the fit is centred on (first check), epoch ms. */
  originTs: number;
}


/**
 * Least-squares straight line of decay time against time: decayS ≈ interceptS + slopeSPerDay ·
 * (ts − originTs) / 1 day (ordinary least squares, simple-statistics linearRegression). Time is
 * shifted to the first check and expressed in days so the sums stay well conditioned. Returns
 * null with fewer than two distinct check times.
 */
export function fitDecayTrend(checks: readonly DecayCheckPoint[]): DecayTrend | null {
  if (!Array.isArray(checks)) throw new RangeError("Checks must be a list.");
  checks.forEach((c, i) => {
    assertFinite(`Check ${i + 1} time`, c.ts);
    assertFinite(`Check ${i + 1} decay time`, c.decayS);
    if (c.decayS < 0) throw new RangeError(`Check ${i + 1} decay time cannot be negative.`);
  });
  if (new Set(checks.map((c) => c.ts)).size < 2) return null;
  const originTs = Math.min(...checks.map((c) => c.ts));
  const line = linearRegression(checks.map((c) => [(c.ts - originTs) / DAY_MS, c.decayS]));
  return { slopeSPerDay: line.m, interceptS: line.b, originTs };
}

/** A decay time this many times its own baseline earns a warning (Stillfield's choice). */
export const SLOWDOWN_WARN_FACTOR = 2;

export interface DecaySlowdown {
  /** median decay of the earliest checks of the series (⌊(n−1)/2⌋ of them, one to three), s */
  baselineS: number;
  /** the latest check's decay, s */
  currentS: number;
  /** currentS / baselineS */
  factor: number;
  /** factor ≥ warnFactor */
  warn: boolean;
  /** how many checks made the baseline */
  baselineChecks: number;
}

/**
 * How much slower the latest check decays than the unit's own baseline: the median of the
 * earliest checks of the series (the first ⌊(n−1)/2⌋, one to three, never the latest), which after
 * a cleaning is the unit when clean. A bar that normally decays in 1–2 s and now takes 10 s can still pass a
 * generous limit; against its own baseline it is ×5–10 slower. Pass the series the trend is
 * fitted to (checks since the last cleaning when there are two or more). Returns null with fewer
 * than two checks or a zero baseline.
 */
export function decaySlowdown(checks: readonly DecayCheckPoint[], warnFactor = SLOWDOWN_WARN_FACTOR): DecaySlowdown | null {
  assertFinite("Warning factor", warnFactor);
  const sorted = [...checks].sort((a, b) => a.ts - b.ts);
  sorted.forEach((c, i) => {
    assertFinite(`Check ${i + 1} decay time`, c.decayS);
    if (c.decayS < 0) throw new RangeError(`Check ${i + 1} decay time cannot be negative.`);
  });
  if (sorted.length < 2) return null;
  // the earlier half of the series, one to three checks: the unit before it began to slow
  const base = sorted.slice(0, Math.max(1, Math.min(3, Math.floor((sorted.length - 1) / 2)))).map((c) => c.decayS);
  const baselineS = median(base);
  if (!(baselineS > 0)) return null;
  const currentS = sorted[sorted.length - 1].decayS;
  const factor = currentS / baselineS;
  return { baselineS, currentS, factor, warn: factor >= warnFactor, baselineChecks: base.length };
}

/**
 * When the decay time is predicted to reach `limitS`, epoch ms: from the least-squares line of
 * `fitDecayTrend`, ts = originTs + (limitS − interceptS) / slopeSPerDay days. Returns null when
 * the trend is not rising (slope ≤ 0) or there are fewer than two distinct check times.
 * A result at or before the latest check means the line already reaches the limit: due now.
 */
export function projectDecayDueDate(checks: readonly DecayCheckPoint[], limitS: number): number | null {
  assertFinite("Decay time limit", limitS);
  if (limitS <= 0) throw new RangeError("Decay time limit must be above 0 s.");
  const trend = fitDecayTrend(checks);
  if (trend === null || !(trend.slopeSPerDay > 0)) return null;
  return Math.round(trend.originTs + ((limitS - trend.interceptS) / trend.slopeSPerDay) * DAY_MS);
}
