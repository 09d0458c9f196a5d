// "Acknowledge all" of a storm group (app/_server/actions/alerts.ts ackAlertGroupAction) with the
// demo people's sessions against the real test database: a viewer gets 403 and nothing changes;
// a shift lead acknowledges every alert of the group still waiting, and only those of the group.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, inArray } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { alertEvents, alerts, people, rules } from "@/db/schema";
import { ackAlertGroupAction, closeAlertPublisher } from "@/app/_server/actions/alerts";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((d) => d.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

const T0 = Date.now() - 10 * 60_000;
const GROUP = `area:1:${T0}:${process.pid}`;
const ids: number[] = [];
let outside = 0;

async function raise(subjectKey: string, notifyGroup: string | null, ts: number): Promise<number> {
  const [rule] = await getDb().select({ id: rules.id }).from(rules).where(eq(rules.kind, "charge_high")).limit(1);
  const [res] = await getDb()
    .insert(alerts)
    .values({ ruleId: rule.id, ruleVersion: 1, kind: "charge_high", severity: "medium", subjectKey, areaId: 1, message: "Charge −13.2 kV, over the 12 kV limit", startTs: ts, peakValue: -13.2, notifiedLevel: 1, notifyGroup });
  return Number(res.insertId);
}

beforeAll(async () => {
  for (let i = 0; i < 3; i++) ids.push(await raise(`point:${900 + i}`, GROUP, T0 + i * 30_000));
  outside = await raise("point:999", `area:1:${T0 + 1}:1`, T0);
});

afterAll(async () => {
  await getDb().delete(alertEvents).where(inArray(alertEvents.alertId, [...ids, outside]));
  await getDb().delete(alerts).where(inArray(alerts.id, [...ids, outside]));
  await closeAlertPublisher();
  await closeDb();
});

describe("acknowledging a storm group", () => {
  it("a viewer gets 403 and nothing changes", async () => {
    const r = await ackAlertGroupAction.run(await sessionOf("viewer"), { group: GROUP });
    expect(!r.ok && r.status).toBe(403);
    const rows = await getDb().select({ state: alerts.state }).from(alerts).where(inArray(alerts.id, ids));
    expect(rows.map((x) => x.state)).toEqual(["active_unacked", "active_unacked", "active_unacked"]);
  });

  it("refuses a group key that is not one", async () => {
    const r = await ackAlertGroupAction.run(await sessionOf("shift_lead"), { group: "area:1' OR 1=1 --" });
    expect(!r.ok && r.status).toBe(400);
  });

  it("a shift lead acknowledges the ones still waiting, each with its own event; others stay", async () => {
    const lead = await sessionOf("shift_lead");
    await getDb().update(alerts).set({ state: "active_acked", ackedBy: lead.personId, ackedTs: Date.now() }).where(eq(alerts.id, ids[0]));
    const r = await ackAlertGroupAction.run(lead, { group: GROUP });
    expect(r.ok && r.data).toEqual({ acknowledged: 2 });
    const rows = await getDb().select({ id: alerts.id, state: alerts.state, ackedBy: alerts.ackedBy }).from(alerts).where(inArray(alerts.id, [...ids, outside]));
    expect(rows.filter((x) => ids.includes(x.id)).map((x) => [x.state, x.ackedBy])).toEqual(ids.map(() => ["active_acked", lead.personId]));
    expect(rows.find((x) => x.id === outside)!.state).toBe("active_unacked");
    const events = await getDb().select({ alertId: alertEvents.alertId }).from(alertEvents).where(inArray(alertEvents.alertId, ids));
    expect(events.map((e) => e.alertId).sort()).toEqual([ids[1], ids[2]].sort());
    // nothing left to acknowledge
    const again = await ackAlertGroupAction.run(lead, { group: GROUP });
    expect(again.ok && again.data).toEqual({ acknowledged: 0 });
  });
});
