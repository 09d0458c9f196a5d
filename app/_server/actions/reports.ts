// Report actions: e-mail a shift handover to the person taking over. Queues one outbox row
// (the mailer loop sends it); the dedupe key handover:<shiftStartTs>:<personId> makes a repeat
// for the same shift and person a no-op that says so.
import "server-only";
import { z } from "zod";
import { getDb, type Db } from "@/db/client";
import { writeAudit } from "@/db/queries/audit";
import { getRecipient } from "@/db/queries/reports";
import { getHandoverReport } from "@/db/use-cases/handover-report";
import { enqueueMail } from "@/db/queries/outbox";
import { getEnv } from "@/db/env";
import { AppError, badInput } from "@/lib/errors";
import { can, type Role } from "@/lib/permissions";
import { isValidDate } from "@/lib/plant-time";
import { handoverSubject, handoverText } from "@/lib/mail/handover-email";
import { handoverHtml } from "@/lib/mail/handover-html";
import { lineChartAlt, lineChartCid } from "@/lib/charts/line-mail-chart";
import { handoverLineChartSpecs } from "@/db/queries/handover-charts";
import { STATE_SYMBOLS, STATE_WORDS } from "@/lib/vocabulary";
import { defineAction } from "../action";
import type { SessionPerson } from "../session";

export const handoverEmailSchema = z.object({
  date: z
    .string({ message: "Choose the shift date" })
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, { message: "Enter the shift date as YYYY-MM-DD" })
    .refine(isValidDate, { message: "There is no such date" }),
  shift: z.string({ message: "Choose a shift" }).trim().min(1, { message: "Choose a shift" }).max(40),
  toPersonId: z.coerce.number({ message: "Choose who takes over" }).int().positive({ message: "Choose who takes over" }),
});

export type HandoverEmailInput = z.infer<typeof handoverEmailSchema>;

export function handoverDedupeKey(shiftStartTs: number, personId: number): string {
  return `handover:${shiftStartTs}:${personId}`;
}

/** Queues the handover mail; the caller has checked the sender's permission. */
export async function emailHandover(db: Db, input: HandoverEmailInput, sender: SessionPerson, nowTs: number): Promise<{ outboxId: number; toName: string; dedupeKey: string }> {
  const recipient = await getRecipient(db, input.toPersonId);
  if (!recipient || !recipient.active) throw badInput("That person cannot receive the handover.", { toPersonId: ["Choose someone from the list"] });
  if (!can(recipient.role as Role, "alert.respond")) {
    throw badInput("Send the handover to a shift lead, engineer or admin.", { toPersonId: ["This person's role cannot take over a shift"] });
  }
  const report = await getHandoverReport(db, { date: input.date, shift: input.shift }, nowTs);
  if (!report) throw badInput(`The plant has no shift called "${input.shift}".`, { shift: ["Choose a shift from the list"] });
  const link = `${getEnv().APP_URL}/reports/handover?date=${encodeURIComponent(input.date)}&shift=${encodeURIComponent(input.shift)}`;
  const dedupeKey = handoverDedupeKey(report.window.startTs, recipient.id);
  const bodyText = handoverText(report, { symbols: STATE_SYMBOLS, words: STATE_WORDS }, { fromName: sender.name, link });
  const charts = await handoverLineChartSpecs(db, report);
  const bodyHtml = handoverHtml(bodyText, charts.map((c) => ({ cid: lineChartCid(c.lineId), alt: lineChartAlt(c), lineName: c.title })));
  const queued = await enqueueMail(
    db,
    {
      dedupeKey,
      toAddress: recipient.email,
      subject: handoverSubject(report),
      bodyText,
      bodyHtml,
      chart: charts.length > 0 ? charts : null,
    },
    nowTs,
  );
  if (!queued.queued || queued.id === null) {
    throw new AppError("conflict", `This handover has already been sent to ${recipient.name}.`);
  }
  await writeAudit(db, {
    personId: sender.personId,
    action: "report.handover_email",
    subjectType: "report",
    subjectId: `handover:${report.window.startTs}`,
    summary: `E-mailed the ${report.window.name} shift handover of ${report.window.date} to ${recipient.name}`,
  }, nowTs);
  return { outboxId: queued.id, toName: recipient.name, dedupeKey };
}

/** Shift leads and up hand a shift over (the same people who write line notes). */
export const emailHandoverAction = defineAction("note.add", handoverEmailSchema, async (input, session) => {
  return emailHandover(getDb(), input, session, Date.now());
});
