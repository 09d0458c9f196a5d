// A person's own notification settings: mobile number (E.164), the severities they want texted
// and pushed, and the phones that allowed push (their push subscriptions). Changes are audit-logged.
import { createHash } from "node:crypto";
import { and, count, eq } from "drizzle-orm";
import type { Db } from "../client";
import { people, pushSubscriptions } from "../schema";
import { writeAudit } from "./audit";
import { severityList, type PhoneSettings, type PushSubscriptionInput } from "../../lib/phone";
import { SEVERITIES, type Severity } from "../../lib/vocabulary";

export type NotificationSettingsView = { personId: number; name: string; phoneE164: string | null; smsSeverities: Severity[]; pushSeverities: Severity[]; pushDevices: number };

const parseList = (s: string): Severity[] => SEVERITIES.filter((x) => s.split(",").includes(x));

export async function getNotificationSettings(db: Db, personId: number): Promise<NotificationSettingsView | null> {
  const [p] = await db.select({ name: people.name, phoneE164: people.phoneE164, sms: people.smsSeverities, push: people.pushSeverities }).from(people).where(eq(people.id, personId)).limit(1);
  if (!p) return null;
  const [{ n }] = await db.select({ n: count() }).from(pushSubscriptions).where(eq(pushSubscriptions.personId, personId));
  return { personId, name: p.name, phoneE164: p.phoneE164, smsSeverities: parseList(p.sms), pushSeverities: parseList(p.push), pushDevices: Number(n) };
}

/** Saves the settings; false when the person does not exist. */
export async function saveNotificationSettings(db: Db, personId: number, s: PhoneSettings, byPersonId: number, nowMs = Date.now()): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [old] = await tx.select({ phoneE164: people.phoneE164, sms: people.smsSeverities, push: people.pushSeverities }).from(people).where(eq(people.id, personId)).for("update");
    if (!old) return false;
    const next = { phoneE164: s.phone, smsSeverities: severityList(s.smsSeverities), pushSeverities: severityList(s.pushSeverities) };
    await tx.update(people).set({ ...next, updatedAt: nowMs }).where(eq(people.id, personId));
    await writeAudit(
      tx,
      {
        personId: byPersonId,
        action: "person.notifications",
        subjectType: "person",
        subjectId: personId,
        summary: `Notifications: mobile ${next.phoneE164 ?? "none"}; texts for ${next.smsSeverities || "nothing"}; push for ${next.pushSeverities || "nothing"}.`,
        detail: { old: { phoneE164: old.phoneE164, smsSeverities: old.sms, pushSeverities: old.push }, new: next },
      },
      nowMs,
    );
    return true;
  });
}

export function endpointHash(endpoint: string): string {
  return createHash("sha256").update(endpoint).digest("hex");
}

/** Stores a phone's push subscription for the person (the same endpoint again updates its keys and owner). */
export async function savePushSubscription(db: Db, personId: number, sub: PushSubscriptionInput, userAgent: string | null, nowMs = Date.now()): Promise<void> {
  const row = { personId, endpoint: sub.endpoint, p256dh: sub.keys.p256dh, auth: sub.keys.auth, userAgent: userAgent ? userAgent.slice(0, 200) : null };
  await db
    .insert(pushSubscriptions)
    .values({ ...row, endpointHash: endpointHash(sub.endpoint), createdTs: nowMs })
    .onDuplicateKeyUpdate({ set: row });
}

/** Removes one of the person's own push subscriptions; the number removed. */
export async function deletePushSubscription(db: Db, personId: number, endpoint: string): Promise<number> {
  const [r] = await db.delete(pushSubscriptions).where(and(eq(pushSubscriptions.personId, personId), eq(pushSubscriptions.endpointHash, endpointHash(endpoint))));
  return r.affectedRows;
}
