// Charge relaxation time τ = ε0·εr·ρ: how long charge stays on a material, and its class by
// surface resistance. Pure; computes with lib/physics.
import { z } from "zod";
import { classifySurfaceResistance, relaxationTimeS, type SurfaceResistanceClass } from "@/lib/physics";
import { numberField } from "./number-input";

/** 1 Ω·cm = 0.01 Ω·m: datasheets usually give Ω·cm, and mixing the two is a 100× error. */
export const OHM_CM_IN_OHM_M = 0.01;

export const RESISTIVITY_UNITS = {
  ohm_m: { label: "Ω·m", toOhmM: 1 },
  ohm_cm: { label: "Ω·cm", toOhmM: OHM_CM_IN_OHM_M },
} as const;
export type ResistivityUnit = keyof typeof RESISTIVITY_UNITS;

export const relaxationSchema = z
  .object({
    relativePermittivity: numberField({ what: "relative permittivity εr", unit: "", min: 1, max: 200, example: "2.3" }),
    resistivityUnit: z.enum(["ohm_m", "ohm_cm"], { message: "Choose Ω·m or Ω·cm" }),
    resistivity: z.string(),
    surfaceResistanceOhm: z.union([z.literal("").transform(() => null), numberField({ what: "surface resistance", unit: "Ω", min: 0, max: 1e20, example: "1e12" })]),
  })
  .transform((v, ctx) => {
    const unit = RESISTIVITY_UNITS[v.resistivityUnit];
    // the same physical range (up to 1e22 Ω·m) in either unit
    const field = numberField({ what: "volume resistivity", unit: unit.label, min: 0, max: 1e22 / unit.toOhmM, exclusiveMin: true, example: "1e10" }).safeParse(v.resistivity);
    if (!field.success) {
      ctx.issues.push({ code: "custom", message: field.error.issues[0].message, path: ["resistivity"], input: v.resistivity });
      return z.NEVER;
    }
    return {
      relativePermittivity: v.relativePermittivity,
      resistivityUnit: v.resistivityUnit,
      resistivityOhmM: field.data * unit.toOhmM,
      surfaceResistanceOhm: v.surfaceResistanceOhm,
    };
  });

export type RelaxationFields = { [K in keyof z.input<typeof relaxationSchema>]: string };
export type RelaxationInput = z.output<typeof relaxationSchema>;

export type RelaxationResult = {
  /** the resistivity in SI units, whichever unit it was typed in */
  resistivityOhmM: number;
  tauS: number;
  /** Time for the charge to fall to 10 % (τ·ln 10) and to 1 % (τ·ln 100), s. */
  toTenthS: number;
  toHundredthS: number;
  surfaceClass: SurfaceResistanceClass | null;
  words: string;
};

/** "0.177 s", "42 min", "3.1 h", "12 days", "40 years" */
export function formatSeconds(s: number): string {
  if (s < 1e-3) return `${(s * 1e6).toPrecision(3)} µs`;
  if (s < 1) return `${(s * 1000).toPrecision(3)} ms`;
  if (s < 120) return `${s.toPrecision(3)} s`;
  if (s < 7200) return `${(s / 60).toPrecision(3)} min`;
  if (s < 2 * 86400) return `${(s / 3600).toPrecision(3)} h`;
  if (s < 2 * 365.25 * 86400) return `${(s / 86400).toPrecision(3)} days`;
  return `${(s / (365.25 * 86400)).toPrecision(3)} years`;
}

export const CLASS_WORDS: Record<SurfaceResistanceClass, string> = {
  conductive: "conductive (below 10⁴ Ω): earth it and it holds no charge",
  dissipative: "dissipative (10⁴ to 10¹¹ Ω): charge drains away if it is earthed",
  insulative: "insulative (10¹¹ Ω and above): holds charge; only neutralizers or humidity remove it",
};

export function estimateRelaxation(input: RelaxationInput): RelaxationResult {
  const tauS = relaxationTimeS(input.relativePermittivity, input.resistivityOhmM);
  const toTenthS = tauS * Math.LN10;
  const toHundredthS = tauS * Math.log(100);
  const surfaceClass = input.surfaceResistanceOhm === null ? null : classifySurfaceResistance(input.surfaceResistanceOhm);
  const fate =
    toHundredthS < 0.5
      ? "Charge drains away almost as fast as it is made: it is gone before the web reaches the next roller."
      : toHundredthS < 60
        ? "Charge lingers for seconds: enough to reach the next idler or the rewind."
        : "Charge stays for minutes or much longer: it goes into the roll with the web and must be removed by a neutralizer.";
  return {
    resistivityOhmM: input.resistivityOhmM,
    tauS,
    toTenthS,
    toHundredthS,
    surfaceClass,
    words: `τ = ${formatSeconds(tauS)}: the charge falls to 10 % in ${formatSeconds(toTenthS)} and to 1 % in ${formatSeconds(toHundredthS)}. ${fate}`,
  };
}
