// The calculators' models: input parsing with technician-worded messages, and each result
// against an outside reference (psychrolib, the ASHRAE worked example, textbook electrostatics).
import { beforeAll, describe, expect, it } from "vitest";
import psychrolib from "psychrolib";
import { fieldMessages, parseNumberText } from "@/components/calculators/number-input";
import { planHumidity, plannerSchema } from "@/components/calculators/humidity-planner-model";
import { explainCharge, explainerSchema } from "@/components/calculators/charge-explainer-model";
import { checkSpark, CUSTOM_SOLVENT, sparkSchema } from "@/components/calculators/spark-check-model";
import { estimateRelaxation, formatSeconds, relaxationSchema } from "@/components/calculators/relaxation-model";
import {
  AIR_ASSIST_PRESSURE_BAR,
  PASSIVE_BAR_REACH_MM,
  PERCEPTION_HEARD_KV,
  PERCEPTION_ONSET_KV,
  PERCEPTION_SEEN_KV,
  TRADE_FACTS,
  RUBBED_SHEET_KV,
  SENSOR_DISTANCE_MM,
  UNTOUCHED_SHEET_KV,
} from "@/components/calculators/trade-facts";
import { COMMON_SOLVENTS, humanPerception, PERCEPTION_FELT_FROM_KV } from "@/lib/physics";

beforeAll(() => {
  psychrolib.SetUnitSystem(psychrolib.SI);
});

describe("number fields", () => {
  it("read what technicians type", () => {
    expect(parseNumberText("21")).toBe(21);
    expect(parseNumberText("\u221210")).toBe(-10);
    expect(parseNumberText(" -12.5 ")).toBe(-12.5);
    expect(parseNumberText("0,5")).toBe(0.5);
    expect(parseNumberText("1e10")).toBe(1e10);
    expect(parseNumberText("1×10^10")).toBe(1e10);
    expect(parseNumberText("2.5x10^-3")).toBeCloseTo(2.5e-3, 15);
    expect(parseNumberText("10^12")).toBe(1e12);
    expect(parseNumberText("ten")).toBeNaN();
    expect(parseNumberText("1.2.3")).toBeNaN();
    expect(parseNumberText("")).toBeNaN();
  });

  it("say what is wrong, next to the right field", () => {
    const r = plannerSchema.safeParse({ outdoorTempC: "", outdoorRhPct: "abc", basis: "water", indoorTempC: "90", targetRhPct: "45", airflowM3PerH: "9000", humidifierKgPerH: "", flowAt: "outdoor" });
    expect(r.success).toBe(false);
    const m = fieldMessages(r.error!.issues);
    expect(m.outdoorTempC).toBe("Enter the outdoor temperature in °C");
    expect(m.outdoorRhPct).toBe("Enter the outdoor RH as a number, e.g. 80");
    expect(m.indoorTempC).toBe("The hall temperature must be between 5 and 45 °C");
    expect(m.targetRhPct).toBeUndefined();
  });
});

describe("humidity planner", () => {
  const base = { outdoorTempC: "-10", outdoorRhPct: "80", indoorTempC: "21", targetRhPct: "45", airflowM3PerH: "10000", humidifierKgPerH: "", flowAt: "hall" };

  it("−10 °C, 80 % RH heated to 21 °C: about 8.4 % over ice (ASHRAE) and 9.2 % over water", () => {
    // worked example of the issue: ASHRAE Fundamentals 2017 ch. 1 basis (over ice below 0 °C) ≈ 8.4 %,
    // the weather-service basis (over water) ≈ 9.2 %
    const ice = planHumidity(plannerSchema.parse({ ...base, basis: "ice" }));
    const water = planHumidity(plannerSchema.parse({ ...base, basis: "water" }));
    expect(ice.indoorRhPct).toBeCloseTo(8.4, 1);
    expect(water.indoorRhPct).toBeCloseTo(9.2, 1);
    expect(water.indoorRhOtherBasisPct).toBeCloseTo(ice.indoorRhPct, 10);
    expect(water.words).toContain("over water");
    expect(water.words).toMatch(/holds only 9\.2 % RH/);
  });

  it("indoor RH and water needed match the same balance built from psychrolib (over-ice basis)", () => {
    // psychrolib 1.1.1 (ASHRAE 2017): W from RH at −10 °C (over ice), RH at 21 °C from W, dry-air
    // mass flow = V / v(21 °C, W), water = ṁda · (W at 45 % − W)
    const p = 101325;
    const wOut = psychrolib.GetHumRatioFromRelHum(-10, 0.8, p);
    const rhIn = 100 * psychrolib.GetRelHumFromHumRatio(21, wOut, p);
    const mDa = 10000 / psychrolib.GetMoistAirVolume(21, wOut, p);
    const water = mDa * (psychrolib.GetHumRatioFromRelHum(21, 0.45, p) - wOut);
    const r = planHumidity(plannerSchema.parse({ ...base, basis: "ice" }));
    expect(r.indoorRhPct).toBeCloseTo(rhIn, 6);
    expect(r.waterKgPerH).toBeCloseTo(water, 4);
    // roughly 70 kg/h for 10 000 m³/h: the plain words give it rounded
    expect(r.words).toContain(`add about ${r.waterKgPerH.toFixed(0)} kg of water per hour`);
  });

  it("asks where the flow is measured: outdoor air is denser, ~10 % more dry air at −10 °C and ~14 % at −20 °C (psychrolib)", () => {
    // psychrolib 1.1.1: ṁda = V̇ / v(T, W) at the conditions the flow is measured; W is the same
    // air outdoors and in the hall. (out − hall) / out = 1 − v_out / v_hall ≈ 1 − 263.15/294.15 = 10.5 %
    // at −10 °C and 1 − 253.15/294.15 = 13.9 % at −20 °C (ideal gas, T ratio).
    const p = 101325;
    for (const [tOut, rhOut, want] of [
      ["-10", 0.8, 0.105],
      ["-20", 0.8, 0.139],
    ] as const) {
      const w = psychrolib.GetHumRatioFromRelHum(Number(tOut), rhOut, p);
      const mOut = 9000 / psychrolib.GetMoistAirVolume(Number(tOut), w, p);
      const mHall = 9000 / psychrolib.GetMoistAirVolume(21, w, p);
      const water = (m: number) => m * (psychrolib.GetHumRatioFromRelHum(21, 0.45, p) - w);
      const input = { ...base, outdoorTempC: tOut, airflowM3PerH: "9000", basis: "ice" } as const;
      const atOutdoor = planHumidity(plannerSchema.parse({ ...input, flowAt: "outdoor" }));
      const atHall = planHumidity(plannerSchema.parse({ ...input, flowAt: "hall" }));
      expect(atOutdoor.dryAirKgPerH).toBeCloseTo(mOut, 6);
      expect(atHall.dryAirKgPerH).toBeCloseTo(mHall, 6);
      expect(atOutdoor.waterKgPerH).toBeCloseTo(water(mOut), 4);
      expect(atHall.waterKgPerH).toBeCloseTo(water(mHall), 4);
      expect((atOutdoor.waterKgPerH - atHall.waterKgPerH) / atOutdoor.waterKgPerH).toBeCloseTo(want, 2);
      expect(atOutdoor.words).toContain("measured at the outdoor intake");
    }
  });

  it("with a humidifier too small for the need, says how far it gets", () => {
    const r = planHumidity(plannerSchema.parse({ ...base, basis: "ice", humidifierKgPerH: "12" }));
    expect(r.withHumidifier!.shareOfNeed).toBeCloseTo(12 / r.waterKgPerH, 12);
    // independently: W reached = W_in + 12 / ṁda, RH from psychrolib
    const p = 101325;
    const wOut = psychrolib.GetHumRatioFromRelHum(-10, 0.8, p);
    const mDa = 10000 / psychrolib.GetMoistAirVolume(21, wOut, p);
    const rh = 100 * psychrolib.GetRelHumFromHumRatio(21, wOut + 12 / mDa, p);
    expect(r.withHumidifier!.rhReachedPct).toBeCloseTo(rh, 4);
    expect(r.words).toMatch(/humidifier covers \d+ % of that: expect about \d+ % RH/);
  });

  it("needs no water when the heated air is already at the target", () => {
    const r = planHumidity(plannerSchema.parse({ ...base, outdoorTempC: "18", outdoorRhPct: "90", basis: "water", targetRhPct: "40" }));
    expect(r.waterKgPerH).toBe(0);
    expect(r.words).toContain("no water is needed");
  });

  it("gives the frost point for freezing outdoor air", () => {
    const r = planHumidity(plannerSchema.parse({ ...base, basis: "ice" }));
    expect(r.outdoorDewIsFrost).toBe(true);
    // psychrolib's dew point follows the same over-ice convention below the triple point
    expect(r.outdoorDewPointC).toBeCloseTo(psychrolib.GetTDewPointFromRelHum(-10, 0.8), 3);
  });
});

describe("charge reading explainer", () => {
  it("10 kV at 25 mm: 4×10⁵ V/m, σ = ε0·E ≈ 3.54 µC/m², 13.3 % of the 3 MV/m ceiling", () => {
    // E = 10 000 V / 0.025 m; σ = 8.854e−12 · 4e5 = 3.5417e−6 C/m² (Gauss's law, single-sided)
    const r = explainCharge(explainerSchema.parse({ readingKv: "10", distanceMm: "25" }));
    expect(r.fieldVPerM).toBe(4e5);
    expect(r.surfaceChargeUcPerM2).toBeCloseTo(3.5417, 3);
    expect(r.breakdownShare).toBeCloseTo(0.1333, 4);
    expect(r.words).toContain("26.6 µC/m²");
  });

  it("keeps the sign of a negative reading in σ", () => {
    const r = explainCharge(explainerSchema.parse({ readingKv: "\u221212.5", distanceMm: "25" }));
    expect(r.surfaceChargeUcPerM2).toBeLessThan(0);
    expect(r.polarity).toBe("negative");
  });

  it("flags a reading air could not hold at that distance (75 kV at 25 mm)", () => {
    const r = explainCharge(explainerSchema.parse({ readingKv: "80", distanceMm: "25" }));
    expect(r.maxReadingKv).toBeCloseTo(75, 10);
    expect(r.impossible).toBe(true);
    expect(r.words).toMatch(/check the meter/);
  });

  it("people feel 2.5 kV but not 1 kV, hear 6 kV; a rubbed sheet above 10 kV is seen, an untouched one is not felt (common practice)", () => {
    expect(explainCharge(explainerSchema.parse({ readingKv: "2.5", distanceMm: "25" })).perception).toBe("felt");
    expect(explainCharge(explainerSchema.parse({ readingKv: "1", distanceMm: "25" })).perception).toBe("not felt");
    const six = explainCharge(explainerSchema.parse({ readingKv: "6", distanceMm: "25" }));
    expect(six.perception).toBe("heard");
    expect(six.words).not.toMatch(/seen/);
    expect(explainCharge(explainerSchema.parse({ readingKv: String(RUBBED_SHEET_KV + 2), distanceMm: "25" })).perception).toBe("seen");
    expect(explainCharge(explainerSchema.parse({ readingKv: String(UNTOUCHED_SHEET_KV), distanceMm: "25" })).perception).toBe("not felt");
  });

  it("refuses a zero distance with a message", () => {
    const r = explainerSchema.safeParse({ readingKv: "5", distanceMm: "0" });
    expect(fieldMessages(r.error!.issues).distanceMm).toBe("The distance from the meter to the web must be above 0 and at most 1000 mm");
  });
});

describe("facts of the trade (common practice)", () => {
  it("sensors read at about 25 mm, i.e. 1 in (25.4 mm)", () => {
    expect(SENSOR_DISTANCE_MM).toBe(25);
    expect(Math.abs(SENSOR_DISTANCE_MM - 25.4) / 25.4).toBeLessThan(0.02);
  });
  it("felt from about 2–3 kV, heard from about 5 kV, seen from about 8–10 kV, and the physics library agrees (common practice)", () => {
    expect(PERCEPTION_ONSET_KV).toEqual({ from: 2, to: 3 });
    expect(PERCEPTION_HEARD_KV).toBe(5);
    expect(PERCEPTION_SEEN_KV).toEqual({ from: 8, to: 10 });
    expect(PERCEPTION_FELT_FROM_KV).toBeGreaterThanOrEqual(PERCEPTION_ONSET_KV.from);
    expect(PERCEPTION_FELT_FROM_KV).toBeLessThanOrEqual(PERCEPTION_ONSET_KV.to);
    expect(humanPerception(PERCEPTION_ONSET_KV.to)).toBe("felt");
    expect(humanPerception(PERCEPTION_HEARD_KV)).toBe("heard");
    expect(humanPerception(PERCEPTION_SEEN_KV.from)).toBe("seen");
    const fact = TRADE_FACTS.find((f) => f.includes("heard"))!;
    expect(fact).toMatch(/heard from about 5 kV and seen from about 8–10 kV/);
    expect(TRADE_FACTS.join(" ")).not.toMatch(/heard and seen from about 5 kV/);
  });
  it("an ionizing bar without air works within about 50 mm, i.e. 2 in (50.8 mm)", () => {
    expect(PASSIVE_BAR_REACH_MM).toBe(50);
    expect(Math.abs(PASSIVE_BAR_REACH_MM - 50.8) / 50.8).toBeLessThan(0.02);
  });
  it("air-assisted neutralizers run on about 0.3 bar, i.e. 5 psig (5 × 6894.76 Pa = 0.345 bar)", () => {
    expect(AIR_ASSIST_PRESSURE_BAR).toBe(0.3);
    expect(Math.abs(AIR_ASSIST_PRESSURE_BAR - (5 * 6894.757) / 1e5) / 0.345).toBeLessThan(0.15);
  });
  it("a rubbed sheet can reach above 10 kV while an untouched one reads a few hundred volts", () => {
    expect(RUBBED_SHEET_KV).toBeGreaterThanOrEqual(10);
    expect(UNTOUCHED_SHEET_KV * 1000).toBeGreaterThanOrEqual(100);
    expect(UNTOUCHED_SHEET_KV * 1000).toBeLessThan(1000);
  });
});

describe("spark-hazard check", () => {
  it("100 pF at 2 kV = 0.2 mJ (½CV²): within tenfold of ethyl acetate's 0.46 mJ", () => {
    const r = checkSpark(sparkSchema.parse({ solvent: "Ethyl acetate", customMieMj: "", capacitancePf: "100", voltageKv: "2" }));
    expect(r.energyMj).toBeCloseTo(0.2, 12);
    expect(r.verdict).toBe("within tenfold of MIE");
    // 0.2 / 0.46 = 0.435 → "0.43×", the same wording as the Floor and the line page
    expect(r.words).toContain("0.43× the minimum ignition energy (MIE) of Ethyl acetate vapour, 0.46 mJ");
  });

  it("200 pF at 10 kV = 10 mJ (½CV²): can ignite ethanol (0.23 mJ)", () => {
    const r = checkSpark(sparkSchema.parse({ solvent: "Ethanol", customMieMj: "", capacitancePf: "200", voltageKv: "-10" }));
    expect(r.energyMj).toBeCloseTo(10, 10);
    expect(r.verdict).toBe("can ignite");
    expect(r.words).toContain("Bond and earth it");
  });

  it("a custom solvent needs its MIE, said next to that field", () => {
    const r = sparkSchema.safeParse({ solvent: CUSTOM_SOLVENT, customMieMj: "", capacitancePf: "100", voltageKv: "2" });
    expect(fieldMessages(r.error!.issues).customMieMj).toBe("Enter the minimum ignition energy in mJ");
    const ok = checkSpark(sparkSchema.parse({ solvent: CUSTOM_SOLVENT, customMieMj: "2", capacitancePf: "100", voltageKv: "1" }));
    expect(ok.energyMj).toBeCloseTo(0.05, 12);
    expect(ok.verdict).toBe("below MIE with margin");
  });

  it("warns that brush discharges (about 4 mJ) can ignite every listed solvent", () => {
    for (const s of COMMON_SOLVENTS) {
      expect(checkSpark(sparkSchema.parse({ solvent: s.name, customMieMj: "", capacitancePf: "10", voltageKv: "0.1" })).brushCanIgnite).toBe(true);
    }
  });
});

describe("relaxation time", () => {
  it("εr 2 and ρ 10¹⁰ Ω·m give τ = ε0·εr·ρ ≈ 0.177 s", () => {
    const r = estimateRelaxation(relaxationSchema.parse({ relativePermittivity: "2", resistivity: "1e10", resistivityUnit: "ohm_m", surfaceResistanceOhm: "" }));
    expect(r.tauS).toBeCloseTo(0.177, 3);
    expect(r.toTenthS).toBeCloseTo(0.177 * Math.LN10, 2);
    expect(formatSeconds(r.tauS)).toBe("177 ms");
    expect(r.surfaceClass).toBeNull();
  });

  it("a polyolefin film holds charge for days and is insulative", () => {
    const r = estimateRelaxation(relaxationSchema.parse({ relativePermittivity: "2.3", resistivity: "10^16", resistivityUnit: "ohm_m", surfaceResistanceOhm: "1e13" }));
    expect(r.tauS / 86400).toBeGreaterThan(1);
    expect(r.surfaceClass).toBe("insulative");
    expect(r.words).toMatch(/must be removed by a neutralizer/);
  });

  it("refuses a resistivity of zero, in the unit chosen", () => {
    const r = relaxationSchema.safeParse({ relativePermittivity: "2", resistivity: "0", resistivityUnit: "ohm_m", surfaceResistanceOhm: "" });
    expect(fieldMessages(r.error!.issues).resistivity).toBe("The volume resistivity must be above 0 and at most 1e22 Ω·m");
    const cm = relaxationSchema.safeParse({ relativePermittivity: "2", resistivity: "0", resistivityUnit: "ohm_cm", surfaceResistanceOhm: "" });
    expect(fieldMessages(cm.error!.issues).resistivity).toBe("The volume resistivity must be above 0 and at most 1e24 Ω·cm");
  });

  it("the same number in Ω·cm is 100× shorter: 1 Ω·cm = 0.01 Ω·m (SI definition of the units)", () => {
    // datasheet value 1e12 Ω·cm = 1e10 Ω·m → τ = ε0 · 2 · 1e10 = 0.177 s; read wrongly as Ω·m it is 17.7 s
    const asCm = estimateRelaxation(relaxationSchema.parse({ relativePermittivity: "2", resistivity: "1e12", resistivityUnit: "ohm_cm", surfaceResistanceOhm: "" }));
    const asM = estimateRelaxation(relaxationSchema.parse({ relativePermittivity: "2", resistivity: "1e12", resistivityUnit: "ohm_m", surfaceResistanceOhm: "" }));
    expect(asCm.resistivityOhmM).toBeCloseTo(1e10, 0);
    expect(asCm.tauS).toBeCloseTo(8.8541878128e-12 * 2 * 1e10, 12);
    expect(asM.tauS / asCm.tauS).toBeCloseTo(100, 10);
    expect(formatSeconds(asCm.tauS)).toBe("177 ms");
  });
});
