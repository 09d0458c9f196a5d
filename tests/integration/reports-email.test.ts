// E-mailing a shift handover: only shift leads and up may queue it (403 for a viewer, through
// the action's .run with a real session); it lands in the outbox once, with a dedupe key.
import { afterAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { auditLog, outbox, people } from "@/db/schema";
import { emailHandoverAction, handoverDedupeKey } from "@/app/_server/actions/reports";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";
import { lastCompletedShift } from "@/lib/plant-time";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((d) => d.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

const shift = lastCompletedShift(Date.now(), { timeZone: "Europe/London", shifts: DEFAULT_PLANT_SETTINGS.shifts });

afterAll(async () => {
  await closeDb();
});

describe("e-mail a shift handover", () => {
  it("a viewer gets 403 and nothing is queued", async () => {
    const viewer = await sessionOf("viewer");
    const lead = await sessionOf("shift_lead");
    const result = await emailHandoverAction.run(viewer, { date: shift.date, shift: shift.name, toPersonId: lead.personId });
    expect(result.ok).toBe(false);
    expect(!result.ok && result.status).toBe(403);
    const rows = await getDb().select({ id: outbox.id }).from(outbox).where(eq(outbox.dedupeKey, handoverDedupeKey(shift.startTs, lead.personId)));
    expect(rows).toHaveLength(0);
  });

  it("a signed-out caller gets 401", async () => {
    const result = await emailHandoverAction.run(null, { date: shift.date, shift: shift.name, toPersonId: 1 });
    expect(!result.ok && result.status).toBe(401);
  });

  it("a shift lead queues it once for the next lead; a repeat says it was already sent", async () => {
    const lead = await sessionOf("shift_lead");
    const engineer = await sessionOf("engineer");
    const before = Date.now();
    const first = await emailHandoverAction.run(lead, { date: shift.date, shift: shift.name, toPersonId: String(engineer.personId) });
    expect(first).toMatchObject({ ok: true, data: { toName: engineer.name, dedupeKey: handoverDedupeKey(shift.startTs, engineer.personId) } });
    const rows = await getDb()
      .select({ toAddress: outbox.toAddress, subject: outbox.subject, bodyText: outbox.bodyText, state: outbox.state, nextAttemptTs: outbox.nextAttemptTs, attempts: outbox.attempts })
      .from(outbox)
      .where(eq(outbox.dedupeKey, handoverDedupeKey(shift.startTs, engineer.personId)));
    expect(rows).toHaveLength(1);
    expect(rows[0].toAddress).toBe(engineer.email);
    expect(rows[0].state).toBe("pending");
    expect(rows[0].attempts).toBe(0);
    expect(rows[0].nextAttemptTs).toBeGreaterThanOrEqual(before);
    expect(rows[0].nextAttemptTs).toBeLessThanOrEqual(Date.now());
    expect(rows[0].subject).toContain(`Shift handover — ${shift.name}`);
    expect(rows[0].bodyText).toContain(`Sent by ${lead.name}.`);
    expect(rows[0].bodyText).toContain("Codes: ○ OK  ▲ Near  ◆ Over  ◌ Silent  ‖ Shelved");
    expect(rows[0].bodyText).toContain(`/reports/handover?date=${shift.date}&shift=${shift.name}`);

    const again = await emailHandoverAction.run(lead, { date: shift.date, shift: shift.name, toPersonId: engineer.personId });
    expect(!again.ok && again.status).toBe(409);
    const count = await getDb().select({ id: outbox.id }).from(outbox).where(eq(outbox.dedupeKey, handoverDedupeKey(shift.startTs, engineer.personId)));
    expect(count).toHaveLength(1);

    const audit = await getDb().select({ summary: auditLog.summary }).from(auditLog).where(and(eq(auditLog.action, "report.handover_email"), eq(auditLog.personId, lead.personId)));
    expect(audit.some((a) => a.summary.includes(engineer.name))).toBe(true);
  });

  it("says what is wrong next to the field", async () => {
    const lead = await sessionOf("shift_lead");
    const viewer = await sessionOf("viewer");
    const missing = await emailHandoverAction.run(lead, { date: shift.date, shift: shift.name });
    expect(!missing.ok && missing.fieldErrors?.toPersonId?.[0]).toBe("Choose who takes over");
    const badDate = await emailHandoverAction.run(lead, { date: "2026-02-30", shift: shift.name, toPersonId: viewer.personId });
    expect(!badDate.ok && badDate.fieldErrors?.date?.[0]).toBe("There is no such date");
    const toViewer = await emailHandoverAction.run(lead, { date: shift.date, shift: shift.name, toPersonId: viewer.personId });
    expect(!toViewer.ok && toViewer.status).toBe(400);
    expect(!toViewer.ok && toViewer.fieldErrors?.toPersonId?.[0]).toBe("This person's role cannot take over a shift");
    const noShift = await emailHandoverAction.run(lead, { date: shift.date, shift: "Weekend", toPersonId: (await sessionOf("engineer")).personId });
    expect(!noShift.ok && noShift.fieldErrors?.shift?.[0]).toBe("Choose a shift from the list");
  });
});
