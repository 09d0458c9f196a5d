// npm run bench:charts — how fast the history read model answers a chart.
// In a throwaway database (stillfield_bench_charts) it writes 7 days of 1 Hz raw readings for
// one field meter (604,800 rows) and the matching 1-minute and 1-hour rollups for 30 days, then
// times, in one run, the same 7-day request (1000 points) answered from the rollups and from the
// raw readings, and a 30-day request. Medians of several runs after a warm-up.
// Targets: 7 d from rollups < 50 ms and ≥ 10× faster than from raw; 30 d < 100 ms.
// The last line reads: charts: 7d <ms> ms, raw <ms> ms, ratio <R>, 30d <ms> ms
import { spawnSync } from "node:child_process";
import path from "node:path";
import mysql from "mysql2/promise";
import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import * as schema from "../db/schema";
import type { Db } from "../db/client";
import { maintainPartitions } from "../db/partitions";
import { getHistory } from "../db/queries/history";
import type { HistorySource } from "../lib/views/history";
import { DAY_MS as DAY } from "../lib/vocabulary/time";

const DB_NAME = "stillfield_bench_charts";
const MINUTE = 60_000;
const HOUR = 3_600_000;
const DEVICE_ID = 1;
const CHANNEL = "charge_kv";
const RUNS = 9;

const root = path.resolve(import.meta.dirname, "..");
const conn = {
  host: process.env.DB_HOST ?? "127.0.0.1",
  port: Number(process.env.DB_PORT ?? 3407),
  user: process.env.DB_USER ?? "stillfield",
  password: process.env.DB_PASSWORD ?? "stillfield-local",
};

/** 1 Hz charge signal: a slow drift, web noise and a 3-second spike every 2 hours. */
function valueAt(ts: number): number {
  const s = ts / 1000;
  const spike = Math.floor(s) % 7200 < 3 ? 11 : 0;
  return Number((-(4 + 2.5 * Math.sin(s / 5400) + 0.7 * Math.sin(s / 6.1) + 0.25 * Math.sin(s * 1.7)) - spike).toFixed(3));
}

function log(msg: string) {
  process.stdout.write(`${msg}\n`);
}

async function timed<T>(fn: () => Promise<T>): Promise<[number, T]> {
  const t = process.hrtime.bigint();
  const r = await fn();
  return [Number(process.hrtime.bigint() - t) / 1e6, r];
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

async function main() {
  const started = spawnSync("bash", [path.join(root, "scripts/mariadb.sh"), "start"], { cwd: root, stdio: ["ignore", "ignore", "inherit"] });
  if (started.status !== 0) throw new Error("MariaDB could not be started (scripts/mariadb.sh start)");

  const admin = await mysql.createConnection(conn);
  await admin.query(`DROP DATABASE IF EXISTS \`${DB_NAME}\``);
  await admin.query(`CREATE DATABASE \`${DB_NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();
  const pool = mysql.createPool({ ...conn, database: DB_NAME, connectionLimit: 4, timezone: "Z", supportBigNumbers: true, bigNumberStrings: false, decimalNumbers: true });
  const db = drizzle(pool, { schema, mode: "default" }) as Db;
  try {
    await migrate(db, { migrationsFolder: path.join(root, "db/migrations") });
    const now = Math.floor(Date.now() / 1000) * 1000;
    const rawFrom = now - 7 * DAY;
    const rollFrom = Math.floor((now - 30 * DAY) / HOUR) * HOUR;
    await maintainPartitions(pool, { nowMs: now, retentionDays: 14, daysAhead: 1, fromMs: rawFrom });

    // raw: 604,800 rows in multi-row batches on two connections
    const [loadMs] = await timed(async () => {
      const BATCH = 5000;
      const batches: number[] = [];
      for (let t = rawFrom; t < now; t += BATCH * 1000) batches.push(t);
      let next = 0;
      const lane = async () => {
        while (next < batches.length) {
          const start = batches[next++];
          const rows: Array<[number, string, number, number]> = [];
          for (let t = start; t < Math.min(start + BATCH * 1000, now); t += 1000) rows.push([DEVICE_ID, CHANNEL, t, valueAt(t)]);
          await pool.query("INSERT INTO readings (device_id, channel, ts, value) VALUES ?", [rows]);
        }
      };
      await Promise.all([lane(), lane()]);
    });
    const [[{ n: rawCount }]] = (await pool.query("SELECT COUNT(*) AS n FROM readings WHERE device_id = ?", [DEVICE_ID])) as unknown as [[{ n: number }]];
    log(`raw readings: ${rawCount.toLocaleString("en-GB")} rows (7 days at 1 Hz) loaded in ${(loadMs / 1000).toFixed(1)} s`);

    // rollups for 30 days, computed from the same 1 Hz signal (min, max, count, sum, sum of squares)
    const m1: Array<[number, string, number, number, number, number, number, number]> = [];
    const h1 = new Map<number, { min: number; max: number; count: number; sum: number; sumSq: number }>();
    for (let m = rollFrom; m < now; m += MINUTE) {
      let min = Infinity;
      let max = -Infinity;
      let sum = 0;
      let sumSq = 0;
      let count = 0;
      for (let t = m; t < Math.min(m + MINUTE, now); t += 1000) {
        const v = valueAt(t);
        min = Math.min(min, v);
        max = Math.max(max, v);
        sum += v;
        sumSq += v * v;
        count++;
      }
      m1.push([DEVICE_ID, CHANNEL, m, min, max, count, sum, sumSq]);
      const hs = Math.floor(m / HOUR) * HOUR;
      const h = h1.get(hs);
      if (!h) h1.set(hs, { min, max, count, sum, sumSq });
      else {
        h.min = Math.min(h.min, min);
        h.max = Math.max(h.max, max);
        h.count += count;
        h.sum += sum;
        h.sumSq += sumSq;
      }
    }
    for (let i = 0; i < m1.length; i += 5000) {
      await pool.query("INSERT INTO rollup_1m (device_id, channel, bucket_ts, min, max, count, sum, sum_sq) VALUES ?", [m1.slice(i, i + 5000)]);
    }
    const hRows = [...h1].map(([ts, a]) => [DEVICE_ID, CHANNEL, ts, a.min, a.max, a.count, a.sum, a.sumSq]);
    await pool.query("INSERT INTO rollup_1h (device_id, channel, bucket_ts, min, max, count, sum, sum_sq) VALUES ?", [hRows]);
    await pool.query("ANALYZE TABLE readings, rollup_1m, rollup_1h");
    log(`rollups: ${m1.length.toLocaleString("en-GB")} one-minute and ${hRows.length} one-hour rows (30 days)`);

    const ask = (fromTs: number, source: HistorySource | "auto") =>
      getHistory(db, { deviceId: DEVICE_ID, channel: CHANNEL, fromTs, toTs: now, maxPoints: 1000, source, nowMs: now, rawRetentionMs: 14 * DAY });

    const measure = async (label: string, fromTs: number, source: HistorySource | "auto") => {
      for (let i = 0; i < 2; i++) await ask(fromTs, source); // warm-up
      const times: number[] = [];
      let last = await ask(fromTs, source);
      for (let i = 0; i < RUNS; i++) {
        const [ms, r] = await timed(() => ask(fromTs, source));
        times.push(ms);
        last = r;
      }
      const ms = median(times);
      log(`${label}: ${ms.toFixed(1)} ms median of ${RUNS} (min ${Math.min(...times).toFixed(1)}) · source ${last.source}, ${last.points.length} points of ${last.bucketMs / 60_000} min`);
      return { ms, result: last };
    };

    const week = await measure("7 days from rollups", now - 7 * DAY, "auto");
    const weekRaw = await measure("7 days from raw    ", now - 7 * DAY, "raw");
    const month = await measure("30 days            ", now - 30 * DAY, "auto");

    // the two 7-day answers describe the same data: the peaks (the spikes) must agree
    const peak = (pts: typeof week.result.points) => Math.min(...pts.map((p) => p[1]));
    const agree = Math.abs(peak(week.result.points) - peak(weekRaw.result.points)) < 1e-6;
    log(`same extremes from rollups and raw: ${agree ? "yes" : "NO"} (lowest ${peak(week.result.points).toFixed(2)} kV)`);
    const ratio = weekRaw.ms / week.ms;
    const ok = week.ms < 50 && ratio >= 10 && month.ms < 100 && agree;
    log(`targets: 7 d < 50 ms, ≥ 10× raw, 30 d < 100 ms — ${ok ? "met" : "NOT met"}`);
    log(`charts: 7d ${week.ms.toFixed(1)} ms, raw ${weekRaw.ms.toFixed(1)} ms, ratio ${ratio.toFixed(1)}, 30d ${month.ms.toFixed(1)} ms`);
    if (!ok) process.exitCode = 1;
  } finally {
    await pool.end();
    if (process.env.KEEP_BENCH_DB !== "1") {
      const a = await mysql.createConnection(conn);
      await a.query(`DROP DATABASE IF EXISTS \`${DB_NAME}\``);
      await a.end();
    }
  }
}

main().catch((err) => {
  console.error(`bench:charts failed: ${err instanceof Error ? err.message : err}`);
  process.exit(1);
});
