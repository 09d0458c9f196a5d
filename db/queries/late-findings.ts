// Data access for the late re-check (ingest/late-recheck.ts, pure part lib/rules/late-span.ts):
// the stored readings around a late span, the alerts already in the history there, and the
// storing of an excursion found late (an alert row, its raised and cleared events, a
// late_findings row saying when it was found and whether it stayed quiet, and the mails when it
// pages) in one transaction. Also the "found late" marks the alert history shows.
import { and, gte, inArray, isNull, lte, or } from "drizzle-orm";
import type mysql from "mysql2/promise";
import type { Db } from "../client";
import { alertEvents, alerts, lateFindings } from "../schema";
import type { Channel, Reading } from "../../lib/rules";
import type { KnownAlert, LateFinding } from "../../lib/rules/late-span";
import { mergeSeries, type ReplaySeries } from "../../lib/rules/replay-scope";
import { applyClearTransition, insertRaisedAlert } from "./alert-transitions";
import { enqueueMail, type NewMail } from "./outbox";
import type { AlertSubject } from "./topology";

/** Stored readings of the given sensors and channels in [fromTs, toTs], merged into reading-time order. */
export async function loadScopeReadings(
  pool: mysql.Pool,
  sensors: ReadonlyArray<{ deviceId: number; code: string; channels: readonly Channel[] }>,
  fromTs: number,
  toTs: number,
): Promise<Reading[]> {
  const series: ReplaySeries[] = [];
  for (const s of sensors) {
    for (const channel of s.channels) {
      const [rows] = await pool.query<mysql.RowDataPacket[]>({
        sql: "SELECT ts, value FROM readings WHERE device_id = ? AND channel = ? AND ts >= ? AND ts <= ? ORDER BY ts",
        values: [s.deviceId, channel, fromTs, toTs],
        rowsAsArray: true,
      });
      if (rows.length === 0) continue;
      const ts = new Array<number>(rows.length);
      const values = new Array<number>(rows.length);
      for (let i = 0; i < rows.length; i++) {
        ts[i] = Number(rows[i][0]);
        values[i] = Number(rows[i][1]);
      }
      series.push({ code: s.code, channel, ts, values });
    }
  }
  return mergeSeries(series);
}

/** Alerts whose time overlaps [fromTs, toTs] (still open ones included). */
export async function listKnownAlerts(db: Db, fromTs: number, toTs: number): Promise<KnownAlert[]> {
  return db
    .select({ ruleId: alerts.ruleId, subjectKey: alerts.subjectKey, startTs: alerts.startTs, endTs: alerts.endTs })
    .from(alerts)
    .where(and(lte(alerts.startTs, toTs), or(isNull(alerts.endTs), gte(alerts.endTs, fromTs))))
    .limit(10_000);
}

export type StoredLateFinding = { alertId: number; state: string; lineId: number | null; areaId: number | null };

/**
 * Stores one finding: the alert as raised at its reading time and cleared when it ended, marked
 * found late. `page` (when the finding is not quiet) gives the mails to queue once the alert id
 * is known and the escalation order they stand for, in the same transaction.
 */
export async function storeLateFinding(
  db: Db,
  f: LateFinding,
  subject: AlertSubject | undefined,
  nowMs: number,
  page: { order: number; mails(alertId: number): NewMail[] } | null,
): Promise<StoredLateFinding> {
  return db.transaction(async (tx) => {
    const { id } = await insertRaisedAlert(tx, f.raise, subject, nowMs);
    const cleared = await applyClearTransition(tx, id, { ts: f.endedTs, peakValue: f.clear.peakValue, message: f.clear.message });
    await tx.insert(lateFindings).values({ alertId: id, foundTs: nowMs, endedTs: f.endedTs, quiet: f.quiet });
    const note = f.quiet ? "Found late: its readings arrived after it had ended; it ended long enough ago that nobody was paged" : "Found late: its readings arrived after it had ended; on call paged";
    await tx.insert(alertEvents).values({ alertId: id, ts: nowMs, kind: "commented", personId: null, comment: note });
    if (page) {
      const mails = page.mails(id);
      for (const m of mails) await enqueueMail(tx, m, nowMs);
      await tx.update(alerts).set({ notifiedLevel: page.order }).where(inArray(alerts.id, [id]));
      await tx.insert(alertEvents).values({ alertId: id, ts: nowMs, kind: "notified", personId: null, comment: `Order ${page.order}: ${mails.map((m) => m.toAddress).join(", ") || "nobody on call"}`.slice(0, 2000), value: String(page.order) });
    }
    return { alertId: id, state: cleared?.state ?? "cleared_unacked", lineId: subject?.lineId ?? null, areaId: subject?.areaId ?? null };
  });
}

export type FoundLateMark = { foundTs: number; endedTs: number | null; quiet: boolean };

/** The "found late" marks of the given alerts (absent: raised live). */
export async function getFoundLateMarks(db: Db, alertIds: readonly number[]): Promise<Map<number, FoundLateMark>> {
  const out = new Map<number, FoundLateMark>();
  if (alertIds.length === 0) return out;
  const rows = await db
    .select({ alertId: lateFindings.alertId, foundTs: lateFindings.foundTs, endedTs: lateFindings.endedTs, quiet: lateFindings.quiet })
    .from(lateFindings)
    .where(inArray(lateFindings.alertId, [...new Set(alertIds)].slice(0, 5000)));
  for (const r of rows) out.set(r.alertId, { foundTs: r.foundTs, endedTs: r.endedTs, quiet: r.quiet });
  return out;
}
