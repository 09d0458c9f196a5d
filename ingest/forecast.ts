// Fetches the outdoor forecast for the plant's location through the weather service's SDK
// (openmeteo's fetchWeatherApi, pointed at WEATHER_API_URL: the local fake in the demo and tests)
// and turns it into the hourly temperature and RH that lib/forecast/dry-air.ts works on.
import { fetchWeatherApi } from "openmeteo";
import type { ForecastHour } from "../lib/forecast/dry-air";

export type OutdoorForecast = { source: string; fetchedTs: number; latitude: number; longitude: number; hours: ForecastHour[] };

export async function fetchOutdoorForecast(url: string, latitude: number, longitude: number, nowMs = Date.now()): Promise<OutdoorForecast> {
  const params = { latitude, longitude, hourly: ["temperature_2m", "relative_humidity_2m"], timezone: "GMT", forecast_days: 2 };
  const [response] = await fetchWeatherApi(url, params, 1, 0.2, 1);
  const hourly = response?.hourly();
  if (!hourly) throw new Error("the forecast has no hourly block");
  const start = Number(hourly.time());
  const end = Number(hourly.timeEnd());
  const step = hourly.interval();
  const temps = hourly.variables(0)?.valuesArray();
  const rhs = hourly.variables(1)?.valuesArray();
  if (!temps || !rhs || step <= 0) throw new Error("the forecast lacks temperature or humidity");
  const hours: ForecastHour[] = [];
  for (let i = 0, t = start; t < end && i < temps.length && i < rhs.length; i++, t += step) {
    hours.push({ ts: t * 1000, outdoorTempC: Math.round(temps[i] * 10) / 10, outdoorRhPct: Math.round(rhs[i] * 10) / 10 });
  }
  return { source: new URL(url).host, fetchedTs: nowMs, latitude: response.latitude(), longitude: response.longitude(), hours };
}
