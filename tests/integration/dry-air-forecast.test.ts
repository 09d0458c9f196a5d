// Tomorrow's dry air from the weather service's SDK (openmeteo) pointed at the local fake: the
// fake's scripted cold snap arrives tomorrow, and the demo's Press Hall (22 °C setpoint, 40 %
// limit, 12 kg/h humidifier on 9000 m³/h; lib/demo-plant.ts) is warned about for tomorrow morning.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fetchOutdoorForecast } from "@/ingest/forecast";
import { startWeatherFake } from "@/ingest/weather-fake";
import { describeDryAirSpan, dryAirSpans } from "@/lib/forecast/dry-air";
import { DEMO_AREAS } from "@/lib/demo-plant";

let fake: Awaited<ReturnType<typeof startWeatherFake>>;
const now = Date.UTC(2026, 0, 14, 15, 0); // a Wednesday afternoon
beforeAll(async () => {
  fake = await startWeatherFake(0, () => now);
});
afterAll(async () => fake?.close());

describe("the forecast through the SDK", () => {
  it("decodes the fake's FlatBuffers forecast: 48 hours from today 00:00 UTC, the plant's coordinates", async () => {
    const f = await fetchOutdoorForecast(`http://127.0.0.1:${fake.port}/v1/forecast`, 52.6, 0.4, now);
    expect(f.hours).toHaveLength(48);
    expect(f.hours[0].ts).toBe(Date.UTC(2026, 0, 14, 0, 0));
    expect(f.latitude).toBeCloseTo(52.6, 3);
    expect(f.source).toBe(`127.0.0.1:${fake.port}`);
    // the snap's coldest hour is tomorrow 06:00 UTC at −9 °C and 62 %
    const coldest = f.hours.reduce((a, b) => (b.outdoorTempC < a.outdoorTempC ? b : a));
    expect(coldest).toEqual({ ts: Date.UTC(2026, 0, 15, 6, 0), outdoorTempC: -9, outdoorRhPct: 62 });
  });

  it("warns about the Press Hall tomorrow morning, from the cold snap, and not today", async () => {
    const f = await fetchOutdoorForecast(`http://127.0.0.1:${fake.port}/v1/forecast`, 52.6, 0.4, now);
    const demo = DEMO_AREAS.find((a) => a.slug === "press-hall")!;
    const hall = { id: 1, name: demo.name, tempSetpointC: demo.tempSetpointC, rhMinPct: demo.rhMinPct, humidifierKgPerH: demo.humidifierKgPerH, airflowM3PerH: demo.airflowM3PerH };
    expect(dryAirSpans(hall, f.hours, Date.UTC(2026, 0, 14), Date.UTC(2026, 0, 15))).toEqual([]);
    const spans = dryAirSpans(hall, f.hours, Date.UTC(2026, 0, 15), Date.UTC(2026, 0, 16));
    expect(spans.length).toBeGreaterThanOrEqual(1);
    expect(spans[0].fromTs).toBeGreaterThanOrEqual(Date.UTC(2026, 0, 15, 0));
    expect(spans[0].toTs).toBeLessThanOrEqual(Date.UTC(2026, 0, 15, 13));
    expect(spans[0].minRhWithoutPct).toBeLessThan(20);
    expect(describeDryAirSpan(spans[0], "Europe/London")).toMatch(/^Thu \d\d:00–\d\d:00: Press Hall expected \d+–\d+ % RH without humidification, below the 40 % limit; about \d+ kg\/h of water needed/);
  });
});
