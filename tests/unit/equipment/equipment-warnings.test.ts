import { describe, expect, it } from "vitest";
import { deviceWarnings, neutralizerWarnings, type DeviceSettings, type NeutralizerSettings } from "@/lib/equipment-warnings";

const bar: NeutralizerSettings = {
  kind: "ac_bar",
  airAssisted: false,
  mountingDistanceMm: 30,
  lengthMm: 1400,
  outputKv: 7,
  pointId: 1,
  state: "in_service",
  cleaningIntervalDays: 7,
  checkIntervalDays: 90,
};
const codes = (w: { code: string }[]) => w.map((x) => x.code);

describe("neutralizer settings that will not work: distance against the kind's range (common practice)", () => {
  it("an AC bar at 30 mm is fine", () => {
    expect(neutralizerWarnings(bar)).toEqual([]);
  });

  it("an AC bar without air farther than about 50 mm (2 in) is flagged", () => {
    const w = neutralizerWarnings({ ...bar, mountingDistanceMm: 80 });
    expect(codes(w)).toEqual(["too_far"]);
    expect(w[0].field).toBe("mountingDistanceMm");
    expect(w[0].message).toMatch(/10–50 mm/);
    expect(w[0].message).toMatch(/at 80 mm/);
    expect(w[0].source).toMatch(/common practice/);
    // exactly 50 mm is still within the rule of thumb
    expect(neutralizerWarnings({ ...bar, mountingDistanceMm: 50 })).toEqual([]);
  });

  it("a pulsed-DC bar at 300 mm is normal (100–600 mm, common practice) and not warned as too far", () => {
    expect(neutralizerWarnings({ ...bar, kind: "pulsed_dc_bar", mountingDistanceMm: 300 })).toEqual([]);
    expect(neutralizerWarnings({ ...bar, kind: "pulsed_dc_bar", mountingDistanceMm: 600 })).toEqual([]);
    expect(codes(neutralizerWarnings({ ...bar, kind: "pulsed_dc_bar", mountingDistanceMm: 800 }))).toEqual(["too_far"]);
    // close in, its pulses band the web
    const near = neutralizerWarnings({ ...bar, kind: "pulsed_dc_bar", mountingDistanceMm: 40 });
    expect(codes(near)).toEqual(["too_close"]);
    expect(near[0].message).toMatch(/pulsed-DC/);
  });

  it("each kind's own range: air-assisted bar and nozzle to 300 mm, blower to 1 m, passive cord to 25 mm", () => {
    expect(neutralizerWarnings({ ...bar, kind: "air_assisted_bar", airAssisted: true, mountingDistanceMm: 200 })).toEqual([]);
    expect(codes(neutralizerWarnings({ ...bar, kind: "nozzle", mountingDistanceMm: 400 }))).toEqual(["too_far"]);
    expect(codes(neutralizerWarnings({ ...bar, kind: "blower", airAssisted: true, mountingDistanceMm: 1500 }))).toEqual(["too_far"]);
    expect(neutralizerWarnings({ ...bar, kind: "blower", airAssisted: true, mountingDistanceMm: 600 })).toEqual([]);
    expect(codes(neutralizerWarnings({ ...bar, kind: "passive_cord", mountingDistanceMm: 40 }))).toEqual(["too_far"]);
    expect(neutralizerWarnings({ ...bar, kind: "other", mountingDistanceMm: 5000 })).toEqual([]);
  });

  it("an AC bar recorded with air assistance reaches as far as an air-assisted bar", () => {
    expect(neutralizerWarnings({ ...bar, airAssisted: true, mountingDistanceMm: 80 })).toEqual([]);
  });

  it("too close, no distance, no measuring point, long interval on a solvent press", () => {
    expect(codes(neutralizerWarnings({ ...bar, mountingDistanceMm: 5 }))).toEqual(["too_close"]);
    expect(codes(neutralizerWarnings({ ...bar, mountingDistanceMm: null }))).toEqual(["no_distance"]);
    expect(codes(neutralizerWarnings({ ...bar, pointId: null }))).toEqual(["no_point"]);
    expect(codes(neutralizerWarnings({ ...bar, cleaningIntervalDays: 30, solventLine: true }))).toEqual(["solvent_cleaning_interval"]);
    // a removed bar is not nagged about its point
    expect(neutralizerWarnings({ ...bar, pointId: null, state: "removed" })).toEqual([]);
  });
});

describe("sensor settings that will not work", () => {
  const meter: DeviceSettings = { kind: "field_meter", calibratedDistanceMm: 25, mountingDistanceMm: 25, calibrationDue: "2027-01-01", pointId: 3, areaId: 1, lineId: 1 };

  it("a meter mounted at its calibrated distance is fine", () => {
    expect(deviceWarnings(meter, "2026-12-01")).toEqual([]);
    // within 2 mm of slack
    expect(deviceWarnings({ ...meter, mountingDistanceMm: 27 }, "2026-12-01")).toEqual([]);
  });

  it("calibrated distance different from the mounting distance: reads low when farther", () => {
    const w = deviceWarnings({ ...meter, mountingDistanceMm: 50 }, "2026-12-01");
    expect(codes(w)).toEqual(["meter_distance_mismatch"]);
    expect(w[0].message).toMatch(/Calibrated for 25 mm but mounted at 50 mm: readings will be too low, roughly ×0.5/);
    const closer = deviceWarnings({ ...meter, mountingDistanceMm: 10 }, "2026-12-01");
    expect(closer[0].message).toMatch(/too high, roughly ×2.5/);
  });

  it("overdue calibration, loggers without a hall, gateways without a line", () => {
    expect(codes(deviceWarnings({ ...meter, calibrationDue: "2026-11-30" }, "2026-12-01"))).toEqual(["calibration_overdue"]);
    expect(codes(deviceWarnings({ ...meter, kind: "th_logger", areaId: null, calibratedDistanceMm: null }, "2026-12-01"))).toEqual(["logger_no_hall"]);
    expect(codes(deviceWarnings({ ...meter, kind: "speed_gateway", lineId: null }, "2026-12-01"))).toEqual(["gateway_no_line"]);
  });
});
