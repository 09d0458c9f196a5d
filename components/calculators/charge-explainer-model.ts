// Charge reading explainer: a field-meter reading and its distance → field, surface charge
// density, share of the air-breakdown ceiling, and how a person charged to that level would feel
// a discharge. Pure; computes with lib/physics (large-sheet model, σ = ε0·E single-sided).
import { z } from "zod";
import { breakdownFraction, fieldVPerM, humanPerception, maxReadingKv, MAX_SURFACE_CHARGE_C_PER_M2, surfaceChargeDensityCPerM2, type HumanPerception } from "@/lib/physics";
import { numberField } from "./number-input";

export const explainerSchema = z.object({
  readingKv: numberField({ what: "meter reading", unit: "kV", min: -200, max: 200, example: "−12.5" }),
  distanceMm: numberField({ what: "distance from the meter to the web", unit: "mm", min: 0, max: 1000, exclusiveMin: true, example: "25" }),
});

export type ExplainerFields = { [K in keyof z.input<typeof explainerSchema>]: string };
export type ExplainerInput = z.output<typeof explainerSchema>;

export type ExplainerResult = {
  fieldVPerM: number;
  surfaceChargeUcPerM2: number;
  /** Share of the ~3 MV/m air-breakdown field (1 = the air would break down). */
  breakdownShare: number;
  maxReadingKv: number;
  /** The reading is above what air can hold at this distance: a wrong distance or a faulty meter. */
  impossible: boolean;
  perception: HumanPerception;
  polarity: "positive" | "negative" | "none";
  words: string;
};

export const PERCEPTION_WORDS: Record<HumanPerception, string> = {
  "not felt": "would most likely not feel a discharge",
  felt: "would feel a discharge (a small prick) on touching earthed metal",
  heard: "would get a discharge that is felt and heard as a snap",
  seen: "would get a painful discharge, felt, heard and seen as a spark",
};

/** Short words for the results table. */
export const PERCEPTION_SHORT: Record<HumanPerception, string> = {
  "not felt": "would not feel it",
  felt: "would feel it",
  heard: "would feel and hear it",
  seen: "would see the spark",
};

export function explainCharge(input: ExplainerInput): ExplainerResult {
  const field = fieldVPerM(input.readingKv, input.distanceMm);
  // σ = ε0·E keeps the sign of the charge: a negative reading is a negative surface
  const sigmaUc = surfaceChargeDensityCPerM2(input.readingKv < 0 ? -field : field) * 1e6;
  const share = breakdownFraction(field);
  const ceiling = maxReadingKv(input.distanceMm);
  const perception = humanPerception(input.readingKv);
  const impossible = Math.abs(input.readingKv) > ceiling;
  const kv = Math.abs(input.readingKv).toFixed(1);
  const ceilingUc = MAX_SURFACE_CHARGE_C_PER_M2 * 1e6;
  const polarity = input.readingKv > 0 ? "positive" : input.readingKv < 0 ? "negative" : "none";
  const words = impossible
    ? `A reading of ${kv} kV at ${input.distanceMm} mm is above what air can hold (${ceiling.toFixed(0)} kV at that distance): check the meter's distance setting or the meter itself.`
    : `The surface holds about ${Math.abs(sigmaUc).toFixed(2)} µC/m², ${Math.round(share * 100)} % of the ${ceilingUc.toFixed(1)} µC/m² air can hold before it breaks down. A person charged to ${kv} kV ${PERCEPTION_WORDS[perception]}.`;
  return { fieldVPerM: field, surfaceChargeUcPerM2: sigmaUc, breakdownShare: share, maxReadingKv: ceiling, impossible, perception, polarity, words };
}
