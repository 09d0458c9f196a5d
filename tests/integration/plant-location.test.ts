// An admin sets the plant's location (On-call page) for the outdoor forecast: checked on the
// server by role, validated, stored in the plant settings row, audit-logged with old and new.
import { afterAll, describe, expect, it } from "vitest";
import { and, desc, eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { auditLog, people } from "@/db/schema";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { savePlantLocationAction } from "@/app/_server/actions/plant-location";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

async function sessionOf(role: "admin" | "engineer"): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((x) => x.role === role)!;
  const [row] = await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email));
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

afterAll(async () => {
  await closeDb();
});

describe("the plant's location", () => {
  it("an engineer may not set it; nothing changes", async () => {
    const before = await getPlantSettings(getDb());
    const r = await savePlantLocationAction.run(await sessionOf("engineer"), { latitude: "10", longitude: "10" });
    expect(r.ok).toBe(false);
    expect(r.ok ? 0 : r.status).toBe(403);
    const after = await getPlantSettings(getDb());
    expect([after.latitude, after.longitude]).toEqual([before.latitude, before.longitude]);
  });

  it("refuses out-of-range, empty and non-numeric values with a message per field", async () => {
    const admin = await sessionOf("admin");
    for (const bad of [
      { latitude: "91", longitude: "0" },
      { latitude: "0", longitude: "-180.5" },
      { latitude: "", longitude: "0" },
      { latitude: "north", longitude: "0" },
      { latitude: "1".repeat(40), longitude: "0" },
    ]) {
      const r = await savePlantLocationAction.run(admin, bad);
      expect(r.ok, JSON.stringify(bad)).toBe(false);
      if (!r.ok) expect(Object.keys(r.fieldErrors ?? {}).length, JSON.stringify(bad)).toBe(1);
    }
  });

  it("an admin sets it; the plant settings keep their other fields and the audit log has old and new", async () => {
    const admin = await sessionOf("admin");
    const before = await getPlantSettings(getDb());
    const fd = new FormData();
    fd.set("latitude", " 53.123456 ");
    fd.set("longitude", "-1.5");
    const r = await savePlantLocationAction.run(admin, fd);
    expect(r).toEqual({ ok: true, data: { latitude: 53.1235, longitude: -1.5 } });
    const after = await getPlantSettings(getDb());
    expect(after).toEqual({ ...before, latitude: 53.1235, longitude: -1.5 });
    const [entry] = await getDb().select().from(auditLog).where(and(eq(auditLog.action, "plant.location"), eq(auditLog.personId, admin.personId))).orderBy(desc(auditLog.id)).limit(1);
    expect(entry.summary).toBe(`Plant location: was ${before.latitude === undefined ? "not set" : `${before.latitude}, ${before.longitude}`}; now 53.1235, -1.5.`);
    expect(entry.detail).toEqual({ old: { latitude: before.latitude ?? null, longitude: before.longitude ?? null }, new: { latitude: 53.1235, longitude: -1.5 } });
  });
});
