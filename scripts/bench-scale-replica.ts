// bench:scale, part (e): stop the read replica and the charts still answer, from the primary.
// Starts a primary of its own with its binary log (scripts/mariadb.sh, DB_BINLOG=1) and a GTID
// replica (scripts/mariadb-replica.sh) in a data folder of their own, writes a week of 1-minute
// and hourly rollups for one sensor through the primary, and reads the 7-day chart through the
// read routing the app uses (db/read-replica.ts) while the replica runs and after it is stopped.
import { execFileSync, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { createPool, dbOf } from "../db/client";
import { ReadRouter } from "../db/read-replica";
import { getHistory } from "../db/queries/history";
import { aggregateRollups, writeRollups, type ReadingRow } from "../db/queries/readings-write";
import { replicaPairEnv } from "../tests/helpers/replica-pair";

const ROOT = path.resolve(import.meta.dirname, "..");
const MINUTE = 60_000;

export type ReplicaDrill = { replicaPort: number; primaryPort: number; beforePort: number; afterPort: number; beforeMs: number; afterMs: number; beforePoints: number; afterPoints: number; reason: string };

export async function replicaDrill(log: (s: string) => void): Promise<ReplicaDrill> {
  const primaryPort = 3480;
  const replicaPort = 3490;
  const dataDir = path.join(ROOT, ".data", "bench-replica");
  const dbName = "stillfield_bench_replica";
  const env = replicaPairEnv({ dataDir, primaryPort, replicaPort, dbName });
  const sh = (...args: string[]) => execFileSync("bash", args, { cwd: ROOT, env, encoding: "utf8", stdio: ["ignore", "pipe", "pipe"], timeout: 180_000 });
  const stopAll = () => {
    spawnSync("bash", ["scripts/mariadb-replica.sh", "stop"], { cwd: ROOT, env, stdio: "ignore" });
    spawnSync("bash", ["scripts/mariadb.sh", "stop"], { cwd: ROOT, env, stdio: "ignore" });
  };
  stopAll();
  fs.rmSync(dataDir, { recursive: true, force: true });
  const conn = { host: "127.0.0.1", user: env.DB_USER ?? "stillfield_app", password: env.DB_PASSWORD ?? "", database: dbName, connectionLimit: 4 };
  let primaryPool: ReturnType<typeof createPool> | null = null;
  let replicaPool: ReturnType<typeof createPool> | null = null;
  try {
    sh("scripts/mariadb.sh", "start");
    execFileSync(process.execPath, ["--import", "tsx", "scripts/migrate.ts"], { cwd: ROOT, env, stdio: ["ignore", "pipe", "pipe"], timeout: 120_000 });
    primaryPool = createPool({ ...conn, port: primaryPort });
    // a week of one sensor at 1 Hz, as the worker would have rolled it up
    const now = Math.floor(Date.now() / MINUTE) * MINUTE;
    const rows: ReadingRow[] = [];
    for (let ts = now - 7 * 1440 * MINUTE; ts < now; ts += 10_000) rows.push({ deviceId: 1, channel: "charge_kv", ts, value: Math.sin(ts / 3_600_000) * 8 });
    await writeRollups(primaryPool, "rollup_1m", aggregateRollups(rows, MINUTE));
    await writeRollups(primaryPool, "rollup_1h", aggregateRollups(rows, 60 * MINUTE));
    sh("scripts/mariadb-replica.sh", "start");
    replicaPool = createPool({ ...conn, port: replicaPort, connectTimeout: 1_000 });
    const router = new ReadRouter(dbOf(primaryPool), { pool: replicaPool, db: dbOf(replicaPool) }, { maxLagS: 10, checkMs: 200 });
    const chart = async () => {
      await new Promise((r) => setTimeout(r, 250)); // past checkMs: a fresh look at the replica
      const db = await router.readDb();
      const [[{ p }]] = (await db.execute("SELECT @@port AS p")) as unknown as [Array<{ p: number }>];
      const t0 = performance.now();
      const h = await getHistory(db, { deviceId: 1, channel: "charge_kv", fromTs: now - 7 * 1440 * MINUTE, toTs: now, maxPoints: 1000 });
      return { port: Number(p), ms: performance.now() - t0, points: h.points.length };
    };
    // the replica copies the primary and then catches up
    let before = await chart();
    for (let i = 0; i < 60 && (before.port !== replicaPort || before.points === 0); i++) before = await chart();
    log(`(e) 7-day chart with the replica running: from port ${before.port} (${before.port === replicaPort ? "the replica" : "the primary"}), ${before.points} points in ${before.ms.toFixed(0)} ms`);
    sh("scripts/mariadb-replica.sh", "stop");
    const after = await chart();
    const reason = (await router.status()).reason;
    log(`(e) replica stopped: the same chart from port ${after.port} (${after.port === primaryPort ? "the primary" : "the replica"}), ${after.points} points in ${after.ms.toFixed(0)} ms; why: ${reason}`);
    return { replicaPort, primaryPort, beforePort: before.port, afterPort: after.port, beforeMs: before.ms, afterMs: after.ms, beforePoints: before.points, afterPoints: after.points, reason };
  } finally {
    await replicaPool?.end().catch(() => undefined);
    await primaryPool?.end().catch(() => undefined);
    stopAll();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}
