// Ingest diagnostics for the Devices page: the counters each ingest worker (and the broker)
// publishes about itself, and the most recent rejected messages. Also the worker's own writes
// of those rows (status upsert, rejection inserts, trimming to the last few hundred).
import { desc, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "../client";
import { ingestRejections, ingestStatus } from "../schema";

export const REJECTIONS_KEPT = 500;

/** Per-device counters inside a worker's status (keyed by device code). */
export const deviceCountersSchema = z.object({
  messages: z.number(),
  readings: z.number(),
  rejected: z.number(),
  /** messages received in the last minute */
  messagesLastMinute: z.number(),
  lastMessageTs: z.number().nullable(),
});

export const workerStatsSchema = z
  .object({
    kind: z.literal("worker"),
    workerId: z.string(),
    startedTs: z.number(),
    nowTs: z.number(),
    mqttConnected: z.boolean(),
    dbHealthy: z.boolean(),
    accepted: z.object({ messages: z.number(), readings: z.number() }),
    committed: z.object({ readings: z.number(), duplicates: z.number() }),
    rejected: z.object({ total: z.number(), byReason: z.record(z.string(), z.number()) }),
    buffered: z.object({ readings: z.number(), unackedMessages: z.number() }),
    spilled: z.object({ readings: z.number(), files: z.number(), pendingReadings: z.number(), replayedReadings: z.number() }),
    batch: z.object({
      flushes: z.number(),
      failures: z.number(),
      p50Ms: z.number().nullable(),
      p95Ms: z.number().nullable(),
      lastFlushTs: z.number().nullable(),
      lastFlushRows: z.number(),
    }),
    freshness: z.object({ p50Ms: z.number().nullable(), p95Ms: z.number().nullable(), samples: z.number() }),
    devices: z.record(z.string(), deviceCountersSchema),
  })
  .passthrough();
export type WorkerStats = z.infer<typeof workerStatsSchema>;

export const brokerStatsSchema = z
  .object({
    kind: z.literal("broker"),
    brokerId: z.string(),
    startedTs: z.number(),
    nowTs: z.number(),
    clients: z.number(),
    refused: z.object({
      auth: z.number(),
      publish: z.number(),
      subscribe: z.number(),
      oversized: z.number(),
    }),
    messagesIn: z.number(),
  })
  .passthrough();
export type BrokerStats = z.infer<typeof brokerStatsSchema>;

export type IngestStatusRow = { workerId: string; updatedTs: number; stats: WorkerStats | BrokerStats | null };

/** Every worker's and broker's latest counters (stats is null if a row cannot be read). */
export async function getIngestStatus(db: Db): Promise<IngestStatusRow[]> {
  const rows = await db
    .select({ workerId: ingestStatus.workerId, updatedTs: ingestStatus.updatedTs, stats: ingestStatus.stats })
    .from(ingestStatus)
    .orderBy(ingestStatus.workerId);
  return rows.map((r) => {
    let stats: WorkerStats | BrokerStats | null = null;
    try {
      const raw: unknown = JSON.parse(r.stats);
      const w = workerStatsSchema.safeParse(raw);
      if (w.success) stats = w.data;
      else {
        const b = brokerStatsSchema.safeParse(raw);
        if (b.success) stats = b.data;
      }
    } catch {
      stats = null;
    }
    return { workerId: r.workerId, updatedTs: r.updatedTs, stats };
  });
}

export type RejectionRow = { id: number; ts: number; deviceCode: string | null; reason: string; detail: string | null; payload: string | null };

export async function listRecentRejections(db: Db, opts: { deviceCode?: string; limit?: number } = {}): Promise<RejectionRow[]> {
  const limit = Math.min(Math.max(opts.limit ?? 50, 1), REJECTIONS_KEPT);
  const q = db
    .select({
      id: ingestRejections.id,
      ts: ingestRejections.ts,
      deviceCode: ingestRejections.deviceCode,
      reason: ingestRejections.reason,
      detail: ingestRejections.detail,
      payload: ingestRejections.payload,
    })
    .from(ingestRejections);
  const filtered = opts.deviceCode ? q.where(eq(ingestRejections.deviceCode, opts.deviceCode)) : q;
  return filtered.orderBy(desc(ingestRejections.id)).limit(limit);
}

// ---- writes (ingest worker and broker) ----

export async function upsertIngestStatus(db: Db, id: string, nowTs: number, stats: unknown): Promise<void> {
  const json = JSON.stringify(stats);
  await db
    .insert(ingestStatus)
    .values({ workerId: id, updatedTs: nowTs, stats: json })
    .onDuplicateKeyUpdate({ set: { updatedTs: nowTs, stats: json } });
}

export type NewRejection = { ts: number; deviceCode: string | null; reason: string; detail: string; payload: string };

export async function insertRejections(db: Db, rows: readonly NewRejection[]): Promise<void> {
  if (rows.length === 0) return;
  await db.insert(ingestRejections).values(
    rows.map((r) => ({
      ts: r.ts,
      deviceCode: r.deviceCode?.slice(0, 64) ?? null,
      reason: r.reason.slice(0, 40),
      detail: r.detail.slice(0, 300),
      payload: r.payload.slice(0, 1000),
    })),
  );
}

/** Keeps only the newest `keep` rejections. */
export async function trimRejections(db: Db, keep = REJECTIONS_KEPT): Promise<void> {
  await db.execute(
    sql`DELETE FROM ingest_rejections WHERE id < (SELECT COALESCE(MIN(id), 0) FROM (SELECT id FROM ingest_rejections ORDER BY id DESC LIMIT ${keep}) AS newest)`,
  );
}
