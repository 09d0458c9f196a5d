// Fetches the outdoor forecast for the plant's location (plant settings latitude/longitude) through
// the weather SDK (ingest/forecast.ts) and keeps the latest one in MariaDB, where the app and the
// digest read it. Run by the mailer about once an hour.
import type { Db } from "../db/client";
import { getPlantSettings } from "../db/queries/plant-settings";
import { saveForecast } from "../db/queries/forecast";
import { fetchOutdoorForecast } from "./forecast";

/** Fetches and stores the forecast; false when the plant has no location set. */
export async function refreshStoredForecast(db: Db, url: string, nowMs = Date.now()): Promise<boolean> {
  const plant = await getPlantSettings(db);
  if (plant.latitude === undefined || plant.longitude === undefined) return false;
  const f = await fetchOutdoorForecast(url, plant.latitude, plant.longitude, nowMs);
  await saveForecast(db, f, nowMs);
  return true;
}
