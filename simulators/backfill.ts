// Fast-forward history for the demo: plays the plant model over a past span and writes the
// readings straight to MariaDB in large batches through the same idempotent writer as the
// ingest worker (db/queries/readings-write.ts), so raw rows and rollups stay consistent and a
// second run over the same span changes nothing.
// Raw rows are kept only within the raw retention; older history goes to the rollups only, as
// whole hours written with INSERT IGNORE (a bucket is either complete or absent).
import type mysql from "mysql2/promise";
import {
  aggregateRollups,
  HOUR_MS,
  MINUTE_MS,
  writeReadings,
  writeRollups,
  type ReadingRow,
} from "../db/queries/readings-write";
import type { Channel } from "../lib/contract/readings-payload";
import { SAMPLE_PERIOD_MS, type PlantModel, type SimDevice } from "./plant-model";

const RAW_CHUNK_MS = 10 * MINUTE_MS;

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
  onProgress?: (doneMs: number, rows: number) => void;
};

export type BackfillReport = { rawRows: number; rollupOnlyRows: number; duplicates: number; ms: number };

/** All samples of all devices in [fromMs, toMs), on each device's sample grid. */
export function generateRows(model: PlantModel, devices: readonly SimDevice[], ids: ReadonlyMap<string, number>, fromMs: number, toMs: number, thin = 1): ReadingRow[] {
  const rows: ReadingRow[] = [];
  for (const d of devices) {
    const id = ids.get(d.code);
    if (id === undefined) continue;
    const period = SAMPLE_PERIOD_MS[d.kind] * thin;
    for (let t = Math.ceil(fromMs / period) * period; t < toMs; t += period) {
      const values = model.valuesAt(d, t);
      if (!values) continue;
      for (const [channel, value] of Object.entries(values) as Array<[Channel, number]>) rows.push({ deviceId: id, channel, ts: t, value });
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
    await Promise.all(
      groups.map(async (g) => {
        const rows = generateRows(model, g, deviceIds, Math.max(h, opts.fromMs), end, thin);
        await writeRollups(opts.pool, "rollup_1m", aggregateRollups(rows, MINUTE_MS), "complete");
        await writeRollups(opts.pool, "rollup_1h", aggregateRollups(rows, HOUR_MS), "complete");
        report.rollupOnlyRows += rows.length;
      }),
    );
    opts.onProgress?.(end, report.rawRows + report.rollupOnlyRows);
  }

  // within the retention: raw rows and rollups through the idempotent writer; the next chunk is
  // generated while the current one is written
  let pending: Promise<void> = Promise.resolve();
  for (let c = Math.max(rawFrom, opts.fromMs); c < opts.toMs; c += RAW_CHUNK_MS) {
    const end = Math.min(c + RAW_CHUNK_MS, opts.toMs);
    const chunkThin = opts.fullRateFromMs !== undefined && c >= opts.fullRateFromMs ? 1 : thin;
    const parts = groups.map((g) => generateRows(model, g, deviceIds, c, end, chunkThin));
    await pending;
    pending = Promise.all(
      parts.map(async (rows) => {
        const res = await writeReadings(opts.pool, rows);
        report.rawRows += res.inserted.length;
        report.duplicates += res.duplicates;
      }),
    ).then(() => opts.onProgress?.(end, report.rawRows + report.rollupOnlyRows));
  }
  await pending;
  report.ms = Math.round(performance.now() - started);
  return report;
}
