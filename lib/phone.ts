// Mobile numbers and the per-severity opt-in for texts and push (pure). Numbers are checked and
// stored in E.164 with libphonenumber-js; a number typed without a country code is read in the
// plant's country (default GB).
import { parsePhoneNumberFromString, type CountryCode } from "libphonenumber-js/max";
import { z } from "zod";
import { SEVERITIES, type Severity } from "./vocabulary";

/** "+44 7700 900123", "07700 900123" (GB) → "+447700900123"; null when it cannot be a number that takes texts. */
export function toE164(input: string, defaultCountry: CountryCode = "GB"): string | null {
  const text = input.trim();
  if (!text || text.length > 40) return null;
  const parsed = parsePhoneNumberFromString(text, defaultCountry);
  if (!parsed || !parsed.isPossible()) return null;
  // a number of a known kind must be one that takes texts; a possible number of no known kind is
  // accepted, because the reserved fictional ranges (07700 900xxx, used by the demo) are
  // unallocated and so not "valid" in the numbering plan
  const type = parsed.isValid() ? parsed.getType() : undefined;
  if (type !== undefined && type !== "MOBILE" && type !== "FIXED_LINE_OR_MOBILE" && type !== "PERSONAL_NUMBER") return null;
  return parsed.number;
}

/** The number grouped for reading back ("+44 7700 900123"). */
export function formatPhone(e164: string): string {
  return parsePhoneNumberFromString(e164)?.formatInternational() ?? e164;
}

export const phoneSettingsSchema = z.object({
  phone: z
    .string()
    .max(40)
    .transform((v, ctx) => {
      if (v.trim() === "") return null;
      const e164 = toE164(v);
      if (!e164) ctx.addIssue({ code: "custom", message: "Not a mobile number we can text; include the country code, e.g. +44 7700 900123" });
      return e164;
    }),
  smsSeverities: z.array(z.enum(SEVERITIES)).max(3),
  pushSeverities: z.array(z.enum(SEVERITIES)).max(3),
});
export type PhoneSettings = z.infer<typeof phoneSettingsSchema>;

export function severityList(list: readonly Severity[]): string {
  return SEVERITIES.filter((s) => list.includes(s)).join(",");
}

/** A browser's PushSubscription.toJSON(), as posted by the phone. */
export const pushSubscriptionSchema = z.object({
  endpoint: z.string().url().max(1000).refine((u) => u.startsWith("https://"), "push endpoints are https"),
  keys: z.object({ p256dh: z.string().regex(/^[A-Za-z0-9_-]{80,100}$/), auth: z.string().regex(/^[A-Za-z0-9_-]{16,30}$/) }),
});
export type PushSubscriptionInput = z.infer<typeof pushSubscriptionSchema>;
