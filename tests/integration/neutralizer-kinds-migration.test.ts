// Migration 0004 on rows written before the kinds were told apart: the database is migrated up
// to the migration before it, old rows are inserted, then the rest is applied. Real MariaDB.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import mysql from "mysql2/promise";
import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as schema from "@/db/schema";
import type { Db } from "@/db/client";

const NAME = "stillfield_t_kinds_migration";
const conn = () => ({
  host: process.env.DB_HOST ?? "127.0.0.1",
  port: Number(process.env.DB_PORT ?? 3407),
  user: process.env.DB_USER ?? "stillfield",
  password: process.env.DB_PASSWORD ?? "stillfield-local",
});
const MIGRATIONS = path.resolve(import.meta.dirname, "../../db/migrations");
const TAG = "0004_neutralizer_kinds_plate";

let pool: mysql.Pool;
let db: Db;
let before: string;

/** A copy of the migrations folder whose journal stops just before `tag`. */
function migrationsBefore(tag: string): string {
  const dir = fs.mkdtempSync(path.join(process.env.TMPDIR ?? os.tmpdir(), "migrations-"));
  fs.cpSync(MIGRATIONS, dir, { recursive: true });
  const journalPath = path.join(dir, "meta", "_journal.json");
  const journal = JSON.parse(fs.readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
  const at = journal.entries.findIndex((e) => e.tag === tag);
  if (at < 0) throw new Error(`no migration ${tag}`);
  journal.entries = journal.entries.slice(0, at);
  fs.writeFileSync(journalPath, JSON.stringify(journal));
  return dir;
}

beforeAll(async () => {
  const admin = await mysql.createConnection(conn());
  await admin.query(`DROP DATABASE IF EXISTS \`${NAME}\``);
  await admin.query(`CREATE DATABASE \`${NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();
  pool = mysql.createPool({ ...conn(), database: NAME, connectionLimit: 4, timezone: "Z", decimalNumbers: true, supportBigNumbers: true });
  db = drizzle(pool, { schema, mode: "default" }) as Db;
  before = migrationsBefore(TAG);
  await migrate(db, { migrationsFolder: before });
  // rows as the old schema held them (raw SQL: the current schema no longer knows these kinds)
  await pool.query(
    "INSERT INTO neutralizers (tag, kind, air_assisted, mounting_distance_mm, cleaning_interval_days, check_interval_days, state) VALUES " +
      "('OLD-BAR', 'ionizing_bar', 0, 30, 14, 90, 'in_service'), ('OLD-AIR-BAR', 'ionizing_bar', 1, 150, 14, 90, 'in_service'), " +
      "('OLD-BLOWER', 'ionized_air_blower', 1, 300, 14, 90, 'in_service'), ('OLD-NOZZLE', 'ionizing_nozzle', 1, 50, 14, 90, 'in_service'), ('OLD-OTHER', 'other', 0, NULL, 14, 90, 'removed')",
  );
  await pool.query("INSERT INTO settings (`key`, value, updated_at) VALUES ('check_limits', ?, 1)", [
    JSON.stringify({ byKind: { ionizing_bar: { maxDecayS: 20, maxOffsetAbsV: 35 }, ionized_air_blower: { maxDecayS: 12, maxOffsetAbsV: 30 }, ionizing_nozzle: { maxDecayS: 6, maxOffsetAbsV: 35 }, other: { maxDecayS: 25, maxOffsetAbsV: 40 } }, updatedBy: 1 }),
  ]);
  await migrate(db, { migrationsFolder: MIGRATIONS });
});
afterAll(async () => {
  await pool?.end();
  if (before) fs.rmSync(before, { recursive: true, force: true });
});

describe("migration of old neutralizer kinds", () => {
  it("maps every old kind: bar → AC bar (air-assisted bar when it had air), blower, nozzle, other", async () => {
    const [rows] = await pool.query<mysql.RowDataPacket[]>("SELECT tag, kind FROM neutralizers ORDER BY tag");
    expect(Object.fromEntries(rows.map((r) => [r.tag, r.kind]))).toEqual({
      "OLD-AIR-BAR": "air_assisted_bar",
      "OLD-BAR": "ac_bar",
      "OLD-BLOWER": "blower",
      "OLD-NOZZLE": "nozzle",
      "OLD-OTHER": "other",
    });
  });

  it("says in each re-kinded bar's history what happened, so someone confirms the kind", async () => {
    const [rows] = await pool.query<mysql.RowDataPacket[]>(
      "SELECT n.tag, e.kind, e.text FROM equipment_events e JOIN neutralizers n ON n.id = e.subject_id WHERE e.subject_type = 'neutralizer' ORDER BY n.tag",
    );
    expect(rows.map((r) => r.tag)).toEqual(["OLD-AIR-BAR", "OLD-BAR"]);
    expect(rows[1].text).toMatch(/recorded as AC ionizing bar.*check the kind/);
    expect(rows[0].text).toMatch(/recorded as air-assisted bar/);
  });

  it("keeps the plant's limits of blowers, nozzles and other under the new names; bars start from their kind's default", async () => {
    const [rows] = await pool.query<mysql.RowDataPacket[]>("SELECT value FROM settings WHERE `key` = 'check_limits'");
    const value = typeof rows[0].value === "string" ? JSON.parse(rows[0].value) : rows[0].value;
    expect(value.byKind).toEqual({ blower: { maxDecayS: 12, maxOffsetAbsV: 30 }, nozzle: { maxDecayS: 6, maxOffsetAbsV: 35 }, other: { maxDecayS: 25, maxOffsetAbsV: 40 } });
    expect(value.updatedBy).toBe(1);
  });

  it("adds the plate columns to checks", async () => {
    const [cols] = await pool.query<mysql.RowDataPacket[]>(
      "SELECT column_name AS c FROM information_schema.columns WHERE table_schema = ? AND table_name = 'checks' AND column_name LIKE 'plate_%' ORDER BY column_name",
      [NAME],
    );
    expect(cols.map((r) => r.c)).toEqual(["plate_capacitance_pf", "plate_distance_mm", "plate_length_mm", "plate_width_mm"]);
  });
});
