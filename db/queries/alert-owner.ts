// Data access of the alert owner (ingest/alerts-owner.ts): the lease row, the reading journal,
// the engine's rows per rule and subject, and the owner's progress through the journal.
// Lease times use the database's clock, so the workers' clocks need not agree.
import { and, asc, eq, gt, gte, inArray, lt, sql } from "drizzle-orm";
import type mysql from "mysql2/promise";
import type { Db } from "../client";
import { alertEngineRows, alertOwnerProgress, devices, readingJournal, serviceLeases } from "../schema";

type Tx = Pick<Db, "insert" | "select" | "execute">;
const NOW = "CAST(ROUND(UNIX_TIMESTAMP(NOW(3)) * 1000) AS SIGNED)";
const DB_NOW_MS = sql.raw(NOW);

export class LeaseLostError extends Error {
  constructor(name: string, token: number) {
    super(`the ${name} lease (token ${token}) is held by someone else now`);
    this.name = "LeaseLostError";
  }
}

/** Takes the lease when it is free or expired; returns the new fencing token, or null. */
export async function acquireLease(pool: mysql.Pool, name: string, holder: string, ttlMs: number): Promise<number | null> {
  await pool.query("INSERT IGNORE INTO service_leases (name, token, expires_ts) VALUES (?, 0, 0)", [name]);
  const [res] = await pool.query<mysql.ResultSetHeader>(
    `UPDATE service_leases SET holder = ?, token = token + 1, acquired_ts = ${NOW}, expires_ts = ${NOW} + ?
      WHERE name = ? AND (holder IS NULL OR expires_ts < ${NOW})`,
    [holder, ttlMs, name],
  );
  if (res.affectedRows !== 1) return null;
  const [rows] = await pool.query<mysql.RowDataPacket[]>("SELECT token FROM service_leases WHERE name = ? AND holder = ?", [name, holder]);
  return rows.length ? Number(rows[0].token) : null;
}

/** Extends the lease; false when it is no longer ours. */
export async function renewLease(pool: mysql.Pool, name: string, holder: string, token: number, ttlMs: number): Promise<boolean> {
  const [res] = await pool.query<mysql.ResultSetHeader>(
    `UPDATE service_leases SET expires_ts = ${NOW} + ? WHERE name = ? AND holder = ? AND token = ?`,
    [ttlMs, name, holder, token],
  );
  return res.affectedRows === 1;
}

export async function releaseLease(pool: mysql.Pool, name: string, token: number): Promise<void> {
  await pool.query("UPDATE service_leases SET holder = NULL, expires_ts = 0 WHERE name = ? AND token = ?", [name, token]);
}

export type LeaseView = { name: string; holder: string | null; token: number; expiresTs: number; acquiredTs: number | null; dbNowTs: number };

export async function readLease(db: Db, name: string): Promise<LeaseView | null> {
  const rows = await db
    .select({ name: serviceLeases.name, holder: serviceLeases.holder, token: serviceLeases.token, expiresTs: serviceLeases.expiresTs, acquiredTs: serviceLeases.acquiredTs, dbNowTs: sql<number>`${DB_NOW_MS}` })
    .from(serviceLeases)
    .where(eq(serviceLeases.name, name));
  return rows[0] ? { ...rows[0], dbNowTs: Number(rows[0].dbNowTs) } : null;
}

/** Inside a write transaction: locks the lease row and refuses when `token` is no longer current. */
export async function assertLeaseHeld(tx: Tx, name: string, token: number): Promise<void> {
  const rows = await tx.select({ token: serviceLeases.token }).from(serviceLeases).where(eq(serviceLeases.name, name)).for("update");
  if (!rows[0] || rows[0].token !== token) throw new LeaseLostError(name, token);
}

// ---- journal ----

export type JournalEntry = { id: number; createdTs: number; body: string };

export async function readJournalAfter(db: Db, afterId: number, limit: number): Promise<JournalEntry[]> {
  return db
    .select({ id: readingJournal.id, createdTs: readingJournal.createdTs, body: readingJournal.body })
    .from(readingJournal)
    .where(gt(readingJournal.id, afterId))
    .orderBy(asc(readingJournal.id))
    .limit(limit);
}

/** Entries up to `uptoId` (plus the given ids above it) written since `sinceTs`, newest first. */
export async function readJournalForWarmUp(db: Db, sinceTs: number, uptoId: number, extraIds: number[], limit: number): Promise<JournalEntry[]> {
  const rows = await db
    .select({ id: readingJournal.id, createdTs: readingJournal.createdTs, body: readingJournal.body })
    .from(readingJournal)
    .where(and(gte(readingJournal.createdTs, sinceTs), sql`${readingJournal.id} <= ${uptoId}`))
    .orderBy(sql`${readingJournal.id} DESC`)
    .limit(limit);
  if (extraIds.length) rows.push(...(await db.select({ id: readingJournal.id, createdTs: readingJournal.createdTs, body: readingJournal.body }).from(readingJournal).where(inArray(readingJournal.id, extraIds))));
  return rows;
}

/** The id just below the oldest entry kept (0 when the journal is empty). */
export async function journalStartFloor(db: Db): Promise<number> {
  const rows = await db.select({ id: sql<number>`COALESCE(MIN(${readingJournal.id}) - 1, 0)` }).from(readingJournal);
  return Number(rows[0]?.id ?? 0);
}

export async function purgeJournal(db: Db, beforeTs: number): Promise<void> {
  await db.delete(readingJournal).where(lt(readingJournal.createdTs, beforeTs)).limit(20_000);
}

// ---- engine rows and progress ----

export type EngineRow = { ruleId: number; subjectKey: string; ruleVersion: number; state: string };
export type OwnerProgress = { journalId: number; seenAbove: string; readingTs: number; updatedTs: number; token: number };

export async function loadEngineRows(db: Db): Promise<EngineRow[]> {
  return db.select({ ruleId: alertEngineRows.ruleId, subjectKey: alertEngineRows.subjectKey, ruleVersion: alertEngineRows.ruleVersion, state: alertEngineRows.state }).from(alertEngineRows);
}

export async function writeEngineRows(tx: Tx, rows: EngineRow[], token: number, nowMs: number): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) {
    const part = rows.slice(i, i + 500).map((r) => ({ ...r, updatedTs: nowMs, token }));
    await tx
      .insert(alertEngineRows)
      .values(part)
      .onDuplicateKeyUpdate({ set: { ruleVersion: sql`VALUES(rule_version)`, state: sql`VALUES(state)`, updatedTs: sql`VALUES(updated_ts)`, token: sql`VALUES(token)` } });
  }
}

export async function readProgress(tx: Pick<Db, "select">, name: string): Promise<OwnerProgress | null> {
  const rows = await tx
    .select({ journalId: alertOwnerProgress.journalId, seenAbove: alertOwnerProgress.seenAbove, readingTs: alertOwnerProgress.readingTs, updatedTs: alertOwnerProgress.updatedTs, token: alertOwnerProgress.token })
    .from(alertOwnerProgress)
    .where(eq(alertOwnerProgress.name, name));
  return rows[0] ?? null;
}

export async function writeProgress(tx: Tx, name: string, p: OwnerProgress): Promise<void> {
  await tx.insert(alertOwnerProgress).values({ name, ...p }).onDuplicateKeyUpdate({ set: p });
}

export async function listDeviceCodes(db: Db): Promise<Map<number, string>> {
  const rows = await db.select({ id: devices.id, code: devices.code }).from(devices);
  return new Map(rows.map((r) => [r.id, r.code]));
}
