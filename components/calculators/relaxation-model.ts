// Charge relaxation time τ = ε0·εr·ρ: how long charge stays on a material, and its class by
// surface resistance. Pure; computes with lib/physics.
import { z } from "zod";
import { classifySurfaceResistance, relaxationTimeS, type SurfaceResistanceClass } from "@/lib/physics";
import { numberField } from "./number-input";

export const relaxationSchema = z.object({
  relativePermittivity: numberField({ what: "relative permittivity εr", unit: "", min: 1, max: 200, example: "2.3" }),
  resistivityOhmM: numberField({ what: "volume resistivity", unit: "Ω·m", min: 0, max: 1e22, exclusiveMin: true, example: "1e10" }),
  surfaceResistanceOhm: z.union([z.literal("").transform(() => null), numberField({ what: "surface resistance", unit: "Ω", min: 0, max: 1e20, example: "1e12" })]),
});

export type RelaxationFields = { [K in keyof z.input<typeof relaxationSchema>]: string };
export type RelaxationInput = z.output<typeof relaxationSchema>;

export type RelaxationResult = {
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
    tauS,
    toTenthS,
    toHundredthS,
    surfaceClass,
    words: `τ = ${formatSeconds(tauS)}: the charge falls to 10 % in ${formatSeconds(toTenthS)} and to 1 % in ${formatSeconds(toHundredthS)}. ${fate}`,
  };
}
