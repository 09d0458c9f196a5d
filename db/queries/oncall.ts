// The on-call roster (who is called when, in which escalation order) and the alerting settings
// (which severity is e-mailed, after how long, when to escalate, when the daily digest goes).
import { and, asc, eq, gt, lte, lt, gte } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "../client";
import { oncallShifts, people, settings } from "../schema";
import { writeAudit } from "./audit";
import { badInput, notFound } from "../../lib/errors";

export const ALERTING_SETTINGS_KEY = "alerting";

export const alertingSettingsSchema = z.object({
  /** alerts at or above this severity are e-mailed to the on-call person */
  notifyMinSeverity: z.enum(["low", "medium", "high"]).default("medium"),
  /** unacknowledged this long after it was raised → e-mail to escalation order 1 (default 5 min) */
  notifyAfterS: z.number().int().min(0).max(86_400).default(300),
  /** still unacknowledged this much later → e-mail to the next order (default 5 min) */
  escalateAfterS: z.number().int().min(0).max(86_400).default(300),
  /** local plant hour at which the daily digest of the previous day goes out */
  digestHourLocal: z.number().int().min(0).max(23).default(6),
});
export type AlertingSettings = z.infer<typeof alertingSettingsSchema>;
export const DEFAULT_ALERTING_SETTINGS: AlertingSettings = alertingSettingsSchema.parse({});

export async function getAlertingSettings(db: Db): Promise<AlertingSettings> {
  const [row] = await db.select({ value: settings.value }).from(settings).where(eq(settings.key, ALERTING_SETTINGS_KEY)).limit(1);
  if (!row) return DEFAULT_ALERTING_SETTINGS;
  const parsed = alertingSettingsSchema.safeParse(row.value);
  return parsed.success ? parsed.data : DEFAULT_ALERTING_SETTINGS;
}

export async function saveAlertingSettings(db: Db, next: AlertingSettings, personId: number | null, nowMs = Date.now()): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx.select({ value: settings.value }).from(settings).where(eq(settings.key, ALERTING_SETTINGS_KEY)).for("update");
    const old = row ? alertingSettingsSchema.safeParse(row.value) : null;
    if (row) await tx.update(settings).set({ value: next, updatedAt: nowMs }).where(eq(settings.key, ALERTING_SETTINGS_KEY));
    else await tx.insert(settings).values({ key: ALERTING_SETTINGS_KEY, value: next, updatedAt: nowMs });
    const was = old?.success ? old.data : DEFAULT_ALERTING_SETTINGS;
    await writeAudit(
      tx,
      {
        personId,
        action: "alerting.settings",
        subjectType: "settings",
        subjectId: ALERTING_SETTINGS_KEY,
        summary: `Alert e-mails: was ${describe(was)}; now ${describe(next)}.`,
        detail: { old: was, new: next },
      },
      nowMs,
    );
  });
}

function describe(s: AlertingSettings): string {
  return `${s.notifyMinSeverity} and above after ${Math.round(s.notifyAfterS / 60)} min, escalate after ${Math.round(s.escalateAfterS / 60)} min more, digest at ${String(s.digestHourLocal).padStart(2, "0")}:00`;
}

export type RosterShift = { id: number; personId: number; personName: string; personEmail: string; personActive: boolean; startTs: number; endTs: number; escalationOrder: number; note: string | null };

const shiftColumns = {
  id: oncallShifts.id,
  personId: oncallShifts.personId,
  personName: people.name,
  personEmail: people.email,
  personActive: people.active,
  startTs: oncallShifts.startTs,
  endTs: oncallShifts.endTs,
  escalationOrder: oncallShifts.escalationOrder,
  note: oncallShifts.note,
};

/** Shifts overlapping [fromTs, toTs), in time then escalation order. */
export async function listShifts(db: Db, fromTs: number, toTs: number): Promise<RosterShift[]> {
  return db
    .select(shiftColumns)
    .from(oncallShifts)
    .innerJoin(people, eq(people.id, oncallShifts.personId))
    .where(and(lt(oncallShifts.startTs, toTs), gt(oncallShifts.endTs, fromTs)))
    .orderBy(asc(oncallShifts.startTs), asc(oncallShifts.escalationOrder), asc(oncallShifts.id))
    .limit(2000);
}

/** Who is on call at `ts` (active people only), by escalation order. */
export async function listOnCallAt(db: Db, ts: number): Promise<RosterShift[]> {
  return db
    .select(shiftColumns)
    .from(oncallShifts)
    .innerJoin(people, eq(people.id, oncallShifts.personId))
    .where(and(lte(oncallShifts.startTs, ts), gt(oncallShifts.endTs, ts), eq(people.active, true)))
    .orderBy(asc(oncallShifts.escalationOrder), asc(oncallShifts.id));
}

export const addShiftInputSchema = z
  .object({
    personId: z.coerce.number().int().positive({ message: "Choose a person" }),
    startTs: z.number().int(),
    endTs: z.number().int(),
    escalationOrder: z.coerce.number().int().min(1, { message: "Order starts at 1 (first called)" }).max(9),
    note: z.string().trim().max(200).optional(),
  })
  .refine((s) => s.endTs > s.startTs, { message: "The shift must end after it starts", path: ["endTs"] })
  .refine((s) => s.endTs - s.startTs <= 31 * 86_400_000, { message: "A shift can be at most 31 days long", path: ["endTs"] });
export type AddShiftInput = z.infer<typeof addShiftInputSchema>;

export async function addShift(db: Db, input: AddShiftInput, byPersonId: number, nowMs = Date.now()): Promise<number> {
  return db.transaction(async (tx) => {
    const [person] = await tx.select({ id: people.id, name: people.name, active: people.active }).from(people).where(eq(people.id, input.personId));
    if (!person) throw badInput("No such person.", { personId: ["No such person"] });
    if (!person.active) throw badInput(`${person.name} is deactivated and cannot be on call.`, { personId: ["This person is deactivated"] });
    const [res] = await tx.insert(oncallShifts).values({
      personId: input.personId,
      startTs: input.startTs,
      endTs: input.endTs,
      escalationOrder: input.escalationOrder,
      note: input.note || null,
    });
    await writeAudit(
      tx,
      {
        personId: byPersonId,
        action: "oncall.add",
        subjectType: "oncall_shift",
        subjectId: res.insertId,
        summary: `On-call: ${person.name} (order ${input.escalationOrder}) from ${new Date(input.startTs).toISOString()} to ${new Date(input.endTs).toISOString()}`,
        detail: input,
      },
      nowMs,
    );
    return res.insertId;
  });
}

export async function removeShift(db: Db, id: number, byPersonId: number, nowMs = Date.now()): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx.select(shiftColumns).from(oncallShifts).innerJoin(people, eq(people.id, oncallShifts.personId)).where(eq(oncallShifts.id, id));
    if (!row) throw notFound("No such on-call shift.");
    await tx.delete(oncallShifts).where(eq(oncallShifts.id, id));
    await writeAudit(
      tx,
      {
        personId: byPersonId,
        action: "oncall.remove",
        subjectType: "oncall_shift",
        subjectId: id,
        summary: `On-call removed: ${row.personName} (order ${row.escalationOrder}) from ${new Date(row.startTs).toISOString()} to ${new Date(row.endTs).toISOString()}`,
        detail: row,
      },
      nowMs,
    );
  });
}

export type RosterPerson = { id: number; name: string; email: string; role: string };

export async function listRosterPeople(db: Db): Promise<RosterPerson[]> {
  return db.select({ id: people.id, name: people.name, email: people.email, role: people.role }).from(people).where(eq(people.active, true)).orderBy(asc(people.name));
}

/** Shifts of the roster that start in [fromTs, toTs) (used by tests and the page's counts). */
export async function countShiftsStartingBetween(db: Db, fromTs: number, toTs: number): Promise<number> {
  const rows = await db.select({ id: oncallShifts.id }).from(oncallShifts).where(and(gte(oncallShifts.startTs, fromTs), lt(oncallShifts.startTs, toTs)));
  return rows.length;
}
