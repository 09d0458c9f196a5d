// db/use-cases/ is the one place for use cases that combine data access (db/queries) with the
// rules and computations of lib/ (see db/use-cases/replay-rule-proposal.ts).
//
// Use case: the weekly due-list e-mail — read the due list (db/queries/due-list.ts), render it
// (lib/mail/due-list-email.ts) and queue one outbox row per person (db/queries/outbox.ts).
import { and, eq } from "drizzle-orm";
import type { Db } from "../client";
import { getEnv } from "../env";
import { people } from "../schema";
import { getDueList } from "../queries/due-list";
import { getPlantSettings } from "../queries/plant-settings";
import { enqueueMail } from "../queries/outbox";
import { formatDueListEmail, isoWeekKey } from "../../lib/mail/due-list-email";

/**
 * Queues the due list for everyone active on the maintenance list, one outbox row each, with
 * dedupeKey "due-list:<ISO week>:<personId>" so a week's list is queued once however often this
 * runs. `manual` (the "Send due list now" button) uses a per-minute key instead, so a second
 * click within the minute adds nothing.
 */
export async function queueWeeklyDueListEmail(db: Db, nowMs: number, opts: { manual?: boolean } = {}): Promise<{ queued: number; recipients: number; weekKey: string }> {
  const plant = await getPlantSettings(db);
  const weekKey = isoWeekKey(nowMs, plant.timeZone);
  const recipients = await db
    .select({ id: people.id, email: people.email })
    .from(people)
    .where(and(eq(people.onMaintenanceList, true), eq(people.active, true)));
  if (!recipients.length) return { queued: 0, recipients: 0, weekKey };
  const list = await getDueList(db, nowMs);
  const mail = formatDueListEmail(list, plant.timeZone, getEnv().APP_URL);
  let queued = 0;
  for (const r of recipients) {
    const dedupeKey = opts.manual ? `due-list-now:${Math.floor(nowMs / 60_000)}:${r.id}` : `due-list:${weekKey}:${r.id}`;
    if ((await enqueueMail(db, { dedupeKey, toAddress: r.email, subject: mail.subject, bodyText: mail.text, bodyHtml: mail.html }, nowMs)).queued) queued++;
  }
  return { queued, recipients: recipients.length, weekKey };
}
