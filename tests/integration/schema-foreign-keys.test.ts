// The foreign-key migration (db/migrations/0006_foreign_keys.sql) on a database that already
// holds rows breaking the keys: it repairs them as its header says and adds every key; afterwards
// the database refuses a row pointing at nothing and the deletion of a row still referred to
// (ON DELETE RESTRICT), and every key has its Drizzle relation (db/schema/relations.ts).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import mysql from "mysql2/promise";
import { createTableRelationsHelpers, extractTablesRelationalConfig, is, normalizeRelation, One } from "drizzle-orm";
import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as schema from "@/db/schema";

const MIGRATIONS = path.resolve(import.meta.dirname, "../../db/migrations");
const FK_TAG = "0006_foreign_keys";
const NAME = "stillfield_t_foreign_keys";
const conn = {
  host: process.env.DB_HOST ?? "127.0.0.1",
  port: Number(process.env.DB_PORT ?? 3407),
  user: process.env.DB_USER ?? "stillfield",
  password: process.env.DB_PASSWORD ?? "stillfield-local",
};

/** A copy of the migrations folder that stops just before the foreign keys. */
function migrationsBeforeForeignKeys(): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "stillfield-fk-"));
  fs.mkdirSync(path.join(dir, "meta"));
  const journal = JSON.parse(fs.readFileSync(path.join(MIGRATIONS, "meta/_journal.json"), "utf8")) as { entries: Array<{ idx: number; tag: string }> };
  const fkIdx = journal.entries.find((e) => e.tag === FK_TAG)?.idx;
  if (fkIdx === undefined) throw new Error(`${FK_TAG} is not in the journal`);
  const before = journal.entries.filter((e) => e.idx < fkIdx);
  for (const e of before) fs.copyFileSync(path.join(MIGRATIONS, `${e.tag}.sql`), path.join(dir, `${e.tag}.sql`));
  fs.writeFileSync(path.join(dir, "meta/_journal.json"), JSON.stringify({ ...journal, entries: before }));
  return dir;
}

let pool: mysql.Pool;
let oldFolder: string;
const T = 1_700_000_000_000;

async function one<T = Record<string, unknown>>(sql: string, params: unknown[] = []): Promise<T[]> {
  const [rows] = await pool.query(sql, params);
  return rows as T[];
}

beforeAll(async () => {
  const admin = await mysql.createConnection(conn);
  await admin.query(`DROP DATABASE IF EXISTS \`${NAME}\``);
  await admin.query(`CREATE DATABASE \`${NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();
  pool = mysql.createPool({ ...conn, database: NAME, connectionLimit: 2, timezone: "Z", multipleStatements: false });
  oldFolder = migrationsBeforeForeignKeys();
  await migrate(drizzle(pool, { schema, mode: "default" }), { migrationsFolder: oldFolder });

  // a database as it may stand before the keys: good rows and rows pointing at nothing
  await pool.query("INSERT INTO `areas` (`id`, `slug`, `name`) VALUES (1, 'press-hall', 'Press hall')");
  await pool.query(
    "INSERT INTO `lines` (`id`, `area_id`, `slug`, `name`, `kind`, `nominal_speed_mpm`) VALUES (1, 1, 'gravure', 'Gravure', 'gravure_press', 200), (2, 99, 'lost-hall', 'Line of a removed hall', 'other', 100)",
  );
  await pool.query("INSERT INTO `points` (`id`, `line_id`, `name`, `position`) VALUES (1, 1, 'Unwind', 1), (2, 98, 'Point of a removed line', 1)");
  await pool.query(
    "INSERT INTO `people` (`id`, `email`, `name`, `password_hash`, `created_at`, `updated_at`) VALUES (1, 'lead@example.com', 'Lead', 'x', ?, ?)",
    [T, T],
  );
  await pool.query(
    "INSERT INTO `devices` (`id`, `code`, `kind`, `label`, `secret_hash`, `point_id`, `created_at`) VALUES (1, 'fm-1', 'field_meter', 'FM 1', 'x', 1, ?), (2, 'fm-2', 'field_meter', 'FM 2', 'x', 97, ?)",
    [T, T],
  );
  await pool.query(
    "INSERT INTO `rules` (`id`, `kind`, `name`, `point_id`, `created_at`) VALUES (1, 'charge_high', 'Unwind', 1, ?), (2, 'charge_high', 'Removed point', 96, ?)",
    [T, T],
  );
  await pool.query(
    "INSERT INTO `rule_versions` (`rule_id`, `version`, `severity`, `on_delay_s`, `off_delay_s`, `params`, `created_by`, `created_at`) VALUES (1, 1, 'medium', 10, 30, '{}', 95, ?), (2, 1, 'medium', 10, 30, '{}', 1, ?)",
    [T, T],
  );
  await pool.query(
    "INSERT INTO `alerts` (`id`, `rule_id`, `rule_version`, `kind`, `severity`, `subject_key`, `message`, `start_ts`, `area_id`, `point_id`) VALUES (1, 1, 1, 'charge_high', 'medium', 'point:1', 'kept', ?, 94, 1), (2, 2, 1, 'charge_high', 'medium', 'point:96', 'of the removed rule', ?, NULL, NULL)",
    [T, T],
  );
  await pool.query("INSERT INTO `alert_events` (`alert_id`, `ts`, `kind`, `person_id`) VALUES (1, ?, 'raised', NULL), (2, ?, 'raised', NULL), (93, ?, 'raised', NULL)", [T, T, T]);
  await pool.query("INSERT INTO `line_notes` (`line_id`, `ts`, `text`, `person_id`, `created_ts`) VALUES (1, ?, 'note of a removed person', 92, ?), (91, ?, 'note of a removed line', 1, ?)", [T, T, T, T]);
  await pool.query("INSERT INTO `oncall_shifts` (`person_id`, `start_ts`, `end_ts`) VALUES (1, ?, ?), (90, ?, ?)", [T, T + 1, T, T + 1]);

  // now the real migrations folder: only the foreign-key migration is new
  await migrate(drizzle(pool, { schema, mode: "default" }), { migrationsFolder: MIGRATIONS });
}, 180_000);

afterAll(async () => {
  await pool?.query(`DROP DATABASE IF EXISTS \`${NAME}\``).catch(() => undefined);
  await pool?.end();
  if (oldFolder) fs.rmSync(oldFolder, { recursive: true, force: true });
});

describe("foreign keys", () => {
  it("adds every key declared in the schema", async () => {
    const keys = await one<{ n: number }>("SELECT COUNT(*) AS n FROM information_schema.REFERENTIAL_CONSTRAINTS WHERE CONSTRAINT_SCHEMA = ?", [NAME]);
    // the keys of this migration plus those later migrations add with their new tables
    const keysIn = (file: string) => {
      const sql = fs.readFileSync(path.join(MIGRATIONS, file), "utf8");
      return (sql.match(/ADD CONSTRAINT[^;]*FOREIGN KEY/g)?.length ?? 0) - (sql.match(/DROP FOREIGN KEY/g)?.length ?? 0);
    };
    expect(keysIn(`${FK_TAG}.sql`)).toBeGreaterThan(50);
    const declared = fs
      .readdirSync(MIGRATIONS)
      .filter((f) => f.endsWith(".sql") && f >= `${FK_TAG}.sql`)
      .reduce((n, f) => n + keysIn(f), 0);
    expect(Number(keys[0].n)).toBe(declared);
    const rules = await one<{ DELETE_RULE: string }>("SELECT DISTINCT DELETE_RULE FROM information_schema.REFERENTIAL_CONSTRAINTS WHERE CONSTRAINT_SCHEMA = ?", [NAME]);
    expect(rules.map((r) => r.DELETE_RULE)).toEqual([expect.stringMatching(/^(RESTRICT|NO ACTION)$/)]);
  });

  it("keeps rows whose hall, line or person is gone under placeholders", async () => {
    const [line] = await one<{ area: string }>("SELECT a.`slug` AS area FROM `lines` l JOIN `areas` a ON a.`id` = l.`area_id` WHERE l.`slug` = 'lost-hall'");
    expect(line.area).toBe("unassigned");
    const [point] = await one<{ line: string; position: number }>("SELECT l.`slug` AS line, p.`position` FROM `points` p JOIN `lines` l ON l.`id` = p.`line_id` WHERE p.`id` = 2");
    expect(point).toEqual({ line: "unassigned", position: 2 });
    const notes = await one<{ text: string; person: string; line: string }>(
      "SELECT n.`text`, p.`name` AS person, l.`slug` AS line FROM `line_notes` n JOIN `people` p ON p.`id` = n.`person_id` JOIN `lines` l ON l.`id` = n.`line_id` ORDER BY n.`id`",
    );
    expect(notes).toEqual([
      { text: "note of a removed person", person: "Former person", line: "gravure" },
      { text: "note of a removed line", person: "Lead", line: "unassigned" },
    ]);
    const [former] = await one<{ active: number; password_hash: string }>("SELECT `active`, `password_hash` FROM `people` WHERE `name` = 'Former person'");
    expect(former).toEqual({ active: 0, password_hash: "!" }); // "!" is no bcrypt hash: nobody can sign in as it
  });

  it("clears optional links to missing rows and removes rows that mean nothing alone", async () => {
    expect(await one("SELECT `id`, `point_id` FROM `devices` ORDER BY `id`")).toEqual([
      { id: 1, point_id: 1 },
      { id: 2, point_id: null },
    ]);
    expect(await one("SELECT `id`, `area_id`, `point_id` FROM `alerts` ORDER BY `id`")).toEqual([{ id: 1, area_id: null, point_id: 1 }]);
    expect(await one("SELECT `id` FROM `rules`")).toEqual([{ id: 1 }]); // the rule of a removed point applied to nothing
    expect(await one("SELECT `rule_id`, `created_by` FROM `rule_versions`")).toEqual([{ rule_id: 1, created_by: null }]);
    expect(await one("SELECT `alert_id` FROM `alert_events`")).toEqual([{ alert_id: 1 }]);
    expect(await one("SELECT `person_id` FROM `oncall_shifts`")).toEqual([{ person_id: 1 }]);
  });

  it("refuses a row pointing at nothing and the deletion of a row still referred to", async () => {
    await expect(pool.query("INSERT INTO `points` (`line_id`, `name`, `position`) VALUES (12345, 'x', 9)")).rejects.toMatchObject({ code: "ER_NO_REFERENCED_ROW_2" });
    await expect(pool.query("DELETE FROM `lines` WHERE `id` = 1")).rejects.toMatchObject({ code: "ER_ROW_IS_REFERENCED_2" });
    await expect(pool.query("DELETE FROM `people` WHERE `id` = 1")).rejects.toMatchObject({ code: "ER_ROW_IS_REFERENCED_2" });
  });

  it("has a Drizzle relation for every key, and no relation Drizzle cannot resolve", async () => {
    const { tables, tableNamesMap } = extractTablesRelationalConfig(schema, createTableRelationsHelpers);
    const oneSides = new Set<string>();
    for (const table of Object.values(tables)) {
      for (const relation of Object.values(table.relations)) {
        // throws when a relation's other end is ambiguous or missing
        const normalized = normalizeRelation(tables, tableNamesMap, relation);
        if (is(relation, One) && relation.config) {
          for (const [i, field] of normalized.fields.entries()) oneSides.add(`${table.dbName}.${field.name}->${relation.referencedTableName}.${normalized.references[i].name}`);
        }
      }
    }
    const keys = await one<{ t: string; c: string; rt: string; rc: string }>(
      "SELECT TABLE_NAME AS t, COLUMN_NAME AS c, REFERENCED_TABLE_NAME AS rt, REFERENCED_COLUMN_NAME AS rc FROM information_schema.KEY_COLUMN_USAGE WHERE TABLE_SCHEMA = ? AND REFERENCED_TABLE_NAME IS NOT NULL",
      [NAME],
    );
    const missing = keys.map((k) => `${k.t}.${k.c}->${k.rt}.${k.rc}`).filter((k) => !oneSides.has(k));
    expect(keys.length).toBeGreaterThan(50);
    expect(missing).toEqual([]);
  });
});
