// The latest outdoor forecast (settings row "forecast.outdoor") and tomorrow's dry-air warnings
// worked from it for every hall.
import { asc, eq } from "drizzle-orm";
import type { Db } from "../client";
import { areas, settings } from "../schema";
import { getPlantSettings } from "./plant-settings";
import { FORECAST_SETTINGS_KEY, storedForecastSchema, tomorrowDryAirWarnings, type DryAirWarnings, type StoredForecast } from "../../lib/forecast/warnings";

export async function getStoredForecast(db: Db): Promise<StoredForecast | null> {
  const [row] = await db.select({ value: settings.value }).from(settings).where(eq(settings.key, FORECAST_SETTINGS_KEY)).limit(1);
  const parsed = storedForecastSchema.safeParse(row?.value ?? null);
  return parsed.success ? parsed.data : null;
}

export async function saveForecast(db: Db, forecast: StoredForecast, nowMs: number): Promise<void> {
  const value = storedForecastSchema.parse(forecast);
  await db.insert(settings).values({ key: FORECAST_SETTINGS_KEY, value, updatedAt: nowMs }).onDuplicateKeyUpdate({ set: { value, updatedAt: nowMs } });
}

export async function loadDryAirWarnings(db: Db, nowMs: number): Promise<DryAirWarnings | null> {
  const [plant, forecast, halls] = await Promise.all([
    getPlantSettings(db),
    getStoredForecast(db),
    db
      .select({ id: areas.id, name: areas.name, tempSetpointC: areas.tempSetpointC, rhMinPct: areas.rhMinPct, humidifierKgPerH: areas.humidifierKgPerH, airflowM3PerH: areas.airflowM3PerH })
      .from(areas)
      .orderBy(asc(areas.displayOrder), asc(areas.id)),
  ]);
  return tomorrowDryAirWarnings(forecast, halls, nowMs, plant.timeZone);
}
