// Applies the committed drizzle-kit migrations, then makes sure the readings table has its
// daily partitions. Works on an empty database and on an already-migrated one.
import path from "node:path";
import { migrate } from "drizzle-orm/mysql2/migrator";
import { closeDb, getDb, getPool } from "../db/client";
import { getEnv } from "../db/env";
import { maintainPartitions } from "../db/partitions";

async function main() {
  const env = getEnv();
  await migrate(getDb(), { migrationsFolder: path.resolve(import.meta.dirname, "../db/migrations") });
  const report = await maintainPartitions(getPool(), { retentionDays: env.RAW_RETENTION_DAYS, daysAhead: 3 });
  console.log(
    `Database ${env.DB_NAME} is up to date` +
      (report.created.length ? ` (${report.created.length} daily partitions added)` : ""),
  );
}

main()
  .then(() => closeDb())
  .catch(async (err) => {
    console.error("Migration failed:", err instanceof Error ? err.message : err);
    await closeDb().catch(() => undefined);
    process.exit(1);
  });
