// The plant-wide settings row (key "plant": name, time zone, shifts, units), read in one place.
import { eq } from "drizzle-orm";
import type { Db } from "../client";
import { settings } from "../schema";
import { DEFAULT_PLANT_SETTINGS, plantSettingsSchema, type PlantSettings } from "../../lib/plant-settings";

/** The "plant" settings row, with defaults for anything missing or unreadable. */
export async function getPlantSettings(db: Db): Promise<PlantSettings> {
  const rows = await db.select({ value: settings.value }).from(settings).where(eq(settings.key, "plant")).limit(1);
  const parsed = plantSettingsSchema.safeParse(rows[0]?.value ?? {});
  if (parsed.success) return parsed.data;
  return { name: "Plant", ...DEFAULT_PLANT_SETTINGS };
}
