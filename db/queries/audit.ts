// The audit log: every change a person makes to limits, equipment, people or devices.
import { desc, eq, and } from "drizzle-orm";
import type { Db } from "../client";
import { auditLog } from "../schema";

export type AuditEntry = {
  personId: number | null;
  action: string;
  subjectType: string;
  subjectId?: string | number | null;
  summary: string;
  detail?: unknown;
};

export async function writeAudit(db: Pick<Db, "insert">, e: AuditEntry, ts = Date.now()): Promise<void> {
  await db.insert(auditLog).values({
    ts,
    personId: e.personId,
    action: e.action,
    subjectType: e.subjectType,
    subjectId: e.subjectId == null ? null : String(e.subjectId),
    summary: e.summary.slice(0, 2000),
    detail: e.detail ?? null,
  });
}

export async function listAudit(db: Db, opts: { subjectType?: string; subjectId?: string; limit?: number } = {}) {
  const where = [];
  if (opts.subjectType) where.push(eq(auditLog.subjectType, opts.subjectType));
  if (opts.subjectId) where.push(eq(auditLog.subjectId, opts.subjectId));
  return db
    .select()
    .from(auditLog)
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(auditLog.ts), desc(auditLog.id))
    .limit(Math.min(opts.limit ?? 100, 1000));
}
