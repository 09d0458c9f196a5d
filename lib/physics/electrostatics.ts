/**
 * Electrostatics for static control: field-meter reading to field and surface charge density,
 * the air-breakdown ceiling, capacitive spark energy against minimum ignition energy, charge
 * relaxation time, surface-resistance classes and how a discharge from a person feels.
 *
 * These are screening aids for monitoring. They are not a hazard assessment: classified
 * (hazardous) areas are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and
 * local codes.
 *
 * Pure functions, no I/O. Impossible inputs throw a RangeError.
 */

/** Vacuum permittivity, F/m (CODATA 2018 recommended value). */
export const EPSILON0 = 8.8541878128e-12;

/**
 * Dielectric strength of air at atmospheric pressure, V/m, for gaps of centimetres and more:
 * about 3 MV/m (standard textbook figure, e.g. NFPA 77 and IEC TS 60079-32-1 use it as the
 * ceiling for the field at a charged surface; from memory).
 */
export const AIR_BREAKDOWN_V_PER_M = 3e6;

/**
 * Largest surface charge density a single-sided charged surface can hold in air before the
 * field at it breaks the air down: σmax = ε0 · 3 MV/m ≈ 2.66e−5 C/m² (26.6 µC/m²; commonly
 * quoted as about 26.5 µC/m² or 2.65e−5 C/m²).
 */
export const MAX_SURFACE_CHARGE_C_PER_M2 = EPSILON0 * AIR_BREAKDOWN_V_PER_M;

/**
 * Usual calibrated distance of a fixed or handheld field meter, mm (common practice: most
 * field meters are calibrated to read surface voltage at 25 mm / 1 inch).
 */
export const TYPICAL_SENSOR_DISTANCE_MM = 25;

function assertFinite(name: string, value: number): void {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number (got ${String(value)}).`);
  }
}

/**
 * Electric field, V/m, from a field meter's reading and its calibrated distance:
 *   E = |V| / d
 * A field meter set at distance d reads the potential V of the surface (kV) on the assumption
 * that the surface is a large flat sheet facing a grounded meter, i.e. a uniform field between
 * two parallel planes (large-sheet approximation, valid when the charged area is wide compared
 * with d; smaller or curved targets read low). Returns the magnitude.
 */
export function fieldVPerM(chargeKv: number, distanceMm: number): number {
  assertFinite("Charge reading", chargeKv);
  assertFinite("Distance", distanceMm);
  if (distanceMm <= 0) throw new RangeError(`Distance must be above 0 mm (got ${distanceMm}).`);
  return (Math.abs(chargeKv) * 1000) / (distanceMm / 1000);
}

/**
 * Surface charge density, C/m², from the field at the surface: σ = ε0 · E (Gauss's law for a
 * large sheet whose field lines all leave one side, e.g. a web over a grounded roller or plate,
 * which is how a field meter sees it). An isolated sheet in free space with field on both sides
 * would carry 2·ε0·E. Keeps the sign of the field.
 */
export function surfaceChargeDensityCPerM2(fieldVPerMValue: number): number {
  assertFinite("Field", fieldVPerMValue);
  return EPSILON0 * fieldVPerMValue;
}

/**
 * Fraction of the air-breakdown field, |E| / 3 MV/m. At 1 the surface would be discharging
 * into the air (corona or brush discharges), so a real reading should stay below 1.
 */
export function breakdownFraction(fieldVPerMValue: number): number {
  assertFinite("Field", fieldVPerMValue);
  return Math.abs(fieldVPerMValue) / AIR_BREAKDOWN_V_PER_M;
}

/**
 * Highest field-meter reading, kV, physically possible at a given distance: the reading at which
 * the field of the large-sheet model reaches air breakdown, Vmax = 3 MV/m · d.
 */
export function maxReadingKv(distanceMm: number): number {
  assertFinite("Distance", distanceMm);
  if (distanceMm <= 0) throw new RangeError(`Distance must be above 0 mm (got ${distanceMm}).`);
  return (AIR_BREAKDOWN_V_PER_M * distanceMm) / 1000 / 1000;
}

function assertCapacitancePf(capacitancePf: number): void {
  assertFinite("Capacitance", capacitancePf);
  if (capacitancePf < 0) throw new RangeError(`Capacitance cannot be negative (got ${capacitancePf}).`);
}

/**
 * Energy stored on a charged conductor, mJ: W = ½ · C · V² (C in F, V in V, W in J, × 1000).
 * This is the most a spark from an isolated conductor (a person, a roller, a can, a drum) can
 * release; NFPA 77 and IEC TS 60079-32-1 compare it with the minimum ignition energy. It does
 * not apply to charged insulators (a web, a film), whose brush discharges release only part of
 * their charge — see BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ.
 */
export function sparkEnergyMj(capacitancePf: number, voltageKv: number): number {
  assertCapacitancePf(capacitancePf);
  assertFinite("Voltage", voltageKv);
  const capacitanceF = capacitancePf * 1e-12;
  const voltageV = voltageKv * 1000;
  return 0.5 * capacitanceF * voltageV * voltageV * 1000;
}

/**
 * Voltage, kV, at which a conductor of capacitance C stores a given energy: V = √(2W / C).
 * Capacitance must be above 0.
 */
export function voltageForEnergyKv(capacitancePf: number, energyMj: number): number {
  assertCapacitancePf(capacitancePf);
  if (capacitancePf === 0) throw new RangeError("Capacitance must be above 0 pF.");
  assertFinite("Energy", energyMj);
  if (energyMj < 0) throw new RangeError(`Energy cannot be negative (got ${energyMj}).`);
  const energyJ = energyMj / 1000;
  const capacitanceF = capacitancePf * 1e-12;
  return Math.sqrt((2 * energyJ) / capacitanceF) / 1000;
}

/**
 * Ratio below which stored energy is reported as having a tenfold margin to the MIE. A factor
 * of about 10 is a common safety margin for spark energy against MIE (common practice, from
 * memory); it is a screening threshold, not a rule from NFPA 77 or IEC TS 60079-32-1.
 */
export const SPARK_MARGIN_FACTOR = 10;

export type SparkVerdict = "can ignite" | "within tenfold of MIE" | "below MIE with margin";

export interface SparkMargin {
  energyMj: number;
  /** energyMj / mieMj. */
  ratioToMie: number;
  verdict: SparkVerdict;
}

/**
 * Spark energy of a charged conductor (½CV²) against the minimum ignition energy of the vapour:
 * - ratio ≥ 1 → 'can ignite' (the stored energy reaches the MIE at the most easily ignited
 *   concentration);
 * - 1/SPARK_MARGIN_FACTOR ≤ ratio < 1 → 'within tenfold of MIE' (too close for comfort);
 * - ratio < 1/SPARK_MARGIN_FACTOR → 'below MIE with margin'.
 * A screening aid only: the hazard is assessed by a qualified person under NFPA 77,
 * IEC TS 60079-32-1 and local codes, and any isolated conductor in a solvent area should be
 * bonded and earthed whatever this says.
 */
export function sparkMargin(input: { capacitancePf: number; voltageKv: number; mieMj: number }): SparkMargin {
  const energyMj = sparkEnergyMj(input.capacitancePf, input.voltageKv);
  assertFinite("Minimum ignition energy", input.mieMj);
  if (input.mieMj <= 0) throw new RangeError(`Minimum ignition energy must be above 0 mJ (got ${input.mieMj}).`);
  const ratioToMie = energyMj / input.mieMj;
  const verdict: SparkVerdict =
    ratioToMie >= 1
      ? "can ignite"
      : ratioToMie >= 1 / SPARK_MARGIN_FACTOR
        ? "within tenfold of MIE"
        : "below MIE with margin";
  return { energyMj, ratioToMie, verdict };
}

/**
 * Charge relaxation time, s: τ = ε0 · εr · ρ (charge on a material of volume resistivity ρ and
 * relative permittivity εr decays as e^(−t/τ); NFPA 77 and IEC TS 60079-32-1 use this
 * relation for liquids and solids).
 */
export function relaxationTimeS(relativePermittivity: number, resistivityOhmM: number): number {
  assertFinite("Relative permittivity", relativePermittivity);
  assertFinite("Resistivity", resistivityOhmM);
  if (relativePermittivity < 1) {
    throw new RangeError(`Relative permittivity must be at least 1 (got ${relativePermittivity}).`);
  }
  if (resistivityOhmM <= 0) throw new RangeError(`Resistivity must be above 0 Ω·m (got ${resistivityOhmM}).`);
  return EPSILON0 * relativePermittivity * resistivityOhmM;
}

export type SurfaceResistanceClass = "conductive" | "dissipative" | "insulative";

/** Upper bound (exclusive) of "conductive", Ω. */
export const CONDUCTIVE_BELOW_OHMS = 1e4;
/** Upper bound (exclusive) of "dissipative", Ω; at or above is "insulative". */
export const DISSIPATIVE_BELOW_OHMS = 1e11;

/**
 * Class of a material by its surface resistance, Ω:
 *   < 1e4 → 'conductive'; 1e4 to < 1e11 → 'dissipative'; ≥ 1e11 → 'insulative'.
 * Limits as in ANSI/ESD S541 (packaging materials, surface resistance measured per
 * ANSI/ESD STM11.11), from memory; other standards draw the lines elsewhere (for example
 * IEC TS 60079-32-1 uses its own limits for explosive atmospheres).
 */
export function classifySurfaceResistance(ohms: number): SurfaceResistanceClass {
  if (typeof ohms !== "number" || Number.isNaN(ohms)) {
    throw new RangeError(`Resistance must be a number (got ${String(ohms)}).`);
  }
  if (ohms < 0) throw new RangeError(`Resistance cannot be negative (got ${ohms}).`);
  if (ohms < CONDUCTIVE_BELOW_OHMS) return "conductive";
  if (ohms < DISSIPATIVE_BELOW_OHMS) return "dissipative";
  return "insulative";
}

export type HumanPerception = "not felt" | "felt" | "heard" | "seen";

/**
 * Body voltages, kV, at which a discharge to earthed metal is commonly felt, heard and seen
 * (common practice, from memory; the usual tables give felt from about 2–3 kV, heard from about
 * 5 kV and seen from about 8–10 kV; individual thresholds vary widely).
 */
export const PERCEPTION_FELT_FROM_KV = 2;
export const PERCEPTION_HEARD_FROM_KV = 5;
export const PERCEPTION_SEEN_FROM_KV = 8;

/**
 * How a person charged to `bodyVoltageKv` is likely to perceive the discharge on touching an
 * earthed object: below 2 kV 'not felt', 2–5 kV 'felt', 5–8 kV 'heard', from 8 kV 'seen' (and
 * felt and heard). Common practice, from memory. Uses the magnitude; polarity does not matter.
 */
export function humanPerception(bodyVoltageKv: number): HumanPerception {
  assertFinite("Body voltage", bodyVoltageKv);
  const kv = Math.abs(bodyVoltageKv);
  if (kv < PERCEPTION_FELT_FROM_KV) return "not felt";
  if (kv < PERCEPTION_HEARD_FROM_KV) return "felt";
  if (kv < PERCEPTION_SEEN_FROM_KV) return "heard";
  return "seen";
}

/**
 * Propagating brush discharges: a thin insulating film or coating over an earthed roller or a
 * metal backing can hold far more charge than a free surface, because the charge on its two
 * sides holds each other; above about 2.5×10⁻⁴ C/m² (250 µC/m²) a breakdown can spread over the
 * whole surface and release up to about 1 J, enough to ignite any solvent vapour and to give a
 * severe shock (IEC TS 60079-32-1, from memory). A field meter above the web cannot see this
 * charge: the earthed backing hides it.
 */
export const PROPAGATING_BRUSH_MIN_CHARGE_C_PER_M2 = 2.5e-4;
export const PROPAGATING_BRUSH_MAX_ENERGY_J = 1;

/** The caution shown on solvent lines and in the spark-hazard calculator (one wording). */
export const PROPAGATING_BRUSH_CAUTION =
  "Propagating brush discharges: film running over earthed rollers or on a metal backing can hold more than about 2.5×10⁻⁴ C/m² (250 µC/m²) and release up to about 1 J in one discharge, far above any solvent's minimum ignition energy. ½CV² does not cover them, and a field meter above the web does not see that charge. Source: IEC TS 60079-32-1, from memory.";

/**
 * Largest equivalent energy of a brush discharge from a charged insulating surface, mJ: about
 * 4 mJ (IEC TS 60079-32-1 and NFPA 77 state that brush discharges can ignite gases and vapours
 * with MIE up to about 4 mJ; from memory). All solvents in COMMON_SOLVENTS are below this, so a
 * highly charged web can ignite any of them whatever its "capacitance".
 */
export const BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ = 4;

export interface SolventMie {
  name: string;
  /** Minimum ignition energy of the vapour in air at its most easily ignited concentration, mJ. */
  mieMj: number;
  note?: string;
}

/**
 * Minimum ignition energies, mJ, of common solvent vapours in air at the most easily ignited
 * concentration (usually somewhat richer than stoichiometric), at ambient temperature and pressure.
 * Source: the MIE tables in NFPA 77 (Annex B) and IEC TS 60079-32-1 (Annex), which draw on
 * the same measurements (Britton; Babrauskas, Ignition Handbook) — values from memory, not
 * checked against the tables here. Compilations differ by up to about 20 % for some entries.
 * Use the value for the actual solvent mix from the plant's safety data; this table is for
 * illustration and first estimates.
 */
export const COMMON_SOLVENTS: readonly SolventMie[] = [
  { name: "Acetone", mieMj: 1.15 },
  { name: "Ethyl acetate", mieMj: 0.46 },
  { name: "Methyl ethyl ketone (MEK)", mieMj: 0.53 },
  { name: "Isopropanol", mieMj: 0.65 },
  { name: "Ethanol", mieMj: 0.23, note: "Some compilations give 0.28 mJ." },
  { name: "Methanol", mieMj: 0.14 },
  { name: "Toluene", mieMj: 0.24 },
  { name: "n-Heptane", mieMj: 0.24 },
  { name: "n-Hexane", mieMj: 0.24 },
  { name: "Cyclohexane", mieMj: 0.22 },
];

/**
 * Typical capacitances of conductors, pF (the usual table in IEC TS 60079-32-1 / NFPA 77,
 * from memory). Ranges; the capacitance of a real item depends on its distance to earth.
 */
export const TYPICAL_CAPACITANCES_PF: readonly { item: string; minPf: number; maxPf: number }[] = [
  { item: "Small metal item (scoop, hose nozzle)", minPf: 10, maxPf: 20 },
  { item: "Small container (bucket, 50 L drum)", minPf: 10, maxPf: 100 },
  { item: "Medium container (250–500 L)", minPf: 50, maxPf: 300 },
  { item: "Human body", minPf: 100, maxPf: 300 },
];
