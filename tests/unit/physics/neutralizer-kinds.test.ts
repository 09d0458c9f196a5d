// Neutralizer kinds, their defaults, the charged plate and the slowdown against a unit's own
// baseline. Sources beside each expected value.
import { describe, expect, it } from "vitest";
import { LEGACY_NEUTRALIZER_KIND_MAP, mountingRangeMm, NEUTRALIZER_KIND_SPECS, NEUTRALIZER_KINDS } from "@/lib/physics/neutralizer-kinds";
import {
  CHECK_STANDARD_EDITIONS,
  decaySlowdown,
  DEFAULT_OFFSET_LIMIT_V,
  defaultCheckLimits,
  judgeCheck,
  SLOWDOWN_WARN_FACTOR,
  STANDARD_PLATE,
} from "@/lib/physics/neutralizer";

const DAY = 86_400_000;

describe("neutralizer kinds", () => {
  it("tells bars apart and has nozzles and passive cords beside blowers", () => {
    expect(NEUTRALIZER_KINDS).toEqual(["ac_bar", "pulsed_dc_bar", "steady_dc_bar", "air_assisted_bar", "blower", "nozzle", "passive_cord", "other"]);
  });

  it("every kind names where its range and default come from", () => {
    for (const k of NEUTRALIZER_KINDS) {
      const s = NEUTRALIZER_KIND_SPECS[k];
      expect(s.source.length).toBeGreaterThan(20);
      if (k !== "other") expect(s.source).toMatch(/common practice/);
      expect(s.defaultMaxDecayS).toBeGreaterThan(0);
    }
  });

  it("pulsed-DC bars are mounted 100–600 mm, AC bars within about 50 mm (2 in) (common practice)", () => {
    expect(mountingRangeMm("pulsed_dc_bar", false)).toEqual({ minMm: 100, maxMm: 600 });
    expect(mountingRangeMm("ac_bar", false)).toEqual({ minMm: 10, maxMm: 50 });
    expect(mountingRangeMm("ac_bar", true).maxMm).toBe(300);
    expect(mountingRangeMm("other", false)).toEqual({ minMm: null, maxMm: null });
  });

  it("old kinds map safely: an unspecified bar becomes the kind with the shortest range (AC)", () => {
    expect(LEGACY_NEUTRALIZER_KIND_MAP.ionizing_bar).toBe("ac_bar");
    expect(LEGACY_NEUTRALIZER_KIND_MAP.ionizing_bar_air).toBe("air_assisted_bar");
    expect(LEGACY_NEUTRALIZER_KIND_MAP.ionized_air_blower).toBe("blower");
    expect(LEGACY_NEUTRALIZER_KIND_MAP.ionizing_nozzle).toBe("nozzle");
    const maxes = NEUTRALIZER_KINDS.filter((k) => k !== "other").map((k) => NEUTRALIZER_KIND_SPECS[k].mountingMaxMm!);
    expect(NEUTRALIZER_KIND_SPECS.ac_bar.mountingMaxMm).toBe(Math.min(...maxes.filter((m) => m > 25)));
  });
});

describe("check limits per kind", () => {
  it("a bar that normally decays in 1–2 s and slows tenfold fails its kind's default, where the old 20 s passed it", () => {
    // common practice: clean AC bar well under 1 s, pulsed-DC 1–2 s; defaults 2 s and 5 s
    const slowed = { decayPosS: 15, decayNegS: 16, offsetV: 5 };
    expect(judgeCheck(slowed, { maxDecayS: 20, maxOffsetAbsV: 35 }).pass).toBe(true);
    expect(judgeCheck(slowed, defaultCheckLimits("pulsed_dc_bar")).pass).toBe(false);
    expect(judgeCheck({ decayPosS: 1.2, decayNegS: 1.4, offsetV: 5 }, defaultCheckLimits("pulsed_dc_bar")).pass).toBe(true);
    expect(defaultCheckLimits("ac_bar")).toEqual({ maxDecayS: 2, maxOffsetAbsV: 35 });
  });

  it("offset ±35 V is ANSI/ESD S20.20's ionizer limit (S20.20-2021, from memory)", () => {
    expect(DEFAULT_OFFSET_LIMIT_V).toBe(35);
    expect(CHECK_STANDARD_EDITIONS.program).toBe("ANSI/ESD S20.20-2021");
  });

  it("the plate is 20 pF on 15 × 15 cm (ANSI/ESD STM3.1-2015, IEC 61340-4-7:2017)", () => {
    expect(STANDARD_PLATE).toEqual({ capacitancePf: 20, widthMm: 150, lengthMm: 150 });
    expect(CHECK_STANDARD_EDITIONS.testMethodAnsi).toBe("ANSI/ESD STM3.1-2015");
    expect(CHECK_STANDARD_EDITIONS.testMethodIec).toBe("IEC 61340-4-7:2017");
  });
});

describe("slower than its own baseline (decay trend)", () => {
  const series = (decays: number[]) => decays.map((decayS, i) => ({ ts: i * 7 * DAY, decayS }));

  it("1.2 s after cleaning, now 6 s: ×5 slower, warned although a 20 s limit passes it", () => {
    // n = 4 → baseline = median of the first ⌊3/2⌋ = 1 check = 1.2 s; 6 / 1.2 = 5
    const s = decaySlowdown(series([1.2, 1.9, 3.4, 6]))!;
    expect(s.baselineS).toBe(1.2);
    expect(s.currentS).toBe(6);
    expect(s.factor).toBeCloseTo(5, 12);
    expect(s.warn).toBe(true);
  });

  it("baseline is the median of the earlier checks, up to three", () => {
    // n = 8 → first 3: median(1.0, 1.4, 1.2) = 1.2; latest 2.0 → ×1.67, under the ×2 warning
    const s = decaySlowdown(series([1.0, 1.4, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0]))!;
    expect(s.baselineChecks).toBe(3);
    expect(s.baselineS).toBe(1.2);
    expect(s.factor).toBeCloseTo(2 / 1.2, 12);
    expect(s.warn).toBe(false);
    expect(SLOWDOWN_WARN_FACTOR).toBe(2);
  });

  it("needs two checks and a non-zero baseline", () => {
    expect(decaySlowdown(series([1.5]))).toBeNull();
    expect(decaySlowdown(series([0, 3]))).toBeNull();
    expect(() => decaySlowdown(series([1, -2]))).toThrow(RangeError);
  });
});
