// Plant-wide settings with their defaults: time zone, shifts, units.
import { z } from "zod";

export const shiftSchema = z.object({
  name: z.string().min(1).max(40),
  // local start time "HH:MM"; a shift ends where the next one starts
  start: z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, "Use HH:MM, 24-hour"),
});

export const plantSettingsSchema = z.object({
  name: z.string().min(1).max(120).default("Plant"),
  timeZone: z.string().min(1).default("Europe/London"),
  shifts: z.array(shiftSchema).min(1).max(6).default([
    { name: "Early", start: "06:00" },
    { name: "Late", start: "14:00" },
    { name: "Night", start: "22:00" },
  ]),
  chargeUnit: z.enum(["kV", "V"]).default("kV"),
  tempUnit: z.enum(["C", "F"]).default("C"),
  // the plant's location for the outdoor forecast (set by an admin on the On-call page)
  latitude: z.number().min(-90).max(90).optional(),
  longitude: z.number().min(-180).max(180).optional(),
});

export type PlantSettings = z.infer<typeof plantSettingsSchema>;

export const DEFAULT_PLANT_SETTINGS: Omit<PlantSettings, "name"> = {
  timeZone: "Europe/London",
  shifts: [
    { name: "Early", start: "06:00" },
    { name: "Late", start: "14:00" },
    { name: "Night", start: "22:00" },
  ],
  chargeUnit: "kV",
  tempUnit: "C",
};
