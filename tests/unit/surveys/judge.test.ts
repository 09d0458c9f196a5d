// Distance equivalence, the air-breakdown refusal and the reduction across a neutralizer.
import { describe, expect, it } from "vitest";
import { checkReading, distanceEquivalent, reductionPct, toKv } from "@/lib/surveys/judge";

describe("distance equivalence (large flat sheet, E = V / d)", () => {
  it("a reading at twice the calibrated distance is half the surface's potential", () => {
    // Parallel-plate field E = V / d (any physics text, e.g. Halliday/Resnick "capacitance", from
    // memory): the meter shows E × 25 mm. 10 kV shown at 50 mm → E = 10 kV / 25 mm = 400 kV/m;
    // the surface is at 400 kV/m × 50 mm = 20 kV.
    const eq = distanceEquivalent(10, 50, 25);
    expect(eq.fieldVPerM).toBeCloseTo(400_000, 6);
    expect(eq.equivalentKv).toBeCloseTo(20, 9);
    expect(eq.offDistance).toBe(true);
  });

  it("closer than calibrated reads high; the sign is kept", () => {
    // Common practice (meter makers' guidance): a field meter held closer than its calibrated
    // 1 in / 25 mm reads high, in proportion for a large flat surface. −12 kV at 10 mm → −4.8 kV.
    expect(distanceEquivalent(-12, 10, 25).equivalentKv).toBeCloseTo(-4.8, 9);
  });

  it("at the calibrated distance the reading is its own equivalent and is not warned about", () => {
    // Common practice: ±10 % of the calibrated distance (±2.5 mm at 25 mm) is what a hand holds.
    const c = checkReading({ value: -7.3, unit: "kV", distanceMm: 26, calibratedMm: 25 });
    expect(c.ok).toBe(true);
    if (c.ok) {
      expect(c.warnings).toEqual([]);
      expect(c.equivalent.equivalentKv).toBeCloseTo(-7.3 * 26 / 25, 9);
    }
    const off = checkReading({ value: -7.3, unit: "kV", distanceMm: 40, calibratedMm: 25 });
    expect(off.ok && off.warnings[0]).toMatch(/11\.7 kV at 25 mm/); // 7.3 × 40 / 25 = 11.68
  });

  it("volts are converted to kilovolts", () => {
    expect(toKv(1500, "V")).toBe(1.5);
    const c = checkReading({ value: -850, unit: "V", distanceMm: 25 });
    expect(c.ok && c.equivalent.equivalentKv).toBeCloseTo(-0.85, 9);
  });
});

describe("refusals", () => {
  it("refuses a reading above what air can hold at that distance", () => {
    // Air breaks down at about 3 MV/m (textbook dielectric strength of air; NFPA 77, from memory):
    // at 25 mm at most 3e6 × 0.025 = 75 kV. 80 kV is refused, 74 kV accepted.
    const c = checkReading({ value: 80, unit: "kV", distanceMm: 25, calibratedMm: 25 });
    expect(c.ok).toBe(false);
    if (!c.ok) {
      expect(c.field).toBe("value");
      expect(c.reason).toMatch(/Air cannot hold this/);
      expect(c.reason).toMatch(/3 MV\/m/);
    }
    expect(checkReading({ value: 74, unit: "kV", distanceMm: 25 }).ok).toBe(true);
  });

  it("judges the field at the meter, whatever distance the reading was taken at", () => {
    // 40 kV shown on a 25 mm meter held at 10 mm: E = 1.6 MV/m, below 3 MV/m → accepted, surface 16 kV.
    const ok = checkReading({ value: 40, unit: "kV", distanceMm: 10, calibratedMm: 25 });
    expect(ok.ok && ok.equivalent.equivalentKv).toBeCloseTo(16, 9);
    // 80 kV shown: E = 3.2 MV/m → refused (the surface would be 32 kV at 10 mm, above the 30 kV ceiling there).
    expect(checkReading({ value: 80, unit: "kV", distanceMm: 10, calibratedMm: 25 }).ok).toBe(false);
  });

  it("refuses a distance of zero or below", () => {
    for (const d of [0, -5]) {
      const c = checkReading({ value: 3, unit: "kV", distanceMm: d });
      expect(c.ok).toBe(false);
      if (!c.ok) {
        expect(c.field).toBe("distanceMm");
        expect(c.reason).toMatch(/more than 0 mm/);
      }
    }
    expect(() => distanceEquivalent(3, 0, 25)).toThrow(RangeError);
  });
});

describe("reduction across a neutralizer", () => {
  it("is 100 × (1 − |after| / |before|)", () => {
    // Common practice: neutralizer effect = (V before − V after) / V before. −20 kV → −2 kV is 90 %.
    expect(reductionPct(-20, -2)).toBeCloseTo(90, 9);
    // polarity does not matter: +15 kV → −3 kV removes 80 % of the magnitude
    expect(reductionPct(15, -3)).toBeCloseTo(80, 9);
  });

  it("is negative when the bar adds charge, and undefined with nothing before", () => {
    expect(reductionPct(4, 6)).toBeCloseTo(-50, 9);
    expect(reductionPct(0, 2)).toBeNull();
  });
});
