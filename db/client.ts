// One mysql2 pool per process (cached on globalThis so Next's hot reload does not leak pools).
// The app, the worker, scripts and tests all get their database through getDb().
import { drizzle, type MySql2Database } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import { getEnv } from "./env";
import * as schema from "./schema";

export type Db = MySql2Database<typeof schema>;

type Holder = { pool?: mysql.Pool; db?: Db };
const holder = globalThis as unknown as { __stillfieldDb?: Holder };
holder.__stillfieldDb ??= {};

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

/** Ends the pool (scripts and tests call this so the process can exit). */
export async function closeDb(): Promise<void> {
  const h = holder.__stillfieldDb!;
  const pool = h.pool;
  h.pool = undefined;
  h.db = undefined;
  if (pool) await pool.end();
}
