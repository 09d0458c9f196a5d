// One mysql2 pool per process (cached on globalThis so Next's hot reload does not leak pools).
// The app, the worker, scripts and tests all get their database through getDb(); chart, report
// and export reads ask getReadDb(), which answers the replica when one is fit (db/read-replica.ts).
import { drizzle, type MySql2Database } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import { getEnv } from "./env";
import * as schema from "./schema";
import { ReadRouter, type ReplicaState } from "./read-replica";

export type Db = MySql2Database<typeof schema>;

type Holder = { pool?: mysql.Pool; db?: Db; replicaPool?: mysql.Pool; router?: ReadRouter<Db> };
const holder = globalThis as unknown as { __stillfieldDb?: Holder };
holder.__stillfieldDb ??= {};

type PoolTarget = { host: string; port: number; user: string; password: string; database: string; connectionLimit: number; connectTimeout?: number };

/** A pool with Stillfield's connection options (tests and benchmarks make their own with it). */
export function createPool(t: PoolTarget): mysql.Pool {
  return mysql.createPool({
    ...t,
    waitForConnections: true,
    enableKeepAlive: true,
    supportBigNumbers: true,
    // BIGINT epoch-ms values fit in a double; return them as numbers
    bigNumberStrings: false,
    decimalNumbers: true,
    timezone: "Z",
    multipleStatements: false,
  });
}

/** Drizzle over a pool of our own schema. */
export function dbOf(pool: mysql.Pool): Db {
  return drizzle(pool, { schema, mode: "default" });
}

export function getPool(): mysql.Pool {
  const h = holder.__stillfieldDb!;
  if (!h.pool) {
    const env = getEnv();
    h.pool = mysql.createPool({
      host: env.DB_HOST,
      port: env.DB_PORT,
      user: env.DB_USER,
      password: env.DB_PASSWORD,
      database: env.DB_NAME,
      connectionLimit: env.DB_POOL_SIZE,
      waitForConnections: true,
      enableKeepAlive: true,
      supportBigNumbers: true,
      // BIGINT epoch-ms values fit in a double; return them as numbers
      bigNumberStrings: false,
      decimalNumbers: true,
      timezone: "Z",
      multipleStatements: false,
    });
  }
  return h.pool;
}

export function getDb(): Db {
  const h = holder.__stillfieldDb!;
  if (!h.db) h.db = drizzle(getPool(), { schema, mode: "default" });
  return h.db;
}

function getReadRouter(): ReadRouter<Db> {
  const h = holder.__stillfieldDb!;
  if (!h.router) {
    const env = getEnv();
    if (env.DB_REPLICA_PORT > 0) {
      h.replicaPool = createPool({
        host: env.DB_REPLICA_HOST,
        port: env.DB_REPLICA_PORT,
        user: env.DB_USER,
        password: env.DB_PASSWORD,
        database: env.DB_NAME,
        connectionLimit: env.DB_POOL_SIZE,
        connectTimeout: 1_000,
      });
    }
    const replica = h.replicaPool ? { pool: h.replicaPool, db: dbOf(h.replicaPool) } : null;
    h.router = new ReadRouter(getDb(), replica, { maxLagS: env.DB_REPLICA_MAX_LAG_S, checkMs: env.DB_REPLICA_CHECK_MS });
  }
  return h.router;
}

/** The database for chart, report and export reads: the replica when configured and fit, else the primary. */
export function getReadDb(): Promise<Db> {
  return getReadRouter().readDb();
}

/** The replica's state as the read routing last saw it (the Health page). */
export function getReplicaState(): Promise<ReplicaState> {
  return getReadRouter().status();
}

/** Ends the pools (scripts and tests call this so the process can exit). */
export async function closeDb(): Promise<void> {
  const h = holder.__stillfieldDb!;
  const pool = h.pool;
  const replicaPool = h.replicaPool;
  h.pool = undefined;
  h.db = undefined;
  h.replicaPool = undefined;
  h.router = undefined;
  if (pool) await pool.end();
  if (replicaPool) await replicaPool.end();
}
