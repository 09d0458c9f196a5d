// Planned work: open, extend and end a maintenance window. Each action checks "maintenance.plan"
// (shift lead and up) on its own and validates with zod; forms send plant-time "YYYY-MM-DDTHH:MM",
// the JSON API may send epoch ms instead.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { endMaintenanceWindow, extendMaintenanceWindow, openMaintenanceWindow } from "@/db/queries/maintenance-windows";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { MAINTENANCE_TARGETS } from "@/lib/alerts/maintenance-windows";
import { badInput } from "@/lib/errors";
import { fromPlantLocalInput } from "@/lib/plant-time";
import { defineAction } from "../action";
import { idField, optionalText } from "./equipment";

const reason = z.string().trim().min(3, "Say why (at least 3 characters)").max(300, "At most 300 characters");
/** epoch ms, or a plant-time "YYYY-MM-DDTHH:MM" from a datetime-local field */
const moment = z.union([z.number().int().min(0), z.string().trim().min(1, "Pick a time").max(40)]);

async function toMs(value: number | string, field: string): Promise<number> {
  if (typeof value === "number") return value;
  if (/^\d{10,15}$/.test(value)) return Number(value);
  const ms = fromPlantLocalInput(value, (await getPlantSettings(getDb())).timeZone);
  if (ms === null) throw badInput("Please correct the marked fields.", { [field]: ["Pick a date and time"] });
  return ms;
}

/** The form's target picker sends `target` as "kind:id"; the JSON API may send targetKind and targetId. */
function splitTarget(raw: unknown): unknown {
  if (typeof raw !== "object" || raw === null || !("target" in raw)) return raw;
  const { target, ...rest } = raw as Record<string, unknown>;
  const m = typeof target === "string" ? /^([a-z]{1,20}):(\d{1,9})$/.exec(target) : null;
  return m ? { ...rest, targetKind: m[1], targetId: m[2] } : { ...rest, targetKind: undefined, targetId: undefined };
}

export const openWindowFormSchema = z.preprocess(
  splitTarget,
  z.object({
    targetKind: z.enum(MAINTENANCE_TARGETS, { message: "Pick what the work is on" }),
    targetId: idField,
    ownerId: idField,
    reason,
    startTs: moment,
    endTs: moment,
    extendReason: optionalText(300),
  }),
);

export const openMaintenanceWindowAction = defineAction("maintenance.plan", openWindowFormSchema, async (input, who) => {
  const nowMs = Date.now();
  const startTs = await toMs(input.startTs, "startTs");
  const endTs = await toMs(input.endTs, "endTs");
  const id = await openMaintenanceWindow(getDb(), { ...input, startTs, endTs }, who.personId, nowMs);
  return { id };
});

export const extendMaintenanceWindowAction = defineAction(
  "maintenance.plan",
  z.object({ id: idField, endTs: moment, reason }),
  async (input, who) => {
    const endTs = await toMs(input.endTs, "endTs");
    await extendMaintenanceWindow(getDb(), input.id, endTs, input.reason, who.personId, Date.now());
    return { id: input.id };
  },
);

export const endMaintenanceWindowAction = defineAction("maintenance.plan", z.object({ id: idField }), async (input, who) => {
  await endMaintenanceWindow(getDb(), input.id, who.personId, Date.now());
  return { id: input.id };
});
