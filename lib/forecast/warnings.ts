// Tomorrow's dry-air warnings (pure): the stored outdoor forecast (ingest/forecast-store.ts keeps
// the latest one per plant in the settings row "forecast.outdoor") checked against every hall for
// the plant's next local day, worded by lib/forecast/dry-air.ts, with the forecast's source and
// time. Read by the Floor (engineers and up) and the daily digest e-mail.
import { z } from "zod";
import { addDaysToDate, formatPlantTime, localDateOf, localTimeToTs } from "../plant-time";
import { describeDryAirSpan, dryAirSpans, type HallForDryAir } from "./dry-air";

export const FORECAST_SETTINGS_KEY = "forecast.outdoor";

export const storedForecastSchema = z.object({
  source: z.string().min(1).max(200),
  fetchedTs: z.number().int().nonnegative(),
  latitude: z.number().min(-90).max(90),
  longitude: z.number().min(-180).max(180),
  hours: z.array(z.object({ ts: z.number(), outdoorTempC: z.number(), outdoorRhPct: z.number() })).max(24 * 16),
});
export type StoredForecast = z.infer<typeof storedForecastSchema>;

export type DryAirWarnings = {
  /** the plant's next local day, "YYYY-MM-DD" */
  date: string;
  lines: string[];
  /** "Forecast from 127.0.0.1:9522, fetched Wed 15:00" */
  sourceLine: string;
};

/** Warnings for the plant day after the one holding `nowMs`; null when no forecast covers it. */
export function tomorrowDryAirWarnings(forecast: StoredForecast | null, halls: readonly HallForDryAir[], nowMs: number, timeZone: string): DryAirWarnings | null {
  if (!forecast) return null;
  const date = addDaysToDate(localDateOf(nowMs, timeZone), 1);
  const fromTs = localTimeToTs(date, 0, timeZone);
  const toTs = localTimeToTs(addDaysToDate(date, 1), 0, timeZone);
  if (!forecast.hours.some((h) => h.ts >= fromTs && h.ts < toTs)) return null;
  const lines = halls.flatMap((hall) => dryAirSpans(hall, forecast.hours, fromTs, toTs).map((s) => describeDryAirSpan(s, timeZone)));
  const sourceLine = `Forecast from ${forecast.source}, fetched ${formatPlantTime(forecast.fetchedTs, timeZone, "EEE HH:mm")} (plant time)`;
  return { date, lines, sourceLine };
}
