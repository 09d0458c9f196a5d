/**
 * Spark-energy margin of a solvent line at its current worst charge, for the Floor and line
 * pages: the energy an isolated conductor of the line's assumed capacitance would store if it
 * were charged to the worst reading, W = ½·C·V², against the solvent's minimum ignition energy.
 *
 * Screening assumption: the field meter reads the web's surface potential; an ungrounded
 * conductor near the web (a roller, a tool, a person) can be charged by induction or contact to a
 * potential of that order, so the worst reading is taken as the conductor's voltage. It is a
 * figure to watch, not a hazard assessment: classified areas are assessed by a qualified person
 * under NFPA 77, IEC TS 60079-32-1 and local codes, and every conductor in a solvent area should
 * be bonded and earthed whatever this says. Brush discharges from the charged web itself are not
 * covered by ½CV² (see BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ).
 *
 * Pure, no I/O.
 */
import { sparkMargin, voltageForEnergyKv, SPARK_MARGIN_FACTOR, type SparkVerdict } from "./electrostatics";

export type LineSparkMarginInput = {
  /** Minimum ignition energy of the line's solvent vapour, mJ; null/undefined for a line without solvent. */
  solventMieMj: number | null | undefined;
  /** Capacitance of the largest isolated conductor assumed on the line, pF. */
  conductorCapacitancePf: number | null | undefined;
  /** Worst (largest-magnitude) charge reading on the line now, kV, either sign. */
  worstChargeKv: number | null | undefined;
};

export type LineSparkMargin = {
  /** |worstChargeKv|. */
  voltageKv: number;
  /** ½·C·V², mJ. */
  energyMj: number;
  /** energyMj / MIE. */
  ratioToMie: number;
  /** MIE / energyMj: how many times the energy could grow before reaching the MIE (Infinity at 0 kV). */
  marginFactor: number;
  verdict: SparkVerdict;
  /** Voltage at which the conductor would store the MIE, kV. */
  voltageAtMieKv: number;
  /** Voltage at which it would store a tenth of the MIE (the screening margin), kV. */
  voltageAtMarginKv: number;
};

/**
 * Spark-energy margin for a line, or null when the line has no solvent, no assumed conductor
 * capacitance or no charge reading. Impossible values (MIE or capacitance ≤ 0, non-finite numbers)
 * throw a RangeError, as everywhere in lib/physics.
 */
export function sparkMarginForLine(input: LineSparkMarginInput): LineSparkMargin | null {
  const { solventMieMj, conductorCapacitancePf, worstChargeKv } = input;
  if (solventMieMj == null || conductorCapacitancePf == null || worstChargeKv == null) return null;
  if (!(conductorCapacitancePf > 0)) throw new RangeError(`Conductor capacitance must be above 0 pF (got ${conductorCapacitancePf}).`);
  const voltageKv = Math.abs(worstChargeKv);
  const m = sparkMargin({ capacitancePf: conductorCapacitancePf, voltageKv, mieMj: solventMieMj });
  return {
    voltageKv,
    energyMj: m.energyMj,
    ratioToMie: m.ratioToMie,
    marginFactor: m.energyMj === 0 ? Number.POSITIVE_INFINITY : solventMieMj / m.energyMj,
    verdict: m.verdict,
    voltageAtMieKv: voltageForEnergyKv(conductorCapacitancePf, solventMieMj),
    voltageAtMarginKv: voltageForEnergyKv(conductorCapacitancePf, solventMieMj / SPARK_MARGIN_FACTOR),
  };
}

/**
 * Stored energy as a multiple of the MIE, written the way people read it: "64×", "1.5×",
 * "0.43×", "0.003×" (two significant figures below 1, so a small ratio never rounds to "0.0").
 */
export function formatMieRatio(ratioToMie: number): string {
  if (!Number.isFinite(ratioToMie) || ratioToMie < 0) throw new RangeError(`Ratio must be a finite number ≥ 0 (got ${ratioToMie}).`);
  if (ratioToMie === 0) return "0×";
  if (ratioToMie >= 10) return `${Math.round(ratioToMie)}×`;
  if (ratioToMie >= 1) return `${Number(ratioToMie.toFixed(1))}×`;
  return `${Number(ratioToMie.toPrecision(ratioToMie >= 0.1 ? 2 : 1))}×`;
}

/** What each verdict says after the ratio, the same on the Floor, the line page and the calculator. */
export const SPARK_VERDICT_SHORT: Record<SparkVerdict, string> = {
  "can ignite": "can ignite",
  "within tenfold of MIE": "within tenfold",
  "below MIE with margin": "below",
};

/** "stored energy 64× the MIE: can ignite" · "stored energy 0.003× the MIE: below". */
export function sparkMarginPhrase(ratioToMie: number, verdict: SparkVerdict): string {
  return `stored energy ${formatMieRatio(ratioToMie)} the MIE: ${SPARK_VERDICT_SHORT[verdict]}`;
}

/** The screening caution shown beside every spark-margin figure (visible, never only a tooltip). */
export const SPARK_SCREENING_CAUTION =
  "Screening figure, not a hazard assessment: solvent areas are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and local codes; bond and earth every conductor whatever this says.";
