// The Health page's read model: every process's latest figures as they wrote them to MariaDB —
// brokers and ingest workers (`ingest_status`, one row each, every few seconds; any app instance
// reads the same rows), the leases of singleton duties such as the alert owner
// (`service_leases`), the mail and text queues, and the read replica's state from the read
// routing (db/read-replica.ts), passed in by the caller.
import { sql } from "drizzle-orm";
import type { Db } from "../client";
import type { BrokerHealth, HealthReport, LeaseHealth, QueueHealth, WorkerHealth } from "../../lib/views/health";
import type { ReplicaView } from "../../lib/views/replica";
import { getIngestStatus } from "./ingest-diagnostics";

/** A process whose last status is older than this is shown as not reporting. */
export const HEALTH_STALE_MS = 30_000;

type Row = Record<string, unknown>;
const rowsOf = (res: unknown): Row[] => {
  const rows = (Array.isArray(res) ? res[0] : res) as unknown;
  return Array.isArray(rows) ? (rows as Row[]) : [];
};
const numOrNull = (v: unknown): number | null => (typeof v === "number" && Number.isFinite(v) ? v : null);
const rec = (v: unknown): Row => (typeof v === "object" && v !== null ? (v as Row) : {});

function isMissingTable(err: unknown): boolean {
  const e = err as { errno?: number; cause?: { errno?: number } };
  return e?.errno === 1146 || e?.cause?.errno === 1146;
}

async function queue(db: Db, table: "outbox" | "phone_outbox"): Promise<QueueHealth> {
  const rows = rowsOf(
    await db.execute(sql`SELECT state AS s, COUNT(*) AS n, MIN(CASE WHEN state = 'pending' THEN created_ts END) AS oldest FROM ${sql.raw(table)} WHERE state <> 'sent' GROUP BY state`),
  );
  const q: QueueHealth = { pending: 0, sending: 0, failed: 0, oldestPendingTs: null };
  for (const r of rows) {
    const s = String(r.s);
    if (s === "pending" || s === "sending" || s === "failed") q[s] = Number(r.n);
    if (s === "pending" && r.oldest !== null) q.oldestPendingTs = Number(r.oldest);
  }
  return q;
}

async function leases(db: Db): Promise<LeaseHealth[]> {
  try {
    const rows = rowsOf(
      await db.execute(sql`SELECT name, holder, token, expires_ts AS e, acquired_ts AS a, CAST(UNIX_TIMESTAMP(NOW(3)) * 1000 AS SIGNED) AS db_now FROM service_leases ORDER BY name`),
    );
    // leases are timed by the database's clock (db/schema/coordination.ts)
    return rows.map((r) => ({
      name: String(r.name),
      holder: r.holder === null ? null : String(r.holder),
      sinceTs: r.a === null ? null : Number(r.a),
      expiresTs: Number(r.e),
      token: Number(r.token),
      held: r.holder !== null && Number(r.e) > Number(r.db_now),
    }));
  } catch (err) {
    if (isMissingTable(err)) return [];
    throw err;
  }
}

export async function getHealthReport(db: Db, replica: ReplicaView, nowTs = Date.now()): Promise<HealthReport> {
  const [status, leaseRows, mail, texts] = await Promise.all([
    getIngestStatus(db),
    leases(db),
    queue(db, "outbox"),
    queue(db, "phone_outbox").catch((err: unknown) => {
      if (isMissingTable(err)) return null;
      throw err;
    }),
  ]);
  const brokers: BrokerHealth[] = [];
  const workers: WorkerHealth[] = [];
  for (const row of status) {
    const s = rec(row.stats);
    const stale = nowTs - row.updatedTs > HEALTH_STALE_MS;
    const rates = rec(s.rates);
    if (s.kind === "broker") {
      brokers.push({ id: row.workerId, updatedTs: row.updatedTs, stale, startedTs: numOrNull(s.startedTs), clients: numOrNull(s.clients), messagesPerS: numOrNull(rates.messagesPerS), messagesIn: numOrNull(s.messagesIn) });
    } else {
      const buffered = rec(s.buffered);
      const spilled = rec(s.spilled);
      workers.push({
        id: row.workerId,
        updatedTs: row.updatedTs,
        stale,
        startedTs: numOrNull(s.startedTs),
        mqttConnected: typeof s.mqttConnected === "boolean" ? s.mqttConnected : null,
        dbHealthy: typeof s.dbHealthy === "boolean" ? s.dbHealthy : null,
        readingsPerS: numOrNull(rates.readingsPerS),
        messagesPerS: numOrNull(rates.messagesPerS),
        inFlightReadings: numOrNull(buffered.readings),
        unackedMessages: numOrNull(buffered.unackedMessages),
        spillPendingReadings: numOrNull(spilled.pendingReadings),
        spilledReadings: numOrNull(spilled.readings),
        commitP95Ms: numOrNull(rec(s.freshness).p95Ms),
        rssMb: numOrNull(rec(s.memory).rssMb),
        alerts: s.alerts === "local" || s.alerts === "lease" || s.alerts === "off" ? s.alerts : null,
      });
    }
  }
  const alertOwner = leaseRows.find((l) => l.name.toLowerCase().includes("alert")) ?? null;
  const local = alertOwner ? undefined : workers.find((w) => !w.stale && w.alerts === "local");
  const alertsInWorker = local ? { id: local.id, startedTs: local.startedTs } : null;
  return { nowTs, brokers, workers, alertOwner, alertsInWorker, leases: leaseRows, mail, texts, replica };
}
