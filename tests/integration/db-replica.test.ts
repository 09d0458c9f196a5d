// Read routing to a MariaDB replica and its fallback, against two real servers this test starts:
// a primary with its binary log (scripts/mariadb.sh, DB_BINLOG=1) and a GTID replica
// (scripts/mariadb-replica.sh), both in a data folder of their own on this slot's ports. Reads go
// to the replica while it replicates and is within the allowed lag; when its replication stops,
// it lags or it is shut down, reads go to the primary, and back once it is fit again.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type mysql from "mysql2/promise";
import { createPool, dbOf, type Db } from "@/db/client";
import { judgeReplica, ReadRouter } from "@/db/read-replica";
import { replicaPairEnv } from "../helpers/replica-pair";

const slot = Number(process.env.STACK_SLOT ?? 0);
const PRIMARY_PORT = 3440 + slot;
const REPLICA_PORT = 3450 + slot;
const DATA_DIR = path.resolve(`.data/replica-test${slot}`);
const DB_NAME = `stillfield_replica_t${slot}`;
const env = replicaPairEnv({ dataDir: DATA_DIR, primaryPort: PRIMARY_PORT, replicaPort: REPLICA_PORT, dbName: DB_NAME });
const sh = (...args: string[]) => execFileSync("bash", args, { env, encoding: "utf8", stdio: ["ignore", "pipe", "pipe"], timeout: 120_000 });
const replicaSql = (q: string) => sh("scripts/mariadb-replica.sh", "sql", "-N", "-e", q);

let primaryPool: mysql.Pool;
let replicaPool: mysql.Pool;
let router: ReadRouter<Db>;
const primaryDb = () => dbOf(primaryPool);

async function portOf(db: Db): Promise<number> {
  const res = (await db.execute("SELECT @@port AS p")) as unknown as [Array<{ p: number }>];
  return Number(res[0][0].p);
}

async function waitFor(what: string, check: () => Promise<boolean>, ms = 20_000) {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`timed out waiting for ${what}`);
}

/** A fresh check of the replica (the router otherwise trusts the last one for checkMs). */
async function readPort(): Promise<number> {
  await new Promise((r) => setTimeout(r, 250));
  return portOf(await router.readDb());
}

beforeAll(async () => {
  try {
    sh("scripts/mariadb-replica.sh", "stop");
    sh("scripts/mariadb.sh", "stop");
  } catch {
    // nothing left from an earlier run
  }
  fs.rmSync(DATA_DIR, { recursive: true, force: true });
  sh("scripts/mariadb.sh", "start");
  const conn = { host: "127.0.0.1", user: env.DB_USER ?? "stillfield_app", password: env.DB_PASSWORD ?? "", database: DB_NAME, connectionLimit: 4 };
  primaryPool = createPool({ ...conn, port: PRIMARY_PORT });
  // data written before the replica exists must reach it too (copied from a consistent dump)
  await primaryPool.query("CREATE TABLE marks (id INT PRIMARY KEY, note VARCHAR(40))");
  await primaryPool.query("INSERT INTO marks VALUES (1, 'before the replica')");
  sh("scripts/mariadb-replica.sh", "start");
  replicaPool = createPool({ ...conn, port: REPLICA_PORT, connectTimeout: 1_000 });
  router = new ReadRouter(primaryDb(), { pool: replicaPool, db: dbOf(replicaPool) }, { maxLagS: 2, checkMs: 200 });
}, 180_000);

afterAll(async () => {
  await replicaPool?.end().catch(() => undefined);
  await primaryPool?.end().catch(() => undefined);
  try {
    sh("scripts/mariadb-replica.sh", "stop");
  } finally {
    sh("scripts/mariadb.sh", "stop");
    fs.rmSync(DATA_DIR, { recursive: true, force: true });
  }
}, 60_000);

describe("replica read routing", () => {
  it("copies the primary's data, replicates new writes, and serves reads from the replica", async () => {
    const [before] = (await replicaPool.query("SELECT note FROM marks WHERE id = 1")) as unknown as [Array<{ note: string }>];
    expect(before[0]?.note).toBe("before the replica");
    await primaryPool.query("INSERT INTO marks VALUES (2, 'after')");
    await waitFor("the new row on the replica", async () => ((await replicaPool.query("SELECT id FROM marks WHERE id = 2")) as unknown as [unknown[]])[0].length === 1);
    expect(await readPort()).toBe(REPLICA_PORT);
    const state = await router.status();
    expect(state).toMatchObject({ configured: true, usable: true });
    expect(state.lagS).toBeLessThanOrEqual(2);
  });

  it("refuses writes on the replica for the app's account", async () => {
    await expect(replicaPool.query("INSERT INTO marks VALUES (3, 'nope')")).rejects.toThrow(/read.only|denied|command denied/i);
  });

  it("reads from the primary while replication is stopped, and from the replica again once it runs", async () => {
    replicaSql("STOP SLAVE SQL_THREAD");
    expect(await readPort()).toBe(PRIMARY_PORT);
    expect((await router.status()).reason).toMatch(/stopped/);
    replicaSql("START SLAVE SQL_THREAD");
    await waitFor("replication to resume", async () => (await readPort()) === REPLICA_PORT);
  });

  it("reads from the primary while the replica lags more than allowed", async () => {
    // delayed replication holds each event back 6 s, so the replica falls behind by that much
    replicaSql("STOP SLAVE; CHANGE MASTER TO MASTER_DELAY = 6; START SLAVE");
    await primaryPool.query("INSERT INTO marks VALUES (4, 'late')");
    await waitFor("the replica to report lag", async () => (await readPort()) === PRIMARY_PORT, 15_000);
    expect((await router.status()).reason).toMatch(/behind|unknown/);
    replicaSql("STOP SLAVE; CHANGE MASTER TO MASTER_DELAY = 0; START SLAVE");
    await waitFor("the replica to catch up", async () => (await readPort()) === REPLICA_PORT, 20_000);
  }, 40_000);

  it("reads from the primary when the replica is shut down", async () => {
    sh("scripts/mariadb-replica.sh", "stop");
    expect(await readPort()).toBe(PRIMARY_PORT);
    expect((await router.status()).reason).toMatch(/does not answer/);
  });
});

describe("judging the replica's state", () => {
  it("uses it only while both threads run and it is within the lag allowed", () => {
    const ok = { Slave_IO_Running: "Yes", Slave_SQL_Running: "Yes", Seconds_Behind_Master: 1 };
    expect(judgeReplica(ok, 10).usable).toBe(true);
    expect(judgeReplica({ ...ok, Seconds_Behind_Master: 11 }, 10)).toMatchObject({ usable: false, lagS: 11 });
    expect(judgeReplica({ ...ok, Seconds_Behind_Master: null }, 10).usable).toBe(false);
    expect(judgeReplica({ ...ok, Slave_IO_Running: "Connecting" }, 10).usable).toBe(false);
    expect(judgeReplica({ ...ok, Slave_SQL_Running: "No", Last_SQL_Error: "duplicate key" }, 10).reason).toMatch(/stopped: duplicate key/);
    expect(judgeReplica(null, 10).usable).toBe(false);
  });
});
