// Integration tests get their own real MariaDB database (on the instance `npm test` started),
// migrated and seeded with the demo plant. Each suite names its database so suites can run in
// parallel without touching each other: createTestDatabase("ingest") → stillfield_t_ingest.
import path from "node:path";
import mysql from "mysql2/promise";
import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import * as schema from "../../db/schema";
import type { Db } from "../../db/client";
import { maintainPartitions } from "../../db/partitions";

export type TestDatabase = {
  /** plain device secrets of the seeded demo devices (code → secret), read with readDeviceSecrets(name) */
  name: string;
  pool: mysql.Pool;
  db: Db;
  env: Record<string, string>;
  close(): Promise<void>;
};

const conn = () => ({
  host: process.env.DB_HOST ?? "127.0.0.1",
  port: Number(process.env.DB_PORT ?? 3407),
  user: process.env.DB_USER ?? "stillfield",
  password: process.env.DB_PASSWORD ?? "stillfield-local",
});

/**
 * Drops and recreates `stillfield_t_<suffix>` (`stillfield_t<slot>_<suffix>` for a second stack,
 * STACK_SLOT=N, so two people running the same suite side by side never share a database),
 * applies the migrations, optionally seeds.
 */
export async function createTestDatabase(suffix: string, opts: { seed?: boolean } = {}): Promise<TestDatabase> {
  if (!/^[a-z0-9_]+$/.test(suffix)) throw new Error("test database suffix: a-z, 0-9, _");
  const slot = process.env.STACK_SLOT && /^[1-9][0-9]?$/.test(process.env.STACK_SLOT) ? process.env.STACK_SLOT : "";
  const name = `stillfield_t${slot}_${suffix}`;
  const admin = await mysql.createConnection(conn());
  await admin.query(`DROP DATABASE IF EXISTS \`${name}\``);
  await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();

  const pool = mysql.createPool({ ...conn(), database: name, connectionLimit: 8, timezone: "Z", decimalNumbers: true, supportBigNumbers: true });
  const db = drizzle(pool, { schema, mode: "default" }) as Db;
  await migrate(db, { migrationsFolder: path.resolve(import.meta.dirname, "../../db/migrations") });
  await maintainPartitions(pool, { retentionDays: 40, daysAhead: 3 });

  const dbEnv = {
    DB_HOST: conn().host,
    DB_PORT: String(conn().port),
    DB_USER: conn().user,
    DB_PASSWORD: conn().password,
    DB_NAME: name,
  };
  if (opts.seed) {
    const { seedDemoPlant, deviceSecretsFile } = await import("../../db/seed");
    await seedDemoPlant(db, { secretsFile: deviceSecretsFile(name) });
  }
  return {
    name,
    pool,
    db,
    env: dbEnv,
    close: () => pool.end(),
  };
}
