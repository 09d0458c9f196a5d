// Spark-energy margin of a solvent line at its worst charge (lib/physics/line-hazard.ts).
import { describe, expect, it } from "vitest";
import { formatMieRatio, SPARK_SCREENING_CAUTION, sparkMarginForLine, sparkMarginPhrase } from "@/lib/physics/line-hazard";

describe("sparkMarginForLine", () => {
  it("100 pF at 2 kV stores 0.2 mJ (½CV² = ½·100e−12·2000² J); against ethyl acetate 0.46 mJ it is within tenfold", () => {
    // ½CV² worked value, textbook; ethyl acetate MIE 0.46 mJ (NFPA 77 Annex table, from memory)
    const m = sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: -2 })!;
    expect(m.voltageKv).toBe(2);
    expect(m.energyMj).toBeCloseTo(0.2, 12);
    expect(m.ratioToMie).toBeCloseTo(0.2 / 0.46, 12);
    expect(m.marginFactor).toBeCloseTo(2.3, 12);
    expect(m.verdict).toBe("within tenfold of MIE");
  });

  it("200 pF at 10 kV stores 10 mJ and can ignite ethanol vapour (MIE 0.23 mJ)", () => {
    // ½CV²: ½·200e−12·(1e4)² = 0.01 J = 10 mJ; ethanol MIE 0.23 mJ (NFPA 77 Annex, from memory)
    const m = sparkMarginForLine({ solventMieMj: 0.23, conductorCapacitancePf: 200, worstChargeKv: 10 })!;
    expect(m.energyMj).toBeCloseTo(10, 10);
    expect(m.verdict).toBe("can ignite");
  });

  it("gives the voltages at the MIE and at a tenth of it: V = √(2W/C)", () => {
    // 100 pF reaching 0.46 mJ: √(2·0.46e−3 / 100e−12) = 3033 V; a tenth of the energy at V/√10 = 959 V
    const m = sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: 0.5 })!;
    expect(m.voltageAtMieKv).toBeCloseTo(Math.sqrt((2 * 0.46e-3) / 100e-12) / 1000, 9);
    expect(m.voltageAtMieKv).toBeCloseTo(3.033, 3);
    expect(m.voltageAtMarginKv).toBeCloseTo(0.959, 3);
    expect(m.verdict).toBe("below MIE with margin");
  });

  it("a line at 0 kV has an unlimited margin", () => {
    const m = sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: 0 })!;
    expect(m.energyMj).toBe(0);
    expect(m.marginFactor).toBe(Number.POSITIVE_INFINITY);
  });

  it("is null for a line without solvent, capacitance or a reading", () => {
    expect(sparkMarginForLine({ solventMieMj: null, conductorCapacitancePf: 100, worstChargeKv: 5 })).toBeNull();
    expect(sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: null, worstChargeKv: 5 })).toBeNull();
    expect(sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: undefined })).toBeNull();
  });

  it("impossible values throw", () => {
    expect(() => sparkMarginForLine({ solventMieMj: 0, conductorCapacitancePf: 100, worstChargeKv: 5 })).toThrow(RangeError);
    expect(() => sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 0, worstChargeKv: 5 })).toThrow(RangeError);
    expect(() => sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: Number.NaN })).toThrow(RangeError);
  });
});

describe("spark-margin wording, the same on the Floor, the line page and the calculator", () => {
  it("ethanol (MIE 0.23 mJ) with 100 pF at 17.2 kV: ½CV² = 14.8 mJ = 64× the MIE: can ignite", () => {
    // ½ · 100e−12 F · (17 200 V)² = 14.79 mJ; 14.79 / 0.23 = 64.3
    const m = sparkMarginForLine({ solventMieMj: 0.23, conductorCapacitancePf: 100, worstChargeKv: -17.2 })!;
    expect(m.energyMj).toBeCloseTo(14.792, 3);
    expect(sparkMarginPhrase(m.ratioToMie, m.verdict)).toBe("stored energy 64× the MIE: can ignite");
  });

  it("ethyl acetate (0.46 mJ) with 100 pF at 0.17 kV: 1.4 µJ = 0.003× the MIE: below, never '×0.0'", () => {
    // ½ · 100e−12 · 170² = 1.445e−6 J = 0.001445 mJ; / 0.46 = 0.00314
    const m = sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: 0.17 })!;
    expect(sparkMarginPhrase(m.ratioToMie, m.verdict)).toBe("stored energy 0.003× the MIE: below");
    expect(sparkMarginPhrase(m.ratioToMie, m.verdict)).not.toMatch(/×0\.0\b/);
  });

  it("between a tenth and the MIE it says so: 0.2 mJ against 0.46 mJ is 0.43×", () => {
    const m = sparkMarginForLine({ solventMieMj: 0.46, conductorCapacitancePf: 100, worstChargeKv: 2 })!;
    expect(sparkMarginPhrase(m.ratioToMie, m.verdict)).toBe("stored energy 0.43× the MIE: within tenfold");
  });

  it("formats ratios by size and refuses nonsense", () => {
    expect(formatMieRatio(0)).toBe("0×");
    expect(formatMieRatio(1.54)).toBe("1.5×");
    expect(formatMieRatio(12.6)).toBe("13×");
    expect(() => formatMieRatio(Number.NaN)).toThrow(RangeError);
  });

  it("the caution printed beside the figure defers to NFPA 77, IEC TS 60079-32-1 and a qualified person", () => {
    expect(SPARK_SCREENING_CAUTION).toContain("NFPA 77");
    expect(SPARK_SCREENING_CAUTION).toContain("IEC TS 60079-32-1");
    expect(SPARK_SCREENING_CAUTION).toContain("qualified person");
  });
});
