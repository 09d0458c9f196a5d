// The plant's location (latitude/longitude in the "plant" settings row), set by an admin for the
// outdoor forecast; each change is audit-logged with the old and new values.
import { eq } from "drizzle-orm";
import type { Db } from "../client";
import { settings } from "../schema";
import { writeAudit } from "./audit";
import { DEFAULT_PLANT_SETTINGS, plantSettingsSchema } from "../../lib/plant-settings";

export type PlantLocation = { latitude: number; longitude: number };

export async function savePlantLocation(db: Db, loc: PlantLocation, personId: number | null, nowMs = Date.now()): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx.select({ value: settings.value }).from(settings).where(eq(settings.key, "plant")).for("update");
    const parsed = plantSettingsSchema.safeParse(row?.value ?? {});
    const current = parsed.success ? parsed.data : { name: "Plant", ...DEFAULT_PLANT_SETTINGS };
    const next = plantSettingsSchema.parse({ ...current, latitude: loc.latitude, longitude: loc.longitude });
    if (row) await tx.update(settings).set({ value: next, updatedAt: nowMs }).where(eq(settings.key, "plant"));
    else await tx.insert(settings).values({ key: "plant", value: next, updatedAt: nowMs });
    const was = current.latitude !== undefined && current.longitude !== undefined ? `${current.latitude}, ${current.longitude}` : "not set";
    await writeAudit(
      tx,
      {
        personId,
        action: "plant.location",
        subjectType: "settings",
        subjectId: "plant",
        summary: `Plant location: was ${was}; now ${loc.latitude}, ${loc.longitude}.`,
        detail: { old: { latitude: current.latitude ?? null, longitude: current.longitude ?? null }, new: loc },
      },
      nowMs,
    );
  });
}
