// Stores the alerts of backfilled demo history (simulators/backfill.ts plays them through the
// alert pipeline) in bulk: multi-row inserts of `alerts`, then of their `alert_events`. Rows
// are written as history: already cleared or closed, so the escalation runner, which only
// looks at active unacknowledged alerts (db/queries/alert-notify-candidates.ts), never e-mails
// anyone about them and no outbox row is written. Nobody was told of them (notified_level 0, no
// "notified" event): the history does not pretend to messages that were never sent. An alert already stored with the same rule, subject and start is skipped, so a
// second run over the same span adds nothing.
import { and, asc, gte, inArray, lte } from "drizzle-orm";
import type { Db } from "./client";
import { alertEvents, alerts, people, type ALERT_EVENT_KINDS } from "./schema";
import type { AlertSubject } from "./queries/topology";
import { DEMO_PEOPLE } from "../lib/demo-plant";
import type { AlertState, RuleKind, Severity } from "../lib/vocabulary";

export type AlertHistoryEvent = { ts: number; kind: (typeof ALERT_EVENT_KINDS)[number]; personId: number | null; comment: string | null; value: string | null };

export type AlertHistoryRow = {
  ruleId: number;
  ruleVersion: number;
  kind: RuleKind;
  severity: Severity;
  subjectKey: string;
  startTs: number;
  endTs: number | null;
  closedTs: number | null;
  state: AlertState;
  message: string;
  peakValue: number;
  chattering: boolean;
  expectedCrossingTs: number | null;
  worsenedTs: number | null;
  ackedBy: number | null;
  ackedTs: number | null;
  events: readonly AlertHistoryEvent[];
};

/** The demo people who answer alerts, by their part in the story; null when the plant is not the demo's. */
export async function loadDemoResponders(db: Db): Promise<{ lead: number; engineer: number; oncall: number } | null> {
  const email = (part: string) => DEMO_PEOPLE.find((p) => p.email.startsWith(`${part}@`))?.email ?? "";
  const want = { lead: email("lead"), engineer: email("engineer"), oncall: email("oncall") };
  const rows = await db.select({ id: people.id, email: people.email }).from(people).where(inArray(people.email, Object.values(want)));
  const idOf = new Map(rows.map((r) => [r.email, r.id]));
  const lead = idOf.get(want.lead);
  const engineer = idOf.get(want.engineer);
  const oncall = idOf.get(want.oncall);
  return lead !== undefined && engineer !== undefined && oncall !== undefined ? { lead, engineer, oncall } : null;
}

const ALERTS_PER_INSERT = 500;
const EVENTS_PER_INSERT = 2000;
const keyOf = (ruleId: number, subjectKey: string, startTs: number) => `${ruleId}|${subjectKey}|${startTs}`;

/** Writes the alerts and their events; returns how many of each were stored and how many were already there. */
export async function storeAlertHistory(
  db: Db,
  list: readonly AlertHistoryRow[],
  subjects: ReadonlyMap<string, AlertSubject>,
): Promise<{ alerts: number; events: number; alreadyStored: number }> {
  const out = { alerts: 0, events: 0, alreadyStored: 0 };
  for (let i = 0; i < list.length; i += ALERTS_PER_INSERT) {
    const chunk = list.slice(i, i + ALERTS_PER_INSERT).map((a) => ({ ...a, subjectKey: a.subjectKey.slice(0, 80) }));
    const fromTs = Math.min(...chunk.map((a) => a.startTs));
    const toTs = Math.max(...chunk.map((a) => a.startTs));
    const ruleIds = [...new Set(chunk.map((a) => a.ruleId))];
    const inSpan = () =>
      db
        .select({ id: alerts.id, ruleId: alerts.ruleId, subjectKey: alerts.subjectKey, startTs: alerts.startTs })
        .from(alerts)
        .where(and(inArray(alerts.ruleId, ruleIds), gte(alerts.startTs, fromTs), lte(alerts.startTs, toTs)))
        .orderBy(asc(alerts.id));
    const stored = new Set((await inSpan()).map((r) => keyOf(r.ruleId, r.subjectKey, r.startTs)));
    const fresh = chunk.filter((a) => !stored.has(keyOf(a.ruleId, a.subjectKey, a.startTs)));
    out.alreadyStored += chunk.length - fresh.length;
    if (fresh.length === 0) continue;
    await db.insert(alerts).values(
      fresh.map((a) => {
        const s = subjects.get(a.subjectKey);
        return {
          ruleId: a.ruleId,
          ruleVersion: a.ruleVersion,
          kind: a.kind,
          severity: a.severity,
          subjectKey: a.subjectKey,
          areaId: s?.areaId ?? null,
          lineId: s?.lineId ?? null,
          pointId: s?.pointId ?? null,
          deviceId: s?.deviceId ?? null,
          neutralizerId: s?.neutralizerId ?? null,
          state: a.state,
          message: a.message.slice(0, 300),
          startTs: a.startTs,
          endTs: a.endTs,
          closedTs: a.closedTs,
          peakValue: Number.isFinite(a.peakValue) ? a.peakValue : null,
          expectedCrossingTs: a.expectedCrossingTs,
          chattering: a.chattering,
          ackedBy: a.ackedBy,
          ackedTs: a.ackedTs,
          notifiedLevel: 0,
          worsenedTs: a.worsenedTs,
        };
      }),
    );
    // the ids: read back by identity (robust whatever the server's auto-increment lock mode)
    const idOf = new Map((await inSpan()).map((r) => [keyOf(r.ruleId, r.subjectKey, r.startTs), r.id]));
    const events: (typeof alertEvents.$inferInsert)[] = [];
    for (const a of fresh) {
      const alertId = idOf.get(keyOf(a.ruleId, a.subjectKey, a.startTs));
      if (alertId === undefined) throw new Error(`alert history: stored alert ${keyOf(a.ruleId, a.subjectKey, a.startTs)} not found again`);
      for (const e of a.events) {
        events.push({ alertId, ts: e.ts, kind: e.kind, personId: e.personId, comment: e.comment?.slice(0, 300) ?? null, value: e.value?.slice(0, 32) ?? null });
      }
    }
    for (let k = 0; k < events.length; k += EVENTS_PER_INSERT) await db.insert(alertEvents).values(events.slice(k, k + EVENTS_PER_INSERT));
    out.alerts += fresh.length;
    out.events += events.length;
  }
  return out;
}
