// Writes raw readings and keeps the 1-minute and 1-hour rollups in step, exactly once per
// (device, channel, ts), without ever reading raw ranges back to recompute a rollup.
//
// How duplicates are kept out of the rollups (a re-sent message, a redelivery after a worker
// crash, a backfill run twice):
//   1. Fast path, one transaction: INSERT IGNORE the batch into `readings`. If the number of
//      affected rows equals the batch size, every row was new (and none repeated within the
//      batch): add the batch's aggregates to the rollups (INSERT … ON DUPLICATE KEY UPDATE
//      count = count + …) and commit.
//   2. Otherwise some rows already existed or came twice. Roll back, drop repeats within the
//      batch (the first value wins, as in the table), look up which keys exist (primary-key
//      lookups of exactly the batch's keys, never a range scan), and insert only the missing
//      rows with a plain INSERT plus their aggregates. If another writer inserted one of them in
//      the meantime the INSERT fails on the duplicate key, the transaction rolls back and the
//      lookup is repeated, so a row is counted in the rollups only by the transaction that
//      actually inserted it — also with several workers at once.
// Raw rows and rollups always commit together. Duplicates are rare (resends), so the slow path
// costs nothing in normal running.
import { inArray, max } from "drizzle-orm";
import type mysql from "mysql2/promise";
import type { Db } from "../client";
import { devices as devicesTable, rollup1m } from "../schema";
import { CHANNELS, type Channel } from "../../lib/contract/readings-payload";
import { isTransientDbError } from "../transient";

/** `historical` rides along to the reading sinks (ingest/sinks.ts); it is not stored. */
export type ReadingRow = { deviceId: number; channel: Channel; ts: number; value: number; historical?: boolean };
export type WriteResult = { inserted: ReadingRow[]; duplicates: number; attempts: number };
export type RollupAggregate = {
  deviceId: number;
  channel: Channel;
  bucketTs: number;
  min: number;
  max: number;
  count: number;
  sum: number;
  sumSq: number;
};

export const MINUTE_MS = 60_000;
export const HOUR_MS = 3_600_000;
const STATEMENT_ROWS = 5000;
const CHANNEL_SET = new Set<string>(CHANNELS);
const MAX_ATTEMPTS = 16;

function assertSafeRow(r: ReadingRow): void {
  if (
    !Number.isInteger(r.deviceId) ||
    !CHANNEL_SET.has(r.channel) ||
    !Number.isFinite(r.ts) ||
    !Number.isInteger(r.ts) ||
    !Number.isFinite(r.value)
  ) {
    throw new TypeError(`Refusing to write an invalid reading row: ${JSON.stringify(r)}`);
  }
}

const rowKey = (r: { deviceId: number; channel: string; ts: number }) => `${r.deviceId}|${r.channel}|${r.ts}`;
const CHANNEL_INDEX = new Map<string, number>(CHANNELS.map((c, i) => [c, i]));
/** (channel, ts) as one number: ts · 8 + channel index stays exact below 2^53 for any epoch-ms time. */
const channelTsKey = (channel: string, ts: number) => ts * 8 + (CHANNEL_INDEX.get(channel) ?? 7);

/** Drops repeated (device, channel, ts) keys, keeping the first. */
export function dedupeRows(rows: readonly ReadingRow[]): ReadingRow[] {
  // numeric keys per device: much cheaper than a string per row at tens of thousands a second
  const seen = new Map<number, Set<number>>();
  const out: ReadingRow[] = [];
  let lastDevice = NaN;
  let set: Set<number> | undefined;
  for (const r of rows) {
    if (r.deviceId !== lastDevice) {
      lastDevice = r.deviceId;
      set = seen.get(r.deviceId);
      if (!set) seen.set(r.deviceId, (set = new Set()));
    }
    const k = channelTsKey(r.channel, r.ts);
    if (set!.has(k)) continue;
    set!.add(k);
    out.push(r);
  }
  return out;
}

/** min, max, count, sum, sum of squares per (device, channel, bucket), sorted by key. */
export function aggregateRollups(rows: readonly ReadingRow[], bucketMs: number): RollupAggregate[] {
  const byDevice = new Map<number, Map<number, RollupAggregate>>();
  const all: RollupAggregate[] = [];
  let lastDevice = NaN;
  let byKey: Map<number, RollupAggregate> | undefined;
  for (const r of rows) {
    if (r.deviceId !== lastDevice) {
      lastDevice = r.deviceId;
      byKey = byDevice.get(r.deviceId);
      if (!byKey) byDevice.set(r.deviceId, (byKey = new Map()));
    }
    const bucketTs = Math.floor(r.ts / bucketMs) * bucketMs;
    const k = channelTsKey(r.channel, bucketTs);
    const a = byKey!.get(k);
    if (a) {
      if (r.value < a.min) a.min = r.value;
      if (r.value > a.max) a.max = r.value;
      a.count += 1;
      a.sum += r.value;
      a.sumSq += r.value * r.value;
    } else {
      const created = { deviceId: r.deviceId, channel: r.channel, bucketTs, min: r.value, max: r.value, count: 1, sum: r.value, sumSq: r.value * r.value };
      byKey!.set(k, created);
      all.push(created);
    }
  }
  // a fixed order of row locks keeps concurrent writers from deadlocking on rollup rows
  return all.sort(
    (a, b) => a.deviceId - b.deviceId || (a.channel < b.channel ? -1 : a.channel > b.channel ? 1 : 0) || a.bucketTs - b.bucketTs,
  );
}

function rawValues(rows: readonly ReadingRow[], from: number, to: number): string {
  const parts: string[] = new Array(to - from);
  for (let i = from; i < to; i++) {
    const r = rows[i];
    parts[i - from] = `(${r.deviceId},'${r.channel}',${r.ts},${r.value})`;
  }
  return parts.join(",");
}

function rollupValues(aggs: readonly RollupAggregate[], from: number, to: number): string {
  const parts: string[] = [];
  for (let i = from; i < to; i++) {
    const a = aggs[i];
    parts.push(`(${a.deviceId},'${a.channel}',${a.bucketTs},${a.min},${a.max},${a.count},${a.sum},${a.sumSq})`);
  }
  return parts.join(",");
}

type Conn = mysql.Pool | mysql.PoolConnection | mysql.Connection;

async function insertRaw(conn: Conn, rows: readonly ReadingRow[], ignore: boolean): Promise<number> {
  let affected = 0;
  for (let i = 0; i < rows.length; i += STATEMENT_ROWS) {
    const sql = `INSERT ${ignore ? "IGNORE " : ""}INTO readings (device_id, channel, ts, value) VALUES ${rawValues(rows, i, Math.min(rows.length, i + STATEMENT_ROWS))}`;
    const [res] = await conn.query<mysql.ResultSetHeader>(sql);
    affected += res.affectedRows;
  }
  return affected;
}

/**
 * Adds aggregates to a rollup table ("add": merges with what is there) or inserts whole buckets
 * that must not exist yet ("complete": INSERT IGNORE, for history older than the raw retention
 * written by the backfill, where the bucket is the unit of idempotence).
 */
export async function writeRollups(
  conn: Conn,
  table: "rollup_1m" | "rollup_1h",
  aggs: readonly RollupAggregate[],
  mode: "add" | "complete" = "add",
): Promise<void> {
  for (let i = 0; i < aggs.length; i += STATEMENT_ROWS) {
    const values = rollupValues(aggs, i, Math.min(aggs.length, i + STATEMENT_ROWS));
    const head = `INTO ${table} (device_id, channel, bucket_ts, min, max, count, sum, sum_sq) VALUES ${values}`;
    const sql =
      mode === "complete"
        ? `INSERT IGNORE ${head}`
        : `INSERT ${head} ON DUPLICATE KEY UPDATE min = LEAST(min, VALUES(min)), max = GREATEST(max, VALUES(max)), ` +
          `count = count + VALUES(count), sum = sum + VALUES(sum), sum_sq = sum_sq + VALUES(sum_sq)`;
    await conn.query(sql);
  }
}

async function addRollups(conn: Conn, rows: readonly ReadingRow[]): Promise<void> {
  await writeRollups(conn, "rollup_1m", aggregateRollups(rows, MINUTE_MS));
  await writeRollups(conn, "rollup_1h", aggregateRollups(rows, HOUR_MS));
}

/** Keys of `rows` already present in `readings` (primary-key lookups only). */
export async function findExistingKeys(conn: Conn, rows: readonly ReadingRow[]): Promise<Set<string>> {
  const groups = new Map<string, { deviceId: number; channel: string; ts: number[] }>();
  for (const r of rows) {
    const k = `${r.deviceId}|${r.channel}`;
    let g = groups.get(k);
    if (!g) groups.set(k, (g = { deviceId: r.deviceId, channel: r.channel, ts: [] }));
    g.ts.push(r.ts);
  }
  const existing = new Set<string>();
  const clauses: string[] = [];
  let size = 0;
  const run = async () => {
    if (clauses.length === 0) return;
    const [found] = await conn.query<mysql.RowDataPacket[]>(
      `SELECT device_id AS deviceId, channel, ts FROM readings WHERE ${clauses.join(" OR ")}`,
    );
    for (const f of found) existing.add(`${f.deviceId}|${f.channel}|${Number(f.ts)}`);
    clauses.length = 0;
    size = 0;
  };
  for (const g of groups.values()) {
    for (let i = 0; i < g.ts.length; i += STATEMENT_ROWS) {
      const part = g.ts.slice(i, i + STATEMENT_ROWS);
      clauses.push(`(device_id = ${g.deviceId} AND channel = '${g.channel}' AND ts IN (${part.join(",")}))`);
      size += part.length;
      if (size >= STATEMENT_ROWS) await run();
    }
  }
  await run();
  return existing;
}

/**
 * `journal`: also note the inserted rows in `reading_journal`, in the same transaction, for the
 * alert owner to read (ingest/alert-journal.ts): whichever worker stores a reading, the owner
 * sees it once, in commit order.
 */
export type WriteOptions = { journal?: boolean };

/** One journal row per transaction: "deviceId,channel,ts,value[,h]" lines (h: historical). */
export function encodeJournal(rows: readonly ReadingRow[]): string {
  const lines = new Array<string>(rows.length);
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i];
    lines[i] = `${r.deviceId},${r.channel},${r.ts},${r.value}${r.historical ? ",h" : ""}`;
  }
  return lines.join("\n");
}

async function insertJournal(conn: Conn, rows: readonly ReadingRow[]): Promise<void> {
  if (rows.length === 0) return;
  await conn.query("INSERT INTO reading_journal (created_ts, row_count, body) VALUES (?, ?, ?)", [Date.now(), rows.length, encodeJournal(rows)]);
}

function errno(err: unknown): number | undefined {
  return typeof err === "object" && err !== null && "errno" in err && typeof err.errno === "number" ? err.errno : undefined;
}

/**
 * Writes a batch of readings and their rollups in one transaction, idempotently. Returns the
 * rows this call actually inserted (for live snapshots and rule sinks) and how many were
 * already stored.
 */
export async function writeReadings(pool: mysql.Pool, input: readonly ReadingRow[], opts: WriteOptions = {}): Promise<WriteResult> {
  for (const r of input) assertSafeRow(r);
  if (input.length === 0) return { inserted: [], duplicates: 0, attempts: 0 };
  const conn = await pool.getConnection();
  try {
    for (let attempt = 1; ; attempt++) {
      try {
        // fast path: everything new (first attempt only; after a collision with another
        // writer, go straight to the look-up so the batches stop overlapping)
        if (attempt === 1) {
          await conn.beginTransaction();
          const affected = await insertRaw(conn, input, true);
          if (affected === input.length) {
            await addRollups(conn, input);
            if (opts.journal) await insertJournal(conn, input);
            await conn.commit();
            return { inserted: input.slice(), duplicates: 0, attempts: attempt };
          }
          await conn.rollback();
        }
        // slow path: insert only what is missing, counted by the transaction that inserts it
        const rows = dedupeRows(input);
        const inBatchDuplicates = input.length - rows.length;
        const existing = await findExistingKeys(conn, rows);
        const fresh = rows.filter((r) => !existing.has(rowKey(r)));
        if (fresh.length > 0) {
          await conn.beginTransaction();
          await insertRaw(conn, fresh, false);
          await addRollups(conn, fresh);
          if (opts.journal) await insertJournal(conn, fresh);
          await conn.commit();
        }
        return { inserted: fresh, duplicates: inBatchDuplicates + rows.length - fresh.length, attempts: attempt };
      } catch (err) {
        await conn.rollback().catch(() => undefined);
        const code = errno(err);
        const retry = code === 1062 /* duplicate key: a concurrent writer got there first */ || isTransientDbError(err);
        if (!retry || attempt >= MAX_ATTEMPTS) throw err;
        // writers racing over the same keys: step back a growing random moment
        await new Promise((r) => setTimeout(r, 5 + Math.random() * 10 * 2 ** Math.min(attempt, 6)));
      }
    }
  } finally {
    conn.release();
  }
}

// ---- what the history backfill (simulators/backfill.ts) needs to know before it writes ----

/** Ids of the devices with these codes (code → id). */
export async function deviceIdsByCode(db: Db, codes: readonly string[]): Promise<Map<string, number>> {
  if (codes.length === 0) return new Map();
  const rows = await db.select({ id: devicesTable.id, code: devicesTable.code }).from(devicesTable).where(inArray(devicesTable.code, [...codes]));
  return new Map(rows.map((r) => [r.code, r.id]));
}

/** The newest 1-minute rollup bucket of these devices, or null when they have none. */
export async function newestRollupMinute(db: Db, deviceIds: readonly number[]): Promise<number | null> {
  if (deviceIds.length === 0) return null;
  const [last] = await db.select({ ts: max(rollup1m.bucketTs) }).from(rollup1m).where(inArray(rollup1m.deviceId, [...deviceIds]));
  return last?.ts ?? null;
}
