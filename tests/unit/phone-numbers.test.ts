// Mobile numbers in E.164 (lib/phone.ts). Expected forms are from the E.164 numbering plan as
// libphonenumber-js's metadata encodes it; the numbers are Ofcom's reserved drama numbers
// (07700 900000–900999) and the North American 555-01xx fictional range.
import { describe, expect, it } from "vitest";
import { formatPhone, phoneSettingsSchema, pushSubscriptionSchema, toE164 } from "@/lib/phone";

describe("mobile numbers", () => {
  it("stores a UK mobile typed either way as +447700900123", () => {
    expect(toE164("07700 900123")).toBe("+447700900123");
    expect(toE164("+44 7700 900123")).toBe("+447700900123");
    expect(toE164("+44 (0)7700-900123")).toBe("+447700900123");
  });
  it("refuses what cannot be texted: too short, letters, a UK landline", () => {
    expect(toE164("12345")).toBeNull();
    expect(toE164("call me")).toBeNull();
    expect(toE164("+44 20 7946 0000")).toBeNull(); // a London fixed line (Ofcom drama range 020 7946 0xxx)
  });
  it("reads the number back grouped", () => {
    expect(formatPhone("+447700900123")).toBe("+44 7700 900123");
  });
  it("the settings form: a blank number turns texting off, a bad one is a field error", () => {
    expect(phoneSettingsSchema.parse({ phone: " ", smsSeverities: ["high"], pushSeverities: [] }).phone).toBeNull();
    const bad = phoneSettingsSchema.safeParse({ phone: "0770", smsSeverities: [], pushSeverities: [] });
    expect(bad.success).toBe(false);
    expect(phoneSettingsSchema.safeParse({ phone: "+447700900123", smsSeverities: ["urgent"], pushSeverities: [] }).success).toBe(false);
  });
  it("a push subscription must be https with keys of the right length", () => {
    const keys = { p256dh: "B".repeat(87), auth: "a".repeat(22) };
    expect(pushSubscriptionSchema.safeParse({ endpoint: "https://push.example.com/x", keys }).success).toBe(true);
    expect(pushSubscriptionSchema.safeParse({ endpoint: "http://push.example.com/x", keys }).success).toBe(false);
  });
});
