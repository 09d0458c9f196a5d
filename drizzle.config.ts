// drizzle-kit reads the schema and writes SQL migrations into db/migrations (generate only;
// `push` is broken on MariaDB: it rewrites every column and still exits 0). Applying them is scripts/migrate.ts.
import { defineConfig } from "drizzle-kit";

export default defineConfig({
  dialect: "mysql",
  schema: "./db/schema/index.ts",
  out: "./db/migrations",
  dbCredentials: {
    host: process.env.DB_HOST ?? "127.0.0.1",
    port: Number(process.env.DB_PORT ?? 3407),
    user: process.env.DB_USER ?? "stillfield",
    password: process.env.DB_PASSWORD ?? "stillfield-local",
    database: process.env.DB_NAME ?? "stillfield",
  },
});
