// "My notifications": each person sets their own mobile number (E.164 through libphonenumber-js;
// reserved example numbers, Ofcom's drama range 07700 900000–900999) and severities; an admin may
// set anyone's, an engineer only their own; push subscriptions are kept per person by endpoint.
import { createECDH, randomBytes } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { and, desc, eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { auditLog, people, pushSubscriptions } from "@/db/schema";
import { deletePushSubscription, getNotificationSettings, savePushSubscription } from "@/db/queries/my-notifications";
import { saveMyNotificationsAction } from "@/app/_server/actions/my-notifications";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

async function sessionOf(email: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((x) => x.email === email)!;
  const [row] = await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email));
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

function fakeSubscription(n: number) {
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  return { endpoint: `https://push.example.test/send/${n}-${randomBytes(6).toString("hex")}`, keys: { p256dh: ecdh.getPublicKey().toString("base64url"), auth: randomBytes(16).toString("base64url") } };
}

afterAll(async () => {
  await closeDb();
});

describe("my notifications", () => {
  it("a person saves their own number in E.164 and the severities, audit-logged", async () => {
    const me = await sessionOf("oncall@harrowfen.example");
    const fd = new FormData();
    fd.set("phone", "07700 900123");
    fd.append("smsSeverities", "high");
    fd.append("pushSeverities", "high");
    fd.append("pushSeverities", "medium");
    const r = await saveMyNotificationsAction.run(me, fd);
    expect(r).toEqual({ ok: true, data: { personId: me.personId, phone: "+447700900123" } });
    const s = await getNotificationSettings(getDb(), me.personId);
    expect(s).toMatchObject({ phoneE164: "+447700900123", smsSeverities: ["high"], pushSeverities: ["medium", "high"] });
    const [a] = await getDb().select().from(auditLog).where(and(eq(auditLog.action, "person.notifications"), eq(auditLog.subjectId, String(me.personId)))).orderBy(desc(auditLog.id)).limit(1);
    expect(a.summary).toBe("Notifications: mobile +447700900123; texts for high; push for medium,high.");
  });

  it("refuses a number that cannot take texts, and texts without a number", async () => {
    const me = await sessionOf("oncall@harrowfen.example");
    for (const phone of ["12", "+44 20 7946 0000" /* a London landline of the reserved drama range */, "x".repeat(41)]) {
      const r = await saveMyNotificationsAction.run(me, { phone, smsSeverities: "high" });
      expect(r.ok, phone).toBe(false);
      if (!r.ok) expect(r.fieldErrors?.phone?.length, phone).toBe(1);
    }
    const r = await saveMyNotificationsAction.run(me, { phone: "", smsSeverities: ["high"] });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fieldErrors?.phone).toEqual(["Add a mobile number to get texts"]);
    // nothing changed
    expect((await getNotificationSettings(getDb(), me.personId))?.phoneE164).toBe("+447700900123");
  });

  it("an engineer may not change someone else's; an admin may", async () => {
    const eng = await sessionOf("engineer@harrowfen.example");
    const other = await sessionOf("oncall@harrowfen.example");
    const refused = await saveMyNotificationsAction.run(eng, { personId: other.personId, phone: "+1 555 0100" });
    expect(refused.ok ? 0 : refused.status).toBe(403);
    expect((await getNotificationSettings(getDb(), other.personId))?.phoneE164).toBe("+447700900123");
    const admin = await sessionOf("admin@harrowfen.example");
    const r = await saveMyNotificationsAction.run(admin, { personId: other.personId, phone: "+1 202 555 0143", pushSeverities: "high" });
    expect(r.ok).toBe(true);
    expect(await getNotificationSettings(getDb(), other.personId)).toMatchObject({ phoneE164: "+12025550143", smsSeverities: [], pushSeverities: ["high"] });
    const missing = await saveMyNotificationsAction.run(admin, { personId: 999_999, phone: "" });
    expect(missing.ok ? 0 : missing.status).toBe(404);
  });

  it("keeps one row per push endpoint, owned by whoever subscribed it last; removes only one's own", async () => {
    const eng = await sessionOf("engineer@harrowfen.example");
    const lead = await sessionOf("lead@harrowfen.example");
    const sub = fakeSubscription(1);
    await savePushSubscription(getDb(), eng.personId, sub, "Phone browser");
    await savePushSubscription(getDb(), eng.personId, sub, "Phone browser");
    expect((await getNotificationSettings(getDb(), eng.personId))?.pushDevices).toBe(1);
    expect(await deletePushSubscription(getDb(), lead.personId, sub.endpoint)).toBe(0);
    await savePushSubscription(getDb(), lead.personId, sub, null);
    const rows = await getDb().select().from(pushSubscriptions).where(eq(pushSubscriptions.endpoint, sub.endpoint));
    expect(rows.map((r) => r.personId)).toEqual([lead.personId]);
    expect(await deletePushSubscription(getDb(), lead.personId, sub.endpoint)).toBe(1);
  });
});
