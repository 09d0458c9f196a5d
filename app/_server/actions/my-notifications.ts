// "My notifications": each person sets their own mobile number and which severities reach them
// by text and by push; an admin (people.manage) may set anyone's.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { saveNotificationSettings } from "@/db/queries/my-notifications";
import { badInput, forbidden, notFound } from "@/lib/errors";
import { phoneSettingsSchema } from "@/lib/phone";
import { can } from "@/lib/permissions";
import { SEVERITIES } from "@/lib/vocabulary";
import { defineAction } from "../action";

// a form sends a checkbox group as one value, several values, or nothing
const severities = z.preprocess((v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]), z.array(z.enum(SEVERITIES)).max(3));

export const saveMyNotificationsAction = defineAction(
  "view",
  z.object({
    personId: z.coerce.number().int().positive().optional(),
    phone: z.string().max(40, { message: "At most 40 characters" }).default(""),
    smsSeverities: severities,
    pushSeverities: severities,
  }),
  async (input, session) => {
    const personId = input.personId ?? session.personId;
    if (personId !== session.personId && !can(session.role, "people.manage")) throw forbidden("Only an admin may change someone else's notifications.");
    const parsed = phoneSettingsSchema.safeParse({ phone: input.phone, smsSeverities: input.smsSeverities, pushSeverities: input.pushSeverities });
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      throw badInput(issue.message, { [String(issue.path[0] ?? "phone")]: [issue.message] });
    }
    if (parsed.data.smsSeverities.length > 0 && !parsed.data.phone) throw badInput("Add a mobile number to get texts.", { phone: ["Add a mobile number to get texts"] });
    if (!(await saveNotificationSettings(getDb(), personId, parsed.data, session.personId))) throw notFound("No such person.");
    return { personId, phone: parsed.data.phone };
  },
);
