import { beforeAll, describe, expect, it } from "vitest";
import psychrolib from "psychrolib";
import {
  TRIPLE_POINT_PRESSURE_PA,
  absoluteHumidityGPerM3,
  dewOrFrostPointC,
  dewPointC,
  dryAirMassFlowKgPerH,
  frostPointC,
  humidifierWaterKgPerH,
  humidityRatioKgPerKg,
  indoorRhAfterHeatingPct,
  moistAirDensityKgPerM3,
  rhFromHumidityRatioPct,
  saturationPressureOverIcePa,
  saturationPressureOverWaterPa,
  saturationPressurePa,
  vapourPressurePa,
} from "../../../lib/physics/psychrometrics";

/** |actual − expected| / |expected|. */
function relativeError(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

beforeAll(() => {
  psychrolib.SetUnitSystem(psychrolib.SI);
});

// Grid asked of the physics library: −20..50 °C, 5..95 % RH, with points either side of the
// triple point where the ice/water switch happens.
const GRID_TEMPS_C = [-20, -15, -10, -5, -1, 0, 0.01, 0.5, 5, 10, 15, 20, 21, 25, 30, 35, 40, 45, 50];
const GRID_RH_PCT = [5, 10, 20, 30, 40, 50, 60, 70, 80, 90, 95];

describe("saturation pressure against psychrolib 1.1.1 (same ASHRAE 2017 eqs. 5 and 6)", () => {
  // psychrolib implements the same Hyland–Wexler equations with the same coefficients, over ice
  // at or below 0.01 °C and over water above. Identical formulas, so the tolerance is 1e-9
  // relative (floating-point order of operations only).
  it.each(GRID_TEMPS_C)("ASHRAE basis at %s °C equals psychrolib GetSatVapPres", (tempC) => {
    expect(relativeError(saturationPressurePa(tempC, "ashrae"), psychrolib.GetSatVapPres(tempC))).toBeLessThan(1e-9);
  });

  it("over-water and over-ice bases equal psychrolib on their own side of the triple point", () => {
    for (const tempC of GRID_TEMPS_C) {
      const reference = psychrolib.GetSatVapPres(tempC);
      const ours = tempC <= 0.01 ? saturationPressureOverIcePa(tempC) : saturationPressureOverWaterPa(tempC);
      expect(relativeError(ours, reference)).toBeLessThan(1e-9);
    }
  });

  it("over water is above over ice below freezing (supercooled water has the higher vapour pressure)", () => {
    for (const tempC of [-20, -10, -1]) {
      expect(saturationPressureOverWaterPa(tempC)).toBeGreaterThan(saturationPressureOverIcePa(tempC));
    }
  });
});

describe("saturation pressure against ASHRAE Handbook—Fundamentals 2017 ch. 1 Table 3", () => {
  // Table 3 values as quoted in psychrolib's own test suite (psychrometrics/psychrolib,
  // tests/test_psychrolib_si.py, "Table 3 of ch. 1 of the 2017 ASHRAE Handbook - Fundamentals").
  // The table is computed from IAPWS formulations; ASHRAE states eqs. 5 and 6 agree with it
  // within 300 ppm, which is the tolerance used (psychrolib's tests use the same).
  const TABLE_3: Array<[number, number, string]> = [
    [-20, 103.24, "over ice"],
    [-5, 401.74, "over ice"],
    [5, 872.6, "over water"],
    [25, 3169.7, "over water (some editions print 3.1699 kPa)"],
    [50, 12351.3, "over water"],
  ];
  it.each(TABLE_3)("%s °C → %s Pa (%s)", (tempC, expectedPa) => {
    expect(relativeError(saturationPressurePa(tempC, "ashrae"), expectedPa)).toBeLessThan(3e-4);
  });

  it("both equations give the triple-point pressure 611.657 Pa at 0.01 °C", () => {
    // IAPWS triple point of water: 0.01 °C, 611.657 Pa. ASHRAE Table 3 prints 0.6117 kPa at
    // 0.01 °C (from memory). (611.2 Pa is the value at 0 °C over supercooled water, below.)
    expect(relativeError(saturationPressureOverWaterPa(0.01), 611.657)).toBeLessThan(1e-5);
    expect(relativeError(saturationPressureOverIcePa(0.01), 611.657)).toBeLessThan(1e-5);
    expect(TRIPLE_POINT_PRESSURE_PA).toBe(611.657);
  });

  it("0 °C: 611.15 Pa over ice and 611.21 Pa over supercooled water", () => {
    // 611.15 Pa over ice at 0 °C: ASHRAE 2017 Table 3 (0.61115 kPa) and IAPWS sublimation
    // curve (611.154 Pa), from memory. 611.21 Pa over water at 0 °C: WMO/IAPWS liquid value,
    // from memory.
    expect(relativeError(saturationPressureOverIcePa(0), 611.15)).toBeLessThan(3e-4);
    expect(relativeError(saturationPressureOverWaterPa(0), 611.21)).toBeLessThan(3e-4);
  });
});

describe("dew point against psychrolib 1.1.1", () => {
  // psychrolib's GetTDewPointFromRelHum inverts GetSatVapPres, which is over ice at or below
  // 0.01 °C: below freezing it returns a frost point, and it takes the RH over ice too. So it is
  // compared with our ASHRAE-convention dewOrFrostPointC (RH basis 'ashrae'); where its result is
  // above 0.01 °C with dewPointC, and where it is at or below with frostPointC.
  // psychrolib iterates to 0.001 K; tolerance 0.005 K.
  it("dewOrFrostPointC matches GetTDewPointFromRelHum across the grid", () => {
    let compared = 0;
    for (const tempC of GRID_TEMPS_C) {
      for (const rhPct of GRID_RH_PCT) {
        const reference = psychrolib.GetTDewPointFromRelHum(tempC, rhPct / 100);
        expect(Math.abs(dewOrFrostPointC(tempC, rhPct, "ashrae") - reference)).toBeLessThan(0.005);
        if (reference > 0.01) {
          expect(Math.abs(dewPointC(tempC, rhPct, "ashrae") - reference)).toBeLessThan(0.005);
        } else {
          expect(Math.abs(frostPointC(tempC, rhPct, "ashrae") - reference)).toBeLessThan(0.005);
        }
        compared++;
      }
    }
    expect(compared).toBe(GRID_TEMPS_C.length * GRID_RH_PCT.length);
  });

  it("21 °C at 40 % RH has a dew point of about 6.9 °C", () => {
    // Psychrometric chart reading (common practice); psychrolib gives 6.899 °C.
    expect(dewPointC(21, 40)).toBeCloseTo(6.9, 1);
  });

  it("dew point over water below freezing inverts eq. 6 exactly and lies below the frost point", () => {
    for (const tempC of [-20, -10, -5]) {
      for (const rhPct of [30, 60, 90]) {
        const pwPa = vapourPressurePa(tempC, rhPct, "water");
        const tdC = dewPointC(tempC, rhPct, "water");
        // Round trip through the saturation curve (definition of dew point, ASHRAE 2017 ch. 1).
        expect(relativeError(saturationPressureOverWaterPa(tdC), pwPa)).toBeLessThan(1e-8);
        // Same vapour pressure reaches ice saturation first: frost point above dew point.
        expect(frostPointC(tempC, rhPct, "water")).toBeGreaterThan(tdC);
      }
    }
  });

  it("saturated air has its own temperature as dew point", () => {
    expect(dewPointC(25, 100)).toBeCloseTo(25, 6);
    expect(frostPointC(-10, 100, "ice")).toBeCloseTo(-10, 6);
  });

  it("frost point is refused where the vapour pressure is above the triple point", () => {
    expect(() => frostPointC(25, 50)).toThrow(RangeError);
  });
});

describe("humidity ratio against psychrolib 1.1.1 and ASHRAE 2017 Table 2", () => {
  // psychrolib GetHumRatioFromRelHum uses the same eq. 20 (W = 0.621945 pw / (p − pw)) with RH
  // over ice below 0.01 °C: identical formulas, tolerance 1e-9 relative.
  it("matches GetHumRatioFromRelHum across the grid at 101 325 Pa and 95 461 Pa", () => {
    for (const pressurePa of [101325, 95461]) {
      for (const tempC of GRID_TEMPS_C) {
        for (const rhPct of GRID_RH_PCT) {
          const reference = psychrolib.GetHumRatioFromRelHum(tempC, rhPct / 100, pressurePa);
          expect(relativeError(humidityRatioKgPerKg(tempC, rhPct, pressurePa), reference)).toBeLessThan(1e-9);
        }
      }
    }
  });

  // Saturation humidity ratios from ASHRAE 2017 ch. 1 Table 2 as quoted in psychrolib's test
  // suite (tests/test_psychrolib_si.py); the perfect-gas formula agrees to within 0.5–1 %
  // (the table includes the enhancement factor), tolerances as psychrolib uses.
  it.each([
    [-20, 0.0006373, 0.01],
    [5, 0.005425, 0.005],
    [25, 0.020173, 0.005],
  ])("saturated at %s °C → %s kg/kg", (tempC, expected, tolerance) => {
    expect(relativeError(humidityRatioKgPerKg(tempC, 100), expected)).toBeLessThan(tolerance);
  });

  it("rhFromHumidityRatioPct inverts humidityRatioKgPerKg and matches GetRelHumFromHumRatio", () => {
    for (const tempC of [-10, 5, 21, 35]) {
      for (const rhPct of [10, 45, 90]) {
        const w = humidityRatioKgPerKg(tempC, rhPct);
        expect(rhFromHumidityRatioPct(tempC, w)).toBeCloseTo(rhPct, 9);
        expect(rhFromHumidityRatioPct(tempC, w)).toBeCloseTo(100 * psychrolib.GetRelHumFromHumRatio(tempC, w, 101325), 6);
      }
    }
  });
});

describe("absolute humidity and density", () => {
  it("saturation vapour density at 20, 25 and 30 °C", () => {
    // Saturation vapour density tables (e.g. CRC Handbook): 17.3 g/m³ at 20 °C, 23.0 g/m³ at
    // 25 °C, 30.4 g/m³ at 30 °C (from memory). Tolerance 0.5 %.
    expect(relativeError(absoluteHumidityGPerM3(20, 100), 17.3)).toBeLessThan(0.005);
    expect(relativeError(absoluteHumidityGPerM3(25, 100), 23.0)).toBeLessThan(0.005);
    expect(relativeError(absoluteHumidityGPerM3(30, 100), 30.4)).toBeLessThan(0.005);
  });

  it("absolute humidity equals moist-air density × W / (1 + W) from psychrolib", () => {
    // Independent path: vapour density = ρ_moist · W / (1 + W) with psychrolib's
    // GetMoistAirDensity (ASHRAE 2017 eq. 11) and GetHumRatioFromRelHum (eq. 20).
    for (const tempC of [-15, 0.5, 21, 40]) {
      for (const rhPct of [10, 50, 95]) {
        const w = psychrolib.GetHumRatioFromRelHum(tempC, rhPct / 100, 101325);
        const expectedGPerM3 = (1000 * psychrolib.GetMoistAirDensity(tempC, w, 101325) * w) / (1 + w);
        expect(relativeError(absoluteHumidityGPerM3(tempC, rhPct), expectedGPerM3)).toBeLessThan(1e-4);
      }
    }
  });

  it("moist-air density matches psychrolib GetMoistAirDensity", () => {
    // Same eqs. 11 and 26; 25 °C 50 % RH at sea level is 1.177 kg/m³.
    for (const tempC of [-10, 21, 40]) {
      for (const rhPct of [20, 80]) {
        const w = psychrolib.GetHumRatioFromRelHum(tempC, rhPct / 100, 101325);
        expect(relativeError(moistAirDensityKgPerM3(tempC, rhPct), psychrolib.GetMoistAirDensity(tempC, w, 101325))).toBeLessThan(1e-9);
      }
    }
    expect(moistAirDensityKgPerM3(25, 50)).toBeCloseTo(1.177, 3);
  });
});

describe("indoor RH after heating outdoor air (winter dry-out)", () => {
  // Worked example, computed by hand from eqs. 5 and 6 (values rounded):
  //   pws,ice(−10 °C) = 259.90 Pa, pws,water(−10 °C) = 286.56 Pa, pws(21 °C) = 2487.67 Pa.
  //   Over ice:   0.80 × 259.90 / 2487.67 = 8.36 % RH indoors.
  //   Over water: 0.80 × 286.56 / 2487.67 = 9.22 % RH indoors.
  it("−10 °C, 80 % RH outdoors heated to 21 °C → about 8.4 % on the over-ice basis", () => {
    const rhPct = indoorRhAfterHeatingPct({ outdoorTempC: -10, outdoorRhPct: 80, indoorTempC: 21, basis: "ice" });
    expect(Math.abs(rhPct - 8.4)).toBeLessThan(0.2);
    expect(rhPct).toBeCloseTo(8.36, 2);
  });

  it("−10 °C, 80 % RH outdoors heated to 21 °C → about 9.2 % on the over-water basis", () => {
    const rhPct = indoorRhAfterHeatingPct({ outdoorTempC: -10, outdoorRhPct: 80, indoorTempC: 21, basis: "water" });
    expect(Math.abs(rhPct - 9.2)).toBeLessThan(0.2);
    expect(rhPct).toBeCloseTo(9.22, 2);
  });

  it("'ice' and 'ashrae' bases agree, and agree with psychrolib's humidity-ratio route", () => {
    // psychrolib route: W from outdoor state, then RH at indoor temperature with the same W.
    const w = psychrolib.GetHumRatioFromRelHum(-10, 0.8, 101325);
    const expectedPct = 100 * psychrolib.GetRelHumFromHumRatio(21, w, 101325);
    const ice = indoorRhAfterHeatingPct({ outdoorTempC: -10, outdoorRhPct: 80, indoorTempC: 21, basis: "ice" });
    const ashrae = indoorRhAfterHeatingPct({ outdoorTempC: -10, outdoorRhPct: 80, indoorTempC: 21, basis: "ashrae" });
    expect(ice).toBe(ashrae);
    expect(ice).toBeCloseTo(expectedPct, 6);
  });

  it("above freezing the basis makes no difference", () => {
    const args = { outdoorTempC: 5, outdoorRhPct: 70, indoorTempC: 21 };
    expect(indoorRhAfterHeatingPct({ ...args, basis: "water" })).toBe(indoorRhAfterHeatingPct({ ...args, basis: "ice" }));
  });

  it("caps at 100 % when the air is cooled below its dew point", () => {
    expect(indoorRhAfterHeatingPct({ outdoorTempC: 30, outdoorRhPct: 80, indoorTempC: 15, basis: "ashrae" })).toBe(100);
  });
});

describe("humidifier water", () => {
  // Hand calculation, 10 000 m³/h at 21 °C from 20 % to 45 % RH, 101 325 Pa (eqs. 20, 22, 26):
  //   pws(21 °C) = 2487.67 Pa; pw = 497.53 Pa → W = 0.621945·497.53/(101325−497.53) = 0.0030690;
  //   pw = 1119.45 Pa → W = 0.0069481; v = 287.042·294.15·(1 + 1.607858·0.0030690)/101325
  //   = 0.83740 m³/kg_da; ṁda = 10 000 / 0.83740 = 11 941.7 kg/h;
  //   water = 11 941.7 × (0.0069481 − 0.0030690) = 46.32 kg/h.
  it("10 000 m³/h at 21 °C from 20 % to 45 % needs about 46.3 kg/h", () => {
    const waterKgPerH = humidifierWaterKgPerH({ airflowM3PerH: 10000, indoorTempC: 21, fromRhPct: 20, toRhPct: 45 });
    expect(waterKgPerH).toBeCloseTo(46.32, 1);
    expect(dryAirMassFlowKgPerH(10000, 21, 20)).toBeCloseTo(11941.7, 0);
  });

  it("matches the same balance built from psychrolib", () => {
    for (const [tempC, fromRh, toRh, pressurePa] of [
      [18, 15, 50, 101325],
      [24, 30, 55, 95461],
    ]) {
      const wFrom = psychrolib.GetHumRatioFromRelHum(tempC, fromRh / 100, pressurePa);
      const wTo = psychrolib.GetHumRatioFromRelHum(tempC, toRh / 100, pressurePa);
      const expected = (5000 / psychrolib.GetMoistAirVolume(tempC, wFrom, pressurePa)) * (wTo - wFrom);
      const ours = humidifierWaterKgPerH({ airflowM3PerH: 5000, indoorTempC: tempC, fromRhPct: fromRh, toRhPct: toRh, pressurePa });
      expect(relativeError(ours, expected)).toBeLessThan(1e-9);
    }
  });

  it("needs no water when the target is not above the current RH", () => {
    expect(humidifierWaterKgPerH({ airflowM3PerH: 10000, indoorTempC: 21, fromRhPct: 50, toRhPct: 40 })).toBe(0);
  });
});

describe("impossible inputs", () => {
  it("RH outside 0–100 % throws a RangeError", () => {
    expect(() => vapourPressurePa(20, -1)).toThrow(RangeError);
    expect(() => vapourPressurePa(20, 100.5)).toThrow(RangeError);
    expect(() => dewPointC(20, 120)).toThrow(RangeError);
    expect(() => humidityRatioKgPerKg(20, Number.NaN)).toThrow(RangeError);
    expect(() => humidifierWaterKgPerH({ airflowM3PerH: 1000, indoorTempC: 20, fromRhPct: 30, toRhPct: 101 })).toThrow(RangeError);
  });

  it("0 % RH has no dew point", () => {
    expect(() => dewPointC(20, 0)).toThrow(/above 0 %/);
  });

  it("temperatures outside the equations' range throw", () => {
    expect(() => saturationPressurePa(-120)).toThrow(RangeError);
    expect(() => saturationPressureOverWaterPa(250)).toThrow(RangeError);
    expect(() => saturationPressureOverIcePa(5)).toThrow(RangeError);
    expect(() => saturationPressurePa(5, "ice")).toThrow(RangeError);
  });

  it("negative airflow and non-positive pressure throw", () => {
    expect(() => humidifierWaterKgPerH({ airflowM3PerH: -1, indoorTempC: 20, fromRhPct: 30, toRhPct: 40 })).toThrow(RangeError);
    expect(() => humidityRatioKgPerKg(20, 50, 0)).toThrow(RangeError);
  });
});
