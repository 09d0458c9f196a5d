// Spark-hazard check for a solvent area: a conductor's capacitance and voltage → stored energy
// ½CV² → margin to the solvent's minimum ignition energy. A screening aid only. Pure; computes
// with lib/physics.
import { z } from "zod";
import { BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ, COMMON_SOLVENTS, formatMieRatio, SPARK_MARGIN_FACTOR, sparkMargin, voltageForEnergyKv, type SparkVerdict } from "@/lib/physics";
import { numberField } from "./number-input";

export const CUSTOM_SOLVENT = "custom";

export const sparkSchema = z
  .object({
    solvent: z.string().min(1, { message: "Choose the solvent" }),
    customMieMj: z.string(),
    capacitancePf: numberField({ what: "capacitance", unit: "pF", min: 0, max: 100_000, exclusiveMin: true, example: "100" }),
    voltageKv: numberField({ what: "voltage", unit: "kV", min: -200, max: 200, example: "5" }),
  })
  .transform((v, ctx) => {
    if (v.solvent === CUSTOM_SOLVENT) {
      const parsed = numberField({ what: "minimum ignition energy", unit: "mJ", min: 0, max: 1000, exclusiveMin: true, example: "0.25" }).safeParse(v.customMieMj);
      if (!parsed.success) {
        ctx.issues.push({ code: "custom", message: parsed.error.issues[0].message, path: ["customMieMj"], input: v.customMieMj });
        return z.NEVER;
      }
      return { solventName: "Your solvent", mieMj: parsed.data, capacitancePf: v.capacitancePf, voltageKv: v.voltageKv };
    }
    const solvent = COMMON_SOLVENTS.find((s) => s.name === v.solvent);
    if (!solvent) {
      ctx.issues.push({ code: "custom", message: "Choose a solvent from the list", path: ["solvent"], input: v.solvent });
      return z.NEVER;
    }
    return { solventName: solvent.name, mieMj: solvent.mieMj, capacitancePf: v.capacitancePf, voltageKv: v.voltageKv };
  });

export type SparkFields = z.input<typeof sparkSchema>;
export type SparkInput = z.output<typeof sparkSchema>;

export type SparkResult = {
  energyMj: number;
  ratioToMie: number;
  verdict: SparkVerdict;
  voltageAtMieKv: number;
  voltageAtMarginKv: number;
  /** A brush discharge from a charged insulating surface (about 4 mJ) can ignite this vapour. */
  brushCanIgnite: boolean;
  words: string;
};

export const VERDICT_WORDS: Record<SparkVerdict, string> = {
  "can ignite": "Can ignite",
  "within tenfold of MIE": "Within tenfold of the MIE",
  "below MIE with margin": "Below a tenth of the MIE",
};

const sig = (v: number) => (v >= 100 ? v.toFixed(0) : v >= 10 ? v.toFixed(1) : v >= 0.1 ? v.toFixed(2) : v.toPrecision(2));

export function checkSpark(input: SparkInput): SparkResult {
  const voltageKv = Math.abs(input.voltageKv);
  const m = sparkMargin({ capacitancePf: input.capacitancePf, voltageKv, mieMj: input.mieMj });
  const atMie = voltageForEnergyKv(input.capacitancePf, input.mieMj);
  const atMargin = voltageForEnergyKv(input.capacitancePf, input.mieMj / SPARK_MARGIN_FACTOR);
  const base = `A ${sig(input.capacitancePf)} pF conductor at ${sig(voltageKv)} kV stores ${sig(m.energyMj)} mJ`;
  const mie = `the minimum ignition energy (MIE) of ${input.solventName} vapour, ${sig(input.mieMj)} mJ`;
  const words =
    m.verdict === "can ignite"
      ? `${base}: ${formatMieRatio(m.ratioToMie)} ${mie}. A spark from it can ignite the vapour. Bond and earth it.`
      : m.verdict === "within tenfold of MIE"
        ? `${base}: ${formatMieRatio(m.ratioToMie)} ${mie}, closer than the usual tenfold margin. It reaches the MIE at ${sig(atMie)} kV.`
        : `${base}: ${formatMieRatio(m.ratioToMie)} ${mie}, below a tenth of it. It would reach a tenth at ${sig(atMargin)} kV and the MIE at ${sig(atMie)} kV.`;
  return {
    energyMj: m.energyMj,
    ratioToMie: m.ratioToMie,
    verdict: m.verdict,
    voltageAtMieKv: atMie,
    voltageAtMarginKv: atMargin,
    brushCanIgnite: input.mieMj <= BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ,
    words,
  };
}
