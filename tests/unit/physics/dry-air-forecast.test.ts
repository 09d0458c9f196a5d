// Tomorrow's dry air (lib/forecast/dry-air.ts): outdoor air heated to a hall's setpoint, with and
// without its humidifier, and the warning's words. Checked against a value worked by hand and
// against psychrolib 1.1.1 (the ASHRAE Handbook—Fundamentals 2017 ch. 1 formulas).
import psychrolib from "psychrolib";
import { beforeAll, describe, expect, it } from "vitest";
import { describeDryAirSpan, dryAirSpans, hallHour, type HallForDryAir } from "@/lib/forecast/dry-air";

const H = 3_600_000;
const press: HallForDryAir = { id: 1, name: "Press Hall", tempSetpointC: 22, rhMinPct: 30, humidifierKgPerH: 12, airflowM3PerH: 9000 };

beforeAll(() => psychrolib.SetUnitSystem(psychrolib.SI));

describe("expected indoor RH from tomorrow's outdoor air", () => {
  it("worked by hand: −5 °C at 80 % outside, heated to 22 °C, is about 12.8 % RH", () => {
    // By hand: pws over supercooled water at −5 °C = 4.217 hPa (WMO supercooled-water table, from
    // memory); pws at 22 °C = 2.6452 kPa (ASHRAE Fundamentals 2017 ch. 1 table 3).
    // pw = 0.80 × 421.7 Pa = 337.4 Pa; RH at 22 °C = 337.4 / 2645.2 = 12.75 %.
    const r = hallHour({ ...press, humidifierKgPerH: 0 }, { ts: 0, outdoorTempC: -5, outdoorRhPct: 80 });
    expect(r.rhWithoutPct).toBeCloseTo(12.75, 1);
  });

  it("agrees with psychrolib above freezing (2 °C at 85 % heated to 22 °C)", () => {
    const pw = psychrolib.GetVapPresFromRelHum(2, 0.85);
    const expected = (100 * pw) / psychrolib.GetSatVapPres(22);
    const r = hallHour(press, { ts: 0, outdoorTempC: 2, outdoorRhPct: 85 });
    expect(r.rhWithoutPct).toBeCloseTo(expected, 2);
  });

  it("the water to reach the 30 % limit agrees with psychrolib's mass balance", () => {
    const r = hallHour(press, { ts: 0, outdoorTempC: -5, outdoorRhPct: 80 });
    const p = 101325;
    const w1 = psychrolib.GetHumRatioFromRelHum(22, r.rhWithoutPct / 100, p);
    const w2 = psychrolib.GetHumRatioFromRelHum(22, 0.3, p);
    const dryAirKgPerH = 9000 / psychrolib.GetMoistAirVolume(22, w1, p);
    expect(r.waterNeededKgPerH).toBeCloseTo(dryAirKgPerH * (w2 - w1), 1);
    // a 12 kg/h humidifier into the same air raises W by 12 / ṁda (psychrolib's RH at that W)
    const withW = w1 + 12 / dryAirKgPerH;
    expect(r.rhWithPct).toBeCloseTo(100 * psychrolib.GetRelHumFromHumRatio(22, withW, p), 1);
    expect(r.rhWithPct).toBeGreaterThan(r.rhWithoutPct);
  });

  it("groups the dry hours into one span and words the warning with the humidifier's shortfall", () => {
    const t0 = Date.UTC(2026, 0, 15, 4, 0); // Thu 15 Jan 2026, 04:00 in London (GMT)
    const outdoor = [10, -4, -6, -8, -7, -5, 10, 12].map((t, i) => ({ ts: t0 + i * H, outdoorTempC: t, outdoorRhPct: t < 0 ? 75 : 95 }));
    const spans = dryAirSpans(press, outdoor, t0, t0 + 8 * H);
    expect(spans).toHaveLength(1);
    expect(spans[0].fromTs).toBe(t0 + H);
    expect(spans[0].toTs).toBe(t0 + 6 * H);
    expect(spans[0].humidifierShort).toBe(true);
    const text = describeDryAirSpan(spans[0], "Europe/London");
    expect(text).toMatch(/^Thu 05:00–10:00: Press Hall expected \d+–\d+ % RH without humidification, below the 30 % limit; about \d+ kg\/h of water needed; the 12 kg\/h humidifier at full output still leaves it at \d+ %$/);
  });
});
