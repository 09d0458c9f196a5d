// The plant's location for the outdoor forecast (admins): latitude and longitude in decimal degrees.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { savePlantLocation } from "@/db/queries/plant-location";
import { defineAction } from "../action";

const degrees = (max: number, what: string) => {
  const range = `${what[0].toUpperCase()}${what.slice(1)} runs from −${max} to ${max}`;
  const number = z.number({ message: `Enter the ${what} in decimal degrees, e.g. 52.6` }).finite().min(-max, { message: range }).max(max, { message: range });
  // a form sends text: an empty or over-long field is no number (z.coerce would take "" as 0)
  return z.preprocess((v) => (typeof v === "string" ? (v.trim() === "" || v.length > 30 ? undefined : Number(v.trim())) : v), number);
};

export const plantLocationInput = z.object({ latitude: degrees(90, "latitude"), longitude: degrees(180, "longitude") });

export const savePlantLocationAction = defineAction("oncall.manage", plantLocationInput, async (input, session) => {
  // four decimals (about 10 m) is plenty for a weather forecast
  const loc = { latitude: Math.round(input.latitude * 1e4) / 1e4, longitude: Math.round(input.longitude * 1e4) / 1e4 };
  await savePlantLocation(getDb(), loc, session.personId);
  return loc;
});
