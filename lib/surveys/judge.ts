/**
 * Judging one handheld field-meter reading of a walk-down survey, as it is entered:
 * - its flat-surface equivalent at the meter's calibrated distance (the same large-sheet model
 *   as the charge calculator, lib/physics/electrostatics.ts: E = V/d, a uniform field between
 *   a large charged sheet and the grounded meter);
 * - refusal of a reading beyond what air can hold (about 3 MV/m), or of a distance ≤ 0;
 * - the reduction across a neutralizer from the reading before it to the one after it
 *   (lib/physics/neutralizer.ts effectFraction).
 * Pure, no I/O.
 */
import { AIR_BREAKDOWN_V_PER_M, breakdownFraction, effectFraction, fieldVPerM, maxReadingKv, TYPICAL_SENSOR_DISTANCE_MM } from "../physics";

export const METER_UNITS = ["kV", "V"] as const;
export type MeterUnit = (typeof METER_UNITS)[number];

/** Handheld meters are calibrated to read at 25 mm (1 in) from the surface (common practice). */
export const DEFAULT_CALIBRATED_DISTANCE_MM = TYPICAL_SENSOR_DISTANCE_MM;

/**
 * A reading taken more than this share away from the calibrated distance is warned about:
 * ±10 % of 25 mm is about the ±2–3 mm a hand can hold (common practice, from memory).
 */
export const DISTANCE_TOLERANCE_SHARE = 0.1;

export function toKv(value: number, unit: MeterUnit): number {
  return unit === "V" ? value / 1000 : value;
}

export const EQUIVALENCE_FORMULA = "V(cal) = V(read) × d(taken) ÷ d(cal)";

export const EQUIVALENCE_LIMITS =
  "Large flat sheet model: the meter reads the field E = V ÷ d, so the reading scales with 1/d. It holds when the charged area is wide compared with the distance and the web runs over or near earthed metal; on a narrow web, a roll edge or a free span the field falls off faster or slower, so take readings at the calibrated distance whenever you can.";

export type DistanceEquivalent = {
  /** the reading as entered, in kV (signed) */
  readKv: number;
  /** the same surface at the calibrated distance, kV (signed): readKv × taken / calibrated */
  equivalentKv: number;
  /** field at the meter face, V/m */
  fieldVPerM: number;
  /** share of the air-breakdown field, 1 = the air would break down */
  breakdownShare: number;
  /** highest reading the air allows at the distance it was taken at, kV */
  ceilingKv: number;
  offDistance: boolean;
};

/**
 * The flat-surface equivalent of a reading taken at `takenMm` with a meter calibrated at
 * `calibratedMm`. The meter measures the field at its face and shows E × d(cal); a large sheet
 * at potential V(surface) gives E = V(surface) ÷ d(taken), so
 *   V(surface) = V(read) × d(taken) ÷ d(cal).
 * Throws RangeError on a distance ≤ 0 or a non-finite value.
 */
export function distanceEquivalent(readKv: number, takenMm: number, calibratedMm: number = DEFAULT_CALIBRATED_DISTANCE_MM): DistanceEquivalent {
  if (!Number.isFinite(calibratedMm) || calibratedMm <= 0) throw new RangeError(`The meter's calibrated distance must be above 0 mm (got ${calibratedMm}).`);
  // the meter's field: what it displays over its calibrated distance
  const field = fieldVPerM(readKv, calibratedMm);
  if (!Number.isFinite(takenMm) || takenMm <= 0) throw new RangeError(`Distance must be above 0 mm (got ${takenMm}).`);
  const equivalentKv = (readKv * takenMm) / calibratedMm;
  return {
    readKv,
    equivalentKv,
    fieldVPerM: field,
    breakdownShare: breakdownFraction(field),
    ceilingKv: maxReadingKv(takenMm),
    offDistance: Math.abs(takenMm - calibratedMm) > DISTANCE_TOLERANCE_SHARE * calibratedMm,
  };
}

export type ReadingCheck =
  | { ok: true; equivalent: DistanceEquivalent; warnings: string[] }
  | { ok: false; field: "value" | "distanceMm"; reason: string };

function fmt(n: number, digits = 1): string {
  return (Math.round(n * 10 ** digits) / 10 ** digits).toFixed(digits);
}

/**
 * Accepts or refuses a reading with its reason. Refused: a distance of 0 mm or less; a reading
 * whose field at the meter is above the air-breakdown field (3 MV/m) — air cannot hold that
 * charge, so the distance setting or the meter is wrong. Warned: off the calibrated distance.
 */
export function checkReading(input: { value: number; unit: MeterUnit; distanceMm: number; calibratedMm?: number }): ReadingCheck {
  const calibratedMm = input.calibratedMm ?? DEFAULT_CALIBRATED_DISTANCE_MM;
  if (!Number.isFinite(input.value)) return { ok: false, field: "value", reason: "Enter the reading as a number, with its sign." };
  if (!Number.isFinite(input.distanceMm) || input.distanceMm <= 0) {
    return { ok: false, field: "distanceMm", reason: "The distance must be more than 0 mm: measure from the meter face to the web." };
  }
  const readKv = toKv(input.value, input.unit);
  const eq = distanceEquivalent(readKv, input.distanceMm, calibratedMm);
  if (eq.breakdownShare > 1) {
    const ceilingAtCal = maxReadingKv(calibratedMm);
    return {
      ok: false,
      field: "value",
      reason: `Air cannot hold this: ${fmt(Math.abs(readKv))} kV on a meter calibrated at ${calibratedMm} mm means ${fmt(eq.fieldVPerM / 1e6, 2)} MV/m at the meter, above the ${fmt(AIR_BREAKDOWN_V_PER_M / 1e6, 0)} MV/m at which air breaks down (the meter cannot show more than ${fmt(ceilingAtCal, 0)} kV; a surface ${input.distanceMm} mm away cannot be above ${fmt(eq.ceilingKv, 0)} kV). Check the unit, the distance and the meter.`,
    };
  }
  const warnings: string[] = [];
  if (eq.offDistance) {
    warnings.push(
      `Taken at ${input.distanceMm} mm, not the meter's ${calibratedMm} mm: the same surface would read about ${eq.equivalentKv >= 0 ? "+" : "−"}${fmt(Math.abs(eq.equivalentKv))} kV at ${calibratedMm} mm (${EQUIVALENCE_FORMULA}).`,
    );
  }
  return { ok: true, equivalent: eq, warnings };
}

/**
 * Reduction across a neutralizer from one reading before it to one after it, in %:
 *   100 × (1 − |after| ÷ |before|)   (lib/physics/neutralizer.ts effectFraction, single readings).
 * Negative when there is more charge after than before. Null when nothing was measured before.
 */
export function reductionPct(beforeKv: number, afterKv: number): number | null {
  const f = effectFraction([beforeKv], [afterKv]);
  return f === null ? null : f * 100;
}
