// Fast-forward history for the demo: plays the plant model over a past span and writes the
// readings straight to MariaDB in large batches through the same idempotent writer as the
// ingest worker (db/queries/readings-write.ts), so raw rows and rollups stay consistent and a
// second run over the same span changes nothing. It resumes where the stored history ends.
// Raw rows are kept only within the raw retention (RAW_RETENTION_DAYS); older history goes to
// the rollups only, as whole hours written with INSERT IGNORE (a bucket is complete or absent).
// As each chunk is written, the rules play over it in reading time through the worker's alert
// pipeline, and the alerts (already answered by the demo people, never e-mailed) are stored
// (simulators/backfill-alert-writer.ts); the first full run also records a few months of
// cleanings and charged-plate checks (db/seed-equipment-history.ts).
//
//   tsx simulators/backfill.ts --days 30     (npm run demo does this on its first run)
// Options (or env): --days (SIM_BACKFILL_DAYS, 7); --full-rate-hours (SIM_FULL_RATE_HOURS, 24):
// the most recent hours at the live rate (field meters 1 Hz, loggers every 10 s, gateways every
// 5 s); --thin (SIM_BACKFILL_THIN, 10): older raw history at every n-th sample, so a week is
// written in about a minute (--thin 1 for the full rate); --rollup-thin (30): history older
// than the retention, which only feeds the rollups; --seed (SIM_SEED, 7); --anchor <epoch ms>
// (SIM_ANCHOR_MS): the scenario anchor, by default the one stored at the first run in
// DATA_DIR/sim-anchor-<DB_NAME>.json (else now), shared with simulators/plant.ts; --no-alerts:
// readings only.
import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import type mysql from "mysql2/promise";
import { z } from "zod";
import { closeDb, getDb, getPool, type Db } from "../db/client";
import { getEnv } from "../db/env";
import {
  aggregateRollups,
  deviceIdsByCode,
  HOUR_MS,
  MINUTE_MS,
  newestRollupMinute,
  writeReadings,
  writeRollups,
  type ReadingRow,
} from "../db/queries/readings-write";
import { seedDemoEquipmentHistory } from "../db/seed-equipment-history";
import { CHANNELS } from "../lib/contract/readings-payload";
import { getSettings } from "../lib/settings";
import { PlantModel, SAMPLE_PERIOD_MS, type SimDevice } from "./plant-model";
import { createHistoryAlertWriter } from "./backfill-alert-writer";
import { DAY_MS as DAY } from "../lib/vocabulary/time";

const RAW_CHUNK_MS = 10 * MINUTE_MS;
/** History shorter than this is written without playing the rules over it (see writeHistory). */
const MIN_ALERT_SPAN_MS = 30 * MINUTE_MS;

export type BackfillOptions = {
  pool: mysql.Pool;
  model: PlantModel;
  /** device code → id in the database */
  deviceIds: ReadonlyMap<string, number>;
  fromMs: number;
  toMs: number;
  /** readings before this go to the rollups only (raw retention) */
  rawFromMs: number;
  /** before fullRateFromMs, only every n-th sample of each device is written (1 = the live rate) */
  thin?: number;
  /** from here on every sample is written (default: fromMs, i.e. all at the thinned rate) */
  fullRateFromMs?: number;
  /** every n-th sample for the history that only feeds the rollups (default: thin) */
  rollupOnlyThin?: number;
  /**
   * No device's thinned samples further apart than this (default: no bound). With alerts played,
   * half the shortest sensor-silence time, so thinning never looks like a silent sensor.
   */
  maxPeriodMs?: number;
  /** Every chunk's rows of all devices (chunks in time order, rows in no order), as they are written. */
  onRows?: (rows: ReadingRow[], chunkEndMs: number) => Promise<void>;
  onProgress?: (doneMs: number, rows: number) => void;
};

export type BackfillReport = { rawRows: number; rollupOnlyRows: number; duplicates: number; ms: number };

/** All samples of all devices in [fromMs, toMs), on each device's sample grid. */
export function generateRows(model: PlantModel, devices: readonly SimDevice[], ids: ReadonlyMap<string, number>, fromMs: number, toMs: number, thin = 1, maxPeriodMs = Infinity): ReadingRow[] {
  const rows: ReadingRow[] = [];
  for (const d of devices) {
    const id = ids.get(d.code);
    if (id === undefined) continue;
    const period = Math.max(SAMPLE_PERIOD_MS[d.kind], Math.min(SAMPLE_PERIOD_MS[d.kind] * thin, maxPeriodMs));
    for (let t = Math.ceil(fromMs / period) * period; t < toMs; t += period) {
      const values = model.valuesAt(d, t);
      if (!values) continue;
      for (const channel of CHANNELS) {
        const value = values[channel];
        if (value !== undefined) rows.push({ deviceId: id, channel, ts: t, value });
      }
    }
  }
  return rows;
}

export async function backfill(opts: BackfillOptions): Promise<BackfillReport> {
  const started = performance.now();
  const { model, deviceIds } = opts;
  const thin = Math.max(1, Math.floor(opts.thin ?? 1));
  const devices = model.devices.filter((d) => deviceIds.has(d.code));
  // two writers on disjoint device sets: no shared rollup rows, so no lock waits between them
  const groups = [devices.filter((_, i) => i % 2 === 0), devices.filter((_, i) => i % 2 === 1)];
  const report: BackfillReport = { rawRows: 0, rollupOnlyRows: 0, duplicates: 0, ms: 0 };

  // history older than the raw retention: rollups only, whole hours
  const rawFrom = Math.max(opts.fromMs, Math.ceil(opts.rawFromMs / HOUR_MS) * HOUR_MS);
  for (let h = Math.floor(opts.fromMs / HOUR_MS) * HOUR_MS; h < rawFrom && h < opts.toMs; h += HOUR_MS) {
    const end = Math.min(h + HOUR_MS, rawFrom);
    const parts = groups.map((g) => generateRows(model, g, deviceIds, Math.max(h, opts.fromMs), end, Math.max(1, Math.floor(opts.rollupOnlyThin ?? thin)), opts.maxPeriodMs));
    await Promise.all([
      ...parts.map(async (rows) => {
        await writeRollups(opts.pool, "rollup_1m", aggregateRollups(rows, MINUTE_MS), "complete");
        await writeRollups(opts.pool, "rollup_1h", aggregateRollups(rows, HOUR_MS), "complete");
        report.rollupOnlyRows += rows.length;
      }),
      opts.onRows?.(parts.flat(), end),
    ]);
    opts.onProgress?.(end, report.rawRows + report.rollupOnlyRows);
  }

  // within the retention: raw rows and rollups through the idempotent writer; the next chunk is
  // generated while the current one is written
  let pending: Promise<void> = Promise.resolve();
  for (let c = Math.max(rawFrom, opts.fromMs); c < opts.toMs; c += RAW_CHUNK_MS) {
    const end = Math.min(c + RAW_CHUNK_MS, opts.toMs);
    const chunkThin = opts.fullRateFromMs !== undefined && c >= opts.fullRateFromMs ? 1 : thin;
    const parts = groups.map((g) => generateRows(model, g, deviceIds, c, end, chunkThin, opts.maxPeriodMs));
    await pending;
    pending = Promise.all(
      parts.map(async (rows) => {
        const res = await writeReadings(opts.pool, rows);
        report.rawRows += res.inserted.length;
        report.duplicates += res.duplicates;
      }),
    ).then(() => opts.onProgress?.(end, report.rawRows + report.rollupOnlyRows));
    // the rules play this chunk (chunks come in time order, so the engine sees reading time pass)
    if (opts.onRows) await opts.onRows(parts.flat(), end);
  }
  await pending;
  report.ms = Math.round(performance.now() - started);
  return report;
}

// ---- history for a database: anchor, resume point, run ----


/** The scenario anchor: given, or stored at the first run so restarts replay the same story. */
export function resolveAnchor(given: number | undefined, dataDir: string, dbName: string): number {
  if (given) return given;
  const file = path.resolve(dataDir, `sim-anchor-${dbName}.json`);
  try {
    const parsed = z.object({ anchorMs: z.number().int() }).safeParse(JSON.parse(fs.readFileSync(file, "utf8")));
    if (parsed.success) return parsed.data.anchorMs;
  } catch {
    // first run: no anchor stored yet
  }
  const anchorMs = Math.floor(Date.now() / 1000) * 1000;
  fs.mkdirSync(path.dirname(file), { recursive: true });
  fs.writeFileSync(file, JSON.stringify({ anchorMs }));
  return anchorMs;
}

/** Closes the database pool the history writer used (the live simulator needs none). */
export async function closeHistoryWriter(): Promise<void> {
  await closeDb();
}

export type HistoryOptions = {
  days: number;
  thin: number;
  fullRateHours: number;
  rollupThin: number;
  codes?: string[];
  /** Play the rules over the history and store its alerts (default on; only when every watched sensor is written). */
  alerts?: boolean;
};

/**
 * Writes the missing part of the last `days` days of history for the demo devices: from where
 * the stored history ends (the last minute is rewritten; writes are idempotent) up to now.
 * Plays the rules over it and stores the alerts, when it writes every sensor the rules watch.
 * Returns the end of the history written (where live play should continue).
 */
export async function writeHistory(
  model: PlantModel,
  opts: HistoryOptions,
  log: (msg: string) => void,
  /** where and up to when (tests): by default this process's database, up to now */
  target: { db: Db; pool: mysql.Pool; toMs?: number } = { db: getDb(), pool: getPool() },
): Promise<number> {
  const env = getEnv();
  const { db } = target;
  const codes = opts.codes ?? model.devices.map((d) => d.code);
  const ids = await deviceIdsByCode(db, codes);
  const toMs = Math.floor((target.toMs ?? Date.now()) / 1000) * 1000;
  if (ids.size === 0) {
    log("no demo devices in the database (run the seed first); no history written");
    return toMs;
  }
  const fromMs = Math.max(toMs - opts.days * DAY, (await newestRollupMinute(db, [...ids.values()])) ?? 0);
  if (fromMs >= toMs - 1000) {
    log("history is up to date; nothing to write");
    return toMs;
  }
  log(`writing ${((toMs - fromMs) / 3_600_000).toFixed(1)} h of history (${new Date(fromMs).toISOString()} → now)`);
  // the rules play over the history as it is written (simulators/backfill-alert-writer.ts)
  // a short gap (the minutes between the first backfill and the live simulator) is left to the
  // live worker: a fresh engine there would raise a condition still going on once more and clear it again
  const alertWriter =
    opts.alerts === false
      ? { skipped: "switched off" }
      : toMs - fromMs < MIN_ALERT_SPAN_MS
        ? { skipped: "less than 30 min to fill; the live worker judges what is still going on" }
        : await createHistoryAlertWriter(db, { fromMs, toMs, codes: [...ids.keys()] });
  const alertsOn = "skipped" in alertWriter ? null : alertWriter;
  if ("skipped" in alertWriter) log(`alerts not played over the history: ${alertWriter.skipped}`);
  let lastReport = Date.now();
  const report = await backfill({
    pool: target.pool,
    model,
    deviceIds: ids,
    fromMs,
    toMs,
    // a minute inside the retention, so the worker's retention job never drops what was written
    rawFromMs: toMs - env.RAW_RETENTION_DAYS * DAY + 60_000,
    thin: opts.thin,
    fullRateFromMs: toMs - opts.fullRateHours * 3_600_000,
    rollupOnlyThin: opts.rollupThin,
    ...(alertsOn ? { maxPeriodMs: alertsOn.maxPeriodMs, onRows: alertsOn.onRows } : {}),
    onProgress: (doneMs, n) => {
      if (Date.now() - lastReport > 10_000) {
        lastReport = Date.now();
        log(`… ${new Date(doneMs).toISOString()} (${n} readings)`);
      }
    },
  });
  log(
    `history written: ${report.rawRows} raw readings, ${report.rollupOnlyRows} older ones into the rollups only, ` +
      `${report.duplicates} already there, ${(report.ms / 1000).toFixed(1)} s`,
  );
  if (alertsOn) {
    const a = await alertsOn.finish();
    log(
      `alerts played over the history: ${a.readings} readings through the rules in ${(a.engineMs / 1000).toFixed(1)} s ` +
        `(${Math.round(a.readings / Math.max(0.001, a.engineMs / 1000))} readings/s), ${a.alerts} alerts with ${a.events} events stored ` +
        `in ${(a.storeMs / 1000).toFixed(1)} s${a.alreadyStored ? `, ${a.alreadyStored} already there` : ""}`,
    );
    const eq = await seedDemoEquipmentHistory(db, toMs);
    if (eq.seeded) log(`maintenance history: ${eq.checks} charged-plate checks, ${eq.cleanings} cleanings`);
  }
  return toMs;
}

export const historyOptionsSchema = z.object({
  days: z.coerce.number().min(0).max(400).default(7),
  thin: z.coerce.number().int().min(1).max(3600).default(10),
  fullRateHours: z.coerce.number().min(0).default(24),
  rollupThin: z.coerce.number().int().min(1).max(3600).default(30),
  seed: z.coerce.number().int().default(7),
  anchor: z.coerce.number().int().positive().optional(),
});

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: {
      days: { type: "string" },
      thin: { type: "string" },
      "full-rate-hours": { type: "string" },
      "rollup-thin": { type: "string" },
      seed: { type: "string" },
      anchor: { type: "string" },
      "no-alerts": { type: "boolean" },
    },
    strict: true,
  });
  const e = getSettings();
  const parsed = historyOptionsSchema.safeParse({
    days: values.days ?? e.SIM_BACKFILL_DAYS,
    thin: values.thin ?? e.SIM_BACKFILL_THIN,
    fullRateHours: values["full-rate-hours"] ?? e.SIM_FULL_RATE_HOURS,
    rollupThin: values["rollup-thin"],
    seed: values.seed ?? e.SIM_SEED,
    anchor: values.anchor ?? e.SIM_ANCHOR_MS,
  });
  if (!parsed.success) throw new Error(`Bad options:\n${parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n")}`);
  const o = parsed.data;
  const env = getEnv();
  const log = (msg: string) => process.stdout.write(`${new Date().toISOString()} backfill: ${msg}\n`);
  const anchorMs = resolveAnchor(o.anchor, env.DATA_DIR, env.DB_NAME);
  log(`scenario anchor ${new Date(anchorMs).toISOString()}, seed ${o.seed}`);
  await writeHistory(new PlantModel({ anchorMs, seed: o.seed }), { ...o, alerts: values["no-alerts"] !== true }, log);
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  main()
    .then(() => closeDb())
    .then(() => process.exit(0))
    .catch((err: unknown) => {
      process.stderr.write(`backfill: ${err instanceof Error ? err.stack ?? err.message : String(err)}\n`);
      void closeDb().catch(() => undefined);
      process.exit(1);
    });
}
