// Imports of CSV files parsed by lib/csv-import.ts:
// - check logs become checks (judged like hand-entered ones), keyed so a re-import adds nothing;
// - a standalone logger's humidity history becomes readings of the hall's logger device and is
//   added to the 1-minute and 1-hour rollups like live data. Only rows that were really new
//   touch the rollups: within each chunk the existing keys are selected (and locked) first, new
//   rows are inserted with INSERT IGNORE, and only those are summed into the rollups, all in one
//   transaction. Rows older than the raw retention go into the rollups only; for them a minute
//   that already holds data for that logger and channel counts as already imported.
import crypto from "node:crypto";
import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { devices, importedFiles, neutralizers, people, readings, rollup1h, rollup1m } from "../schema";
import type { CheckLogRow, HumidityLogRow, RejectedRow } from "../../lib/csv-import";
import { getCheckLimits, recordCheck } from "./checks";
import { AppError } from "../../lib/errors";
import { DAY_MS, HOUR_MS, MINUTE_MS } from "../../lib/vocabulary";

const CHUNK_ROWS = 1000;

export function sha256Hex(data: string | Uint8Array): string {
  return crypto.createHash("sha256").update(data).digest("hex");
}

export type ImportedFileRow = { id: number; kind: "check_log" | "humidity_log"; originalName: string; rowsImported: number; rowsRejected: number; personName: string | null; createdTs: number };

export async function findImportsOfFile(db: Db, kind: "check_log" | "humidity_log", sha256: string): Promise<ImportedFileRow[]> {
  return db
    .select({ id: importedFiles.id, kind: importedFiles.kind, originalName: importedFiles.originalName, rowsImported: importedFiles.rowsImported, rowsRejected: importedFiles.rowsRejected, personName: people.name, createdTs: importedFiles.createdTs })
    .from(importedFiles)
    .leftJoin(people, eq(people.id, importedFiles.personId))
    .where(and(eq(importedFiles.kind, kind), eq(importedFiles.sha256, sha256)))
    .orderBy(asc(importedFiles.createdTs));
}

export async function listRecentImports(db: Db, limit = 10): Promise<ImportedFileRow[]> {
  return db
    .select({ id: importedFiles.id, kind: importedFiles.kind, originalName: importedFiles.originalName, rowsImported: importedFiles.rowsImported, rowsRejected: importedFiles.rowsRejected, personName: people.name, createdTs: importedFiles.createdTs })
    .from(importedFiles)
    .leftJoin(people, eq(people.id, importedFiles.personId))
    .orderBy(desc(importedFiles.createdTs), desc(importedFiles.id))
    .limit(limit);
}

async function recordImportedFile(db: Db, f: { kind: "check_log" | "humidity_log"; sha256: string; originalName: string; rowsImported: number; rowsRejected: number; personId: number; nowMs: number }): Promise<number> {
  const [res] = await db.insert(importedFiles).values({ kind: f.kind, sha256: f.sha256, originalName: f.originalName.slice(0, 255), rowsImported: f.rowsImported, rowsRejected: f.rowsRejected, personId: f.personId, createdTs: f.nowMs });
  return res.insertId;
}

// ---------------------------------------------------------------------------------------------
// check logs

export type CheckImportResult = {
  imported: number;
  duplicates: number;
  passed: number;
  failed: number;
  rejected: RejectedRow[];
  previousImports: ImportedFileRow[];
};

/** The key of an imported check: the same reading of the same bar at the same time is one check. */
export function checkImportKey(r: Pick<CheckLogRow, "tag" | "ts" | "decayPosS" | "decayNegS" | "offsetV">): string {
  return `cl:${sha256Hex(`${r.tag.toUpperCase()}|${r.ts}|${r.decayPosS}|${r.decayNegS}|${r.offsetV}`)}`;
}

export async function importCheckLog(
  db: Db,
  parsed: { rows: CheckLogRow[]; rejected: RejectedRow[] },
  file: { name: string; sha256: string },
  personId: number,
  nowMs = Date.now(),
): Promise<CheckImportResult> {
  const previousImports = await findImportsOfFile(db, "check_log", file.sha256);
  const tags = await db.select({ id: neutralizers.id, tag: neutralizers.tag }).from(neutralizers);
  const byTag = new Map(tags.map((t) => [t.tag.toUpperCase(), t.id]));
  const limits = await getCheckLimits(db);
  const rejected: RejectedRow[] = [...parsed.rejected];
  let imported = 0;
  let duplicates = 0;
  let passed = 0;
  let failed = 0;
  for (const row of parsed.rows) {
    const neutralizerId = byTag.get(row.tag.toUpperCase());
    if (neutralizerId === undefined) {
      rejected.push({ line: row.line, reason: `no neutralizer with tag "${row.tag}"` });
      continue;
    }
    if (row.ts > nowMs + DAY_MS) {
      rejected.push({ line: row.line, reason: "the date is in the future" });
      continue;
    }
    const res = await recordCheck(
      db,
      {
        neutralizerId,
        ts: row.ts,
        method: "charged_plate",
        plateDistanceMm: row.plateDistanceMm,
        decayPosS: row.decayPosS,
        decayNegS: row.decayNegS,
        offsetV: row.offsetV,
        instrument: row.instrument,
        instrumentCalibratedOn: null,
        notes: `Imported from ${file.name.slice(0, 120)}, line ${row.line}.`,
        personId,
        importKey: checkImportKey(row),
      },
      limits,
    );
    if (res.id === null) duplicates++;
    else {
      imported++;
      if (res.judgement.pass) passed++;
      else failed++;
    }
  }
  rejected.sort((a, b) => a.line - b.line);
  await recordImportedFile(db, { kind: "check_log", sha256: file.sha256, originalName: file.name, rowsImported: imported, rowsRejected: rejected.length, personId, nowMs });
  return { imported, duplicates, passed, failed, rejected, previousImports };
}

// ---------------------------------------------------------------------------------------------
// humidity history

export type HumidityImportResult = {
  deviceId: number;
  deviceCode: string;
  /** rows with at least one new value */
  rowsImported: number;
  /** values (rh_pct and temp_c counted separately) newly stored as raw readings */
  rawValuesAdded: number;
  /** values older than the raw retention, added to the rollups only */
  rollupOnlyValuesAdded: number;
  /** values that were already there (a re-import, or the same time twice in the file) */
  duplicates: number;
  rejected: RejectedRow[];
  previousImports: ImportedFileRow[];
  rawRetentionDays: number;
};

export async function findHallLogger(db: Db, areaId: number): Promise<{ id: number; code: string } | null> {
  const rows = await db
    .select({ id: devices.id, code: devices.code })
    .from(devices)
    .where(and(eq(devices.kind, "th_logger"), eq(devices.areaId, areaId)))
    .orderBy(asc(devices.id))
    .limit(1);
  return rows[0] ?? null;
}

type Value = { channel: "rh_pct" | "temp_c"; ts: number; value: number; line: number };

type Agg = { deviceId: number; channel: string; bucketTs: number; min: number; max: number; count: number; sum: number; sumSq: number };

function aggregate(deviceId: number, values: Value[], bucketMs: number): Agg[] {
  const m = new Map<string, Agg>();
  for (const v of values) {
    const bucketTs = Math.floor(v.ts / bucketMs) * bucketMs;
    const key = `${v.channel}:${bucketTs}`;
    const a = m.get(key);
    if (!a) m.set(key, { deviceId, channel: v.channel, bucketTs, min: v.value, max: v.value, count: 1, sum: v.value, sumSq: v.value * v.value });
    else {
      a.min = Math.min(a.min, v.value);
      a.max = Math.max(a.max, v.value);
      a.count++;
      a.sum += v.value;
      a.sumSq += v.value * v.value;
    }
  }
  return [...m.values()];
}

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

async function upsertRollups(tx: Tx, table: typeof rollup1m | typeof rollup1h, rows: Agg[]): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) {
    await tx
      .insert(table)
      .values(rows.slice(i, i + 500))
      .onDuplicateKeyUpdate({
        set: {
          min: sql.raw("LEAST(`min`, VALUES(`min`))"),
          max: sql.raw("GREATEST(`max`, VALUES(`max`))"),
          count: sql.raw("`count` + VALUES(`count`)"),
          sum: sql.raw("`sum` + VALUES(`sum`)"),
          sumSq: sql.raw("`sum_sq` + VALUES(`sum_sq`)"),
        },
      });
  }
}

/** Splits values (sorted by time) into chunks that never cut a minute in two. */
function chunksByMinute(values: Value[]): Value[][] {
  const out: Value[][] = [];
  let cur: Value[] = [];
  for (const v of values) {
    if (cur.length >= CHUNK_ROWS && Math.floor(cur[cur.length - 1].ts / MINUTE_MS) !== Math.floor(v.ts / MINUTE_MS)) {
      out.push(cur);
      cur = [];
    }
    cur.push(v);
  }
  if (cur.length) out.push(cur);
  return out;
}

export async function importHumidityLog(
  db: Db,
  parsed: { rows: HumidityLogRow[]; rejected: RejectedRow[] },
  target: { areaId: number },
  file: { name: string; sha256: string },
  personId: number,
  opts: { nowMs?: number; rawRetentionDays: number },
): Promise<HumidityImportResult> {
  const nowMs = opts.nowMs ?? Date.now();
  const logger = await findHallLogger(db, target.areaId);
  if (!logger) throw new AppError("unprocessable", "This hall has no temperature/humidity logger device.");
  const previousImports = await findImportsOfFile(db, "humidity_log", file.sha256);
  const rejected: RejectedRow[] = [...parsed.rejected];
  const rawCutoff = nowMs - opts.rawRetentionDays * DAY_MS;

  // one value per channel and time; a time repeated inside the file counts as a duplicate
  const seen = new Set<string>();
  let duplicates = 0;
  const values: Value[] = [];
  for (const r of parsed.rows) {
    if (r.ts > nowMs + 5 * MINUTE_MS) {
      rejected.push({ line: r.line, reason: "the time is in the future" });
      continue;
    }
    const add = (channel: Value["channel"], value: number) => {
      const key = `${channel}:${r.ts}`;
      if (seen.has(key)) {
        duplicates++;
        return;
      }
      seen.add(key);
      values.push({ channel, ts: r.ts, value, line: r.line });
    };
    add("rh_pct", r.rhPct);
    if (r.tempC !== null) add("temp_c", r.tempC);
  }
  values.sort((a, b) => a.ts - b.ts);

  const linesWithNew = new Set<number>();
  let rawValuesAdded = 0;
  let rollupOnlyValuesAdded = 0;

  for (const chunk of chunksByMinute(values)) {
    const recent = chunk.filter((v) => v.ts >= rawCutoff);
    const old = chunk.filter((v) => v.ts < rawCutoff);
    const added = await db.transaction(async (tx) => {
      const fresh: Value[] = [];
      if (recent.length) {
        const existing = await tx
          .select({ channel: readings.channel, ts: readings.ts })
          .from(readings)
          .where(and(eq(readings.deviceId, logger.id), inArray(readings.channel, ["rh_pct", "temp_c"]), inArray(readings.ts, [...new Set(recent.map((v) => v.ts))])))
          .for("update");
        const have = new Set(existing.map((e) => `${e.channel}:${Number(e.ts)}`));
        const newRecent = recent.filter((v) => !have.has(`${v.channel}:${v.ts}`));
        if (newRecent.length) {
          const [res] = await tx
            .insert(readings)
            .ignore()
            .values(newRecent.map((v) => ({ deviceId: logger.id, channel: v.channel, ts: v.ts, value: v.value })));
          if (res.affectedRows !== newRecent.length) {
            // another writer slipped in between the select and the insert: start the chunk again
            throw new AppError("conflict", "Concurrent readings for this logger; import again.");
          }
        }
        fresh.push(...newRecent);
      }
      if (old.length) {
        const buckets = [...new Set(old.map((v) => Math.floor(v.ts / MINUTE_MS) * MINUTE_MS))];
        const existing = await tx
          .select({ channel: rollup1m.channel, bucketTs: rollup1m.bucketTs })
          .from(rollup1m)
          .where(and(eq(rollup1m.deviceId, logger.id), inArray(rollup1m.channel, ["rh_pct", "temp_c"]), inArray(rollup1m.bucketTs, buckets)))
          .for("update");
        const have = new Set(existing.map((e) => `${e.channel}:${Number(e.bucketTs)}`));
        fresh.push(...old.filter((v) => !have.has(`${v.channel}:${Math.floor(v.ts / MINUTE_MS) * MINUTE_MS}`)));
      }
      if (fresh.length) {
        await upsertRollups(tx, rollup1m, aggregate(logger.id, fresh, MINUTE_MS));
        await upsertRollups(tx, rollup1h, aggregate(logger.id, fresh, HOUR_MS));
      }
      return fresh;
    });
    for (const v of added) {
      linesWithNew.add(v.line);
      if (v.ts >= rawCutoff) rawValuesAdded++;
      else rollupOnlyValuesAdded++;
    }
    duplicates += chunk.length - added.length;
  }

  rejected.sort((a, b) => a.line - b.line);
  await recordImportedFile(db, { kind: "humidity_log", sha256: file.sha256, originalName: file.name, rowsImported: linesWithNew.size, rowsRejected: rejected.length, personId, nowMs });
  return {
    deviceId: logger.id,
    deviceCode: logger.code,
    rowsImported: linesWithNew.size,
    rawValuesAdded,
    rollupOnlyValuesAdded,
    duplicates,
    rejected,
    previousImports,
    rawRetentionDays: opts.rawRetentionDays,
  };
}
