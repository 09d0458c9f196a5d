// The weekly review's charge-vs-humidity fit uses each hour's RMS √(Σv²/n) from the rollups, so
// opposite polarities do not cancel. Expected values are worked by hand beside each assertion.
import { describe, expect, it } from "vitest";
import { buildWeekly, CHARGE_FIT_MEASURE, rollupRms, type HourlyMean, type WeeklyInput } from "@/lib/reports/weekly";

const HOUR = 3_600_000;
const START = Date.UTC(2026, 0, 5); // a Monday

/** The rollup of readings: count, Σv and Σv², as the ingest worker stores them. */
function rollup(deviceId: number, channel: string, bucketTs: number, values: number[]): HourlyMean {
  const count = values.length;
  const sum = values.reduce((a, v) => a + v, 0);
  const sumSq = values.reduce((a, v) => a + v * v, 0);
  return { deviceId, channel, bucketTs, mean: sum / count, rms: rollupRms(count, sumSq) };
}

function input(hourly: HourlyMean[]): WeeklyInput {
  return {
    plantName: "Test plant",
    window: { startTs: START, endTs: START + 7 * 24 * HOUR, timeZone: "UTC", firstDate: "2026-01-05", lastDate: "2026-01-11" },
    generatedTs: START + 7 * 24 * HOUR,
    area: { id: 1, name: "Hall", rhMinPct: 40, rhMaxPct: 60, logger: { id: 90 }, lines: [] },
    line: {
      id: 1,
      name: "Line",
      areaId: 1,
      solventName: null,
      solventMieMj: null,
      conductorCapacitancePf: null,
      speedGateway: null,
      points: [{ id: 11, name: "Unwind", position: 1, fieldMeter: { id: 21 }, neutralizer: null }],
    },
    rules: [],
    minuteCharge: new Map(),
    minuteRhMin: [],
    hourly,
    alerts: [],
  };
}

describe("weekly fit: hourly RMS of charge from the rollups' Σv²", () => {
  it("an hour half at +8 kV and half at −8 kV counts as 8 kV, not 0", () => {
    // 30 readings of +8 and 30 of −8: Σv = 0 → mean 0; Σv² = 60·64 → RMS √64 = 8 kV.
    const mixed = [...Array(30).fill(8), ...Array(30).fill(-8)];
    const h = rollup(21, "charge_kv", START, mixed);
    expect(h.mean).toBe(0);
    expect(h.rms).toBe(8);

    // three hours: the ±8 kV hour at 20 % RH, a steady −4 kV hour at 40 % RH, a steady 0 kV hour
    // at 60 % RH. RMS y = 8, 4, 0 against x = 20, 40, 60: slope −0.2 kV per % RH, intercept 12,
    // r² 1 (exact line). With the old |mean| the first hour would have been 0 and the slope −0.1.
    const hourly = [
      h,
      rollup(90, "rh_pct", START, [20]),
      rollup(21, "charge_kv", START + HOUR, Array(60).fill(-4)),
      rollup(90, "rh_pct", START + HOUR, [40]),
      rollup(21, "charge_kv", START + 2 * HOUR, Array(60).fill(0)),
      rollup(90, "rh_pct", START + 2 * HOUR, [60]),
    ];
    const report = buildWeekly(input(hourly));
    const rh = report.points[0].rh;
    expect(rh.n).toBe(3);
    expect(rh.plot).toEqual([
      [20, 8],
      [40, 4],
      [60, 0],
    ]);
    expect(rh.fit!.slope).toBeCloseTo(-0.2, 12);
    expect(rh.fit!.intercept).toBeCloseTo(12, 12);
    expect(rh.fit!.rSquared!).toBeCloseTo(1, 12);
  });

  it("RMS from count and Σv² (root mean square, its definition)", () => {
    // readings 3 and 4 kV: Σv² = 25, n = 2 → √12.5 = 3.5355…
    expect(rollupRms(2, 25)).toBeCloseTo(Math.sqrt(12.5), 12);
    expect(Number.isNaN(rollupRms(0, 0))).toBe(true);
  });

  it("the page states which measure it uses and why", () => {
    expect(CHARGE_FIT_MEASURE.key).toBe("rms");
    expect(CHARGE_FIT_MEASURE.words).toContain("√(Σv²/n)");
    expect(CHARGE_FIT_MEASURE.why).toMatch(/\+8 kV and −8 kV cancel/);
  });
});
