// The wording of a dry-air span and tomorrow's window in plant time. Expected texts follow the
// issue's example wording ("Thu 05:00–10:00: Press Hall expected 19–24 % RH …"); the times are
// worked by hand from the UTC instants (Europe/London is UTC in January, UTC+1 in July).
import { describe, expect, it } from "vitest";
import { describeDryAirSpan, type DryAirSpan } from "@/lib/forecast/dry-air";
import { tomorrowDryAirWarnings } from "@/lib/forecast/warnings";

const span: DryAirSpan = {
  hallId: 1,
  hallName: "Press Hall",
  fromTs: Date.UTC(2026, 0, 15, 5),
  toTs: Date.UTC(2026, 0, 15, 10),
  minRhWithoutPct: 7.2,
  maxRhWithoutPct: 39.6,
  minRhWithPct: 14.1,
  limitPct: 40,
  maxWaterNeededKgPerH: 57.6,
  humidifierKgPerH: 0,
  humidifierShort: true,
};

describe("dry-air wording", () => {
  it("never rounds the top of the range up to the limit itself", () => {
    expect(describeDryAirSpan(span, "Europe/London")).toBe("Thu 05:00–10:00: Press Hall expected 7–39 % RH without humidification, below the 40 % limit; about 58 kg/h of water needed; the hall has no humidifier");
    expect(describeDryAirSpan({ ...span, minRhWithoutPct: 19.4, maxRhWithoutPct: 23.2 }, "Europe/London")).toMatch(/expected 19–24 % RH/);
  });

  it("looks at the plant's next local day, and says nothing without a forecast covering it", () => {
    const hall = { id: 1, name: "Press Hall", tempSetpointC: 22, rhMinPct: 40, humidifierKgPerH: 0, airflowM3PerH: 9000 };
    // −10 °C at 80 % (over water, as weather services report it) heated to 22 °C, by hand from the
    // saturation pressures over water in the ASHRAE Handbook—Fundamentals tables (0.2865 kPa at
    // −10 °C, 2.645 kPa at 22 °C): 80 % × 0.2865 / 2.645 ≈ 8.7 %, shown as "8–9 %"
    const hours = Array.from({ length: 48 }, (_, i) => ({ ts: Date.UTC(2026, 6, 14, 0) + i * 3_600_000, outdoorTempC: -10, outdoorRhPct: 80 }));
    const forecast = { source: "weather.test", fetchedTs: Date.UTC(2026, 6, 14, 12), latitude: 52.6, longitude: 0.4, hours };
    // July: London is UTC+1, so tomorrow (15 Jul) starts at 14 Jul 23:00 UTC; the forecast ends 16 Jul 00:00 UTC
    const w = tomorrowDryAirWarnings(forecast, [hall], Date.UTC(2026, 6, 14, 12), "Europe/London");
    expect(w?.date).toBe("2026-07-15");
    expect(w?.lines).toHaveLength(1);
    // every hour of the local day is below: the span runs midnight to midnight, plant time
    expect(w?.lines[0]).toMatch(/^Wed 00:00–00:00: Press Hall expected 8–9 % RH without humidification, below the 40 % limit/);
    expect(w?.sourceLine).toBe("Forecast from weather.test, fetched Tue 13:00 (plant time)");
    expect(tomorrowDryAirWarnings(null, [hall], Date.UTC(2026, 6, 14, 12), "Europe/London")).toBeNull();
    expect(tomorrowDryAirWarnings(forecast, [hall], Date.UTC(2026, 6, 16, 12), "Europe/London")).toBeNull();
  });
});
