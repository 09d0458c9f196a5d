// On-call roster and alert e-mail settings (admins): add or remove a shift, change when alerts
// are e-mailed and escalated. Everyone may read the roster; only these actions change it.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/equipment";
import { addShift, addShiftInputSchema, alertingSettingsSchema, removeShift, saveAlertingSettings } from "@/db/queries/oncall";
import { badInput } from "@/lib/errors";
import { fromPlantLocalInput } from "@/lib/plant-time";
import { defineAction } from "../action";

/** The form sends plant-local "YYYY-MM-DDTHH:MM"; the API may send epoch ms. */
const whenField = z.union([z.number().int(), z.string().trim().min(1, { message: "Enter a date and time" })]);

export const addShiftAction = defineAction(
  "oncall.manage",
  z.object({
    personId: z.coerce.number({ message: "Choose a person" }).int().positive({ message: "Choose a person" }),
    start: whenField,
    end: whenField,
    escalationOrder: z.coerce.number().int().min(1, { message: "Order starts at 1 (first called)" }).max(9, { message: "At most 9" }),
    note: z.string().trim().max(200).optional(),
  }),
  async (input, session) => {
    const { timeZone } = await getPlantSettings(getDb());
    const toTs = (v: number | string, field: string) => {
      if (typeof v === "number") return v;
      if (/^\d+$/.test(v)) return Number(v);
      const ts = fromPlantLocalInput(v, timeZone);
      if (ts === null) throw badInput("Enter the date and time as shown.", { [field]: ["Enter a date and time, e.g. 2026-01-12T06:00"] });
      return ts;
    };
    const parsed = addShiftInputSchema.safeParse({
      personId: input.personId,
      startTs: toTs(input.start, "start"),
      endTs: toTs(input.end, "end"),
      escalationOrder: input.escalationOrder,
      note: input.note,
    });
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      const field = issue.path[0] === "endTs" ? "end" : issue.path[0] === "startTs" ? "start" : String(issue.path[0] ?? "_");
      throw badInput(issue.message, { [field]: [issue.message] });
    }
    const id = await addShift(getDb(), parsed.data, session.personId);
    return { id };
  },
);

export const removeShiftAction = defineAction("oncall.manage", z.object({ id: z.coerce.number().int().positive() }), async ({ id }, session) => {
  await removeShift(getDb(), id, session.personId);
  return { id };
});

export const saveAlertingSettingsAction = defineAction(
  "oncall.manage",
  z.object({
    notifyMinSeverity: z.enum(["low", "medium", "high"], { message: "Choose a severity" }),
    notifyAfterMin: z.coerce.number({ message: "Enter minutes" }).min(0, { message: "Cannot be negative" }).max(1440, { message: "At most 1440 minutes (a day)" }),
    escalateAfterMin: z.coerce.number({ message: "Enter minutes" }).min(1, { message: "At least 1 minute" }).max(1440, { message: "At most 1440 minutes (a day)" }),
    digestHourLocal: z.coerce.number({ message: "Enter an hour" }).int({ message: "A whole hour, 0–23" }).min(0).max(23, { message: "0–23" }),
  }),
  async (input, session) => {
    const next = alertingSettingsSchema.parse({
      notifyMinSeverity: input.notifyMinSeverity,
      notifyAfterS: Math.round(input.notifyAfterMin * 60),
      escalateAfterS: Math.round(input.escalateAfterMin * 60),
      digestHourLocal: input.digestHourLocal,
    });
    await saveAlertingSettings(getDb(), next, session.personId);
    return next;
  },
);
