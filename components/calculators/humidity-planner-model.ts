// Humidity planner: outdoor winter air heated indoors → indoor RH → water a humidifier must add
// to reach the target. Pure; computes with lib/physics (ASHRAE Fundamentals 2017 ch. 1).
import { z } from "zod";
import {
  absoluteHumidityGPerM3,
  dewOrFrostPointC,
  dryAirMassFlowKgPerH,
  humidifierWaterKgPerH,
  humidityRatioKgPerKg,
  indoorRhAfterHeatingPct,
  rhFromHumidityRatioPct,
  STANDARD_PRESSURE_PA,
  TRIPLE_POINT_C,
  vapourPressurePa,
} from "@/lib/physics";
import { numberField } from "./number-input";

export const plannerSchema = z.object({
  outdoorTempC: numberField({ what: "outdoor temperature", unit: "°C", min: -40, max: 45, example: "−10" }),
  outdoorRhPct: numberField({ what: "outdoor RH", unit: "%", min: 0, max: 100, exclusiveMin: true, example: "80" }),
  basis: z.enum(["water", "ice"], { message: "Choose what the outdoor RH is taken over" }),
  indoorTempC: numberField({ what: "hall temperature", unit: "°C", min: 5, max: 45, example: "21" }),
  targetRhPct: numberField({ what: "target RH", unit: "%", min: 1, max: 95, example: "45" }),
  airflowM3PerH: numberField({ what: "outdoor air flow", unit: "m³/h", min: 0, max: 2_000_000, example: "9000" }),
  flowAt: z.enum(["outdoor", "hall"], { message: "Choose where the air flow is measured" }),
  humidifierKgPerH: z.union([z.literal("").transform(() => null), numberField({ what: "humidifier capacity", unit: "kg/h", min: 0, max: 100_000, example: "12" })]),
});

export type PlannerFields = { [K in keyof z.input<typeof plannerSchema>]: string };
export type PlannerInput = z.output<typeof plannerSchema>;

export type PlannerResult = {
  input: PlannerInput;
  outdoorVapourPressurePa: number;
  /** Dew point, or frost point when it lies at or below 0.01 °C (ASHRAE convention). */
  outdoorDewPointC: number;
  outdoorDewIsFrost: boolean;
  outdoorAbsoluteGPerM3: number;
  indoorRhPct: number;
  /** The same air's indoor RH if the outdoor RH were read on the other basis. */
  indoorRhOtherBasisPct: number | null;
  indoorAbsoluteGPerM3: number;
  condenses: boolean;
  targetDewPointC: number;
  targetAbsoluteGPerM3: number;
  /** Mass of dry air the flow carries, kg/h, at the conditions the flow is measured at. */
  dryAirKgPerH: number;
  /** The same flow figure read at the other conditions (outdoor ↔ hall), kg/h of dry air. */
  dryAirOtherKgPerH: number;
  waterKgPerH: number;
  /** With the humidifier's capacity: the RH it reaches and the share of the need it covers. */
  withHumidifier: { rhReachedPct: number; shareOfNeed: number } | null;
  words: string;
};

const fmt = (v: number, d = 1) => v.toFixed(d).replace("-", "\u2212");

export function planHumidity(input: PlannerInput): PlannerResult {
  const { outdoorTempC, outdoorRhPct, basis, indoorTempC, targetRhPct, airflowM3PerH, humidifierKgPerH } = input;
  const pw = vapourPressurePa(outdoorTempC, outdoorRhPct, basis);
  const outdoorDewPointC = dewOrFrostPointC(outdoorTempC, outdoorRhPct, basis);
  const rawIndoor = (100 * pw) / vapourPressurePa(indoorTempC, 100, "water");
  const indoorRhPct = indoorRhAfterHeatingPct({ outdoorTempC, outdoorRhPct, indoorTempC, basis });
  const other = basis === "water" ? "ice" : "water";
  const indoorRhOtherBasisPct = outdoorTempC <= TRIPLE_POINT_C ? indoorRhAfterHeatingPct({ outdoorTempC, outdoorRhPct, indoorTempC, basis: other }) : null;
  // A cubic metre of cold outdoor air holds more dry air than one of warm hall air (v = Rda·T·(1 +
  // 1.607858·W)/p): the same m³/h is about 10 % more air at −10 °C than at 21 °C, 14 % at −20 °C.
  const dryAirOutdoor = dryAirMassFlowKgPerH(airflowM3PerH, outdoorTempC, outdoorRhPct, STANDARD_PRESSURE_PA, basis);
  const dryAirHall = dryAirMassFlowKgPerH(airflowM3PerH, indoorTempC, Math.min(100, indoorRhPct));
  const dryAirKgPerH = input.flowAt === "outdoor" ? dryAirOutdoor : dryAirHall;
  const dryAirOtherKgPerH = input.flowAt === "outdoor" ? dryAirHall : dryAirOutdoor;
  const hallWaterKgPerH = humidifierWaterKgPerH({ airflowM3PerH, indoorTempC, fromRhPct: Math.min(100, indoorRhPct), toRhPct: targetRhPct });
  // the water per kg of dry air is the same whichever way the flow is read; only the mass differs
  const waterKgPerH = dryAirHall > 0 ? hallWaterKgPerH * (dryAirKgPerH / dryAirHall) : 0;

  let withHumidifier: PlannerResult["withHumidifier"] = null;
  if (humidifierKgPerH !== null && airflowM3PerH > 0) {
    const dryAir = dryAirKgPerH;
    const w = humidityRatioKgPerKg(indoorTempC, indoorRhPct) + Math.min(humidifierKgPerH, waterKgPerH) / dryAir;
    withHumidifier = {
      rhReachedPct: Math.min(targetRhPct, Math.max(indoorRhPct, rhFromHumidityRatioPct(indoorTempC, w))),
      shareOfNeed: waterKgPerH > 0 ? Math.min(1, humidifierKgPerH / waterKgPerH) : 1,
    };
  }

  const outdoorWords = `Outdoor air at ${fmt(outdoorTempC)} °C and ${fmt(outdoorRhPct, 0)} % RH (over ${basis})`;
  let words: string;
  if (rawIndoor > 100) {
    words = `${outdoorWords} holds more water than air at ${fmt(indoorTempC)} °C can: it would condense. Check the temperatures.`;
  } else if (waterKgPerH === 0) {
    words = `${outdoorWords}, heated to ${fmt(indoorTempC)} °C, holds ${fmt(indoorRhPct)} % RH — already at or above the ${fmt(targetRhPct, 0)} % target; no water is needed.`;
  } else {
    words =
      `${outdoorWords}, heated to ${fmt(indoorTempC)} °C, holds only ${fmt(indoorRhPct)} % RH. ` +
      `To bring ${Math.round(airflowM3PerH).toLocaleString("en-GB")} m³/h of it (measured ${input.flowAt === "outdoor" ? "at the outdoor intake" : "in the hall"}) to ${fmt(targetRhPct, 0)} % RH, add about ${fmt(waterKgPerH, waterKgPerH < 10 ? 1 : 0)} kg of water per hour (≈ ${fmt(waterKgPerH, waterKgPerH < 10 ? 1 : 0)} L/h, ${Math.round(waterKgPerH * 24).toLocaleString("en-GB")} L a day).`;
    if (withHumidifier && humidifierKgPerH !== null) {
      words +=
        withHumidifier.shareOfNeed >= 1
          ? ` A ${fmt(humidifierKgPerH, 0)} kg/h humidifier covers it.`
          : ` A ${fmt(humidifierKgPerH, 0)} kg/h humidifier covers ${Math.round(withHumidifier.shareOfNeed * 100)} % of that: expect about ${fmt(withHumidifier.rhReachedPct, 0)} % RH.`;
    }
  }

  return {
    input,
    outdoorVapourPressurePa: pw,
    outdoorDewPointC,
    outdoorDewIsFrost: pw <= 611.657,
    outdoorAbsoluteGPerM3: absoluteHumidityGPerM3(outdoorTempC, outdoorRhPct, basis),
    indoorRhPct,
    indoorRhOtherBasisPct,
    indoorAbsoluteGPerM3: absoluteHumidityGPerM3(indoorTempC, indoorRhPct),
    condenses: rawIndoor > 100,
    targetDewPointC: dewOrFrostPointC(indoorTempC, targetRhPct),
    targetAbsoluteGPerM3: absoluteHumidityGPerM3(indoorTempC, targetRhPct),
    dryAirKgPerH,
    dryAirOtherKgPerH,
    waterKgPerH,
    withHumidifier,
    words,
  };
}
