// CSV imports into the real database: a messy instrument check log (BOM, semicolons, decimal
// commas, a bad date, a short row, an unknown tag) and a logger's humidity history that goes
// into readings and rollups like live data. Re-imports add nothing twice.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, gte, inArray, like, lt, sql } from "drizzle-orm";
import { TZDate } from "@date-fns/tz";
import { closeDb, getDb } from "@/db/client";
import { areas, checks, devices, importedFiles, people, readings, rollup1h, rollup1m } from "@/db/schema";
import { previewImportAction, runImportAction } from "@/app/_server/actions/imports";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

const DAY = 86_400_000;
const TZ = "Europe/London";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((x) => x.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

const fixture = (name: string) => fs.readFileSync(path.resolve(import.meta.dirname, "../fixtures", name));
const csvFile = (content: string | Uint8Array, name: string) => new File([typeof content === "string" ? content : new Uint8Array(content)], name, { type: "text/csv" });

let engineer: SessionPerson;
beforeAll(async () => {
  engineer = await sessionOf("engineer");
});
afterAll(async () => {
  await closeDb();
});

describe("check log import", () => {
  it("previews the detected columns, units and first rows", async () => {
    const r = await previewImportAction.run(engineer, { kind: "check_log", file: csvFile(fixture("check-log-semicolon-bom.csv"), "cp-export.csv") });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const a = r.data!.analysis;
    expect(a).toMatchObject({ delimiter: ";", decimalComma: true, hadBom: true, headerLine: 5, dateOrder: "dmy", missingRequired: [] });
    expect(a.headers).toEqual(["Date", "Neutralizer", "Decay + (s)", "Decay - (s)", "Offset (V)", "Plate distance (mm)"]);
    expect(a.preview).toHaveLength(5);
    expect(r.data!.previousImports).toEqual([]);
  });

  it("imports good rows once, reports every bad row with its line, and a re-import adds nothing", async () => {
    const db = getDb();
    const bytes = fixture("check-log-semicolon-bom.csv");
    const first = await runImportAction.run(engineer, { kind: "check_log", file: csvFile(bytes, "cp-export.csv") });
    expect(first.ok).toBe(true);
    if (!first.ok) return;
    expect(first.data).toMatchObject({ imported: 3, duplicates: 0, passed: 1, failed: 2 });
    expect(first.data!.rejected).toEqual([
      { line: 8, reason: 'date "31/02/2026 10:00" is not a valid date' },
      { line: 9, reason: expect.stringMatching(/^missing decay time −.*\(the row has 3 of 6 columns\)$/) },
      { line: 11, reason: 'no neutralizer with tag "N-NO-SUCH-BAR"' },
    ]);
    const imported = await db.select().from(checks).where(like(checks.notes, "Imported from cp-export.csv%"));
    expect(imported).toHaveLength(3);
    // line 7: decay + 21.5 s over the 20 s default; line 10: offset −41.5 V outside ±35 V
    const byLine = (n: number) => imported.find((c) => c.notes?.endsWith(`line ${n}.`))!;
    expect(byLine(6)).toMatchObject({ passed: true, decayPosS: 4.2, decayNegS: 4.8, offsetV: 12, plateDistanceMm: 25, ts: Date.UTC(2026, 0, 14, 9, 12) });
    expect(byLine(7)).toMatchObject({ passed: false, decayPosS: 21.5 });
    expect(byLine(10)).toMatchObject({ passed: false, offsetV: -41.5 });

    // the same file again (renamed): nothing new, the earlier import is named
    const again = await runImportAction.run(engineer, { kind: "check_log", file: csvFile(bytes, "cp-export (1).csv") });
    expect(again.ok && again.data).toMatchObject({ imported: 0, duplicates: 3 });
    expect(again.ok && again.data!.previousImports).toHaveLength(1);
    expect(await db.select({ id: checks.id }).from(checks).where(like(checks.notes, "Imported from cp-export%"))).toHaveLength(3);
    expect(await db.select({ id: importedFiles.id }).from(importedFiles).where(eq(importedFiles.kind, "check_log"))).toHaveLength(2);
  });

  it("a file whose header lacks a required column is refused until mapped", async () => {
    const r = await runImportAction.run(engineer, { kind: "check_log", file: csvFile("Date,Neutralizer,Decay + (s),Decay - (s)\n2026-01-14 09:00,N-GRAVURE-1-UNWIND,4.1,4.4\n", "no-offset.csv") });
    expect(r).toMatchObject({ ok: false, status: 422 });
    if (!r.ok) expect(r.message).toMatch(/No column for "Offset/);
  });
});

describe("humidity history import", () => {
  const local = (ts: number) => {
    const d = new TZDate(ts, TZ);
    const p = (n: number) => String(n).padStart(2, "0");
    return { date: `${p(d.getDate())}.${p(d.getMonth() + 1)}.${d.getFullYear()}`, time: `${p(d.getHours())}:${p(d.getMinutes())}` };
  };
  const comma = (v: number) => v.toFixed(1).replace(".", ",");

  /** a BOM, semicolons, decimal commas, separate date and time columns, day.month.year */
  function loggerCsv(rows: Array<{ ts: number; tempC: number; rhPct: number }>, extra: string[] = []): string {
    const lines = ["\ufeffDatum;Zeit;Temperatur °C;rel. Feuchte %RH", ...rows.map((r) => `${local(r.ts).date};${local(r.ts).time};${comma(r.tempC)};${comma(r.rhPct)}`), ...extra];
    return lines.join("\r\n") + "\r\n";
  }

  let areaId: number;
  let loggerId: number;
  const now = Math.floor(Date.now() / 60_000) * 60_000;
  // 24 recent readings every 5 min, 2 days ago; 12 old ones every 5 min, 30 days ago (past the 14-day raw retention)
  const recentStart = Math.floor((now - 2 * DAY) / 3_600_000) * 3_600_000;
  const oldStart = Math.floor((now - 30 * DAY) / 3_600_000) * 3_600_000;
  const recent = Array.from({ length: 24 }, (_, i) => ({ ts: recentStart + i * 300_000, tempC: 20 + (i % 3) * 0.5, rhPct: 30 + i * 0.5 }));
  const old = Array.from({ length: 12 }, (_, i) => ({ ts: oldStart + i * 300_000, tempC: 18, rhPct: 22 + i }));

  beforeAll(async () => {
    const db = getDb();
    areaId = (await db.select({ id: areas.id }).from(areas).where(eq(areas.slug, "labelling-room")))[0].id;
    loggerId = (await db.select({ id: devices.id }).from(devices).where(and(eq(devices.kind, "th_logger"), eq(devices.areaId, areaId))))[0].id;
    await db.delete(readings).where(eq(readings.deviceId, loggerId));
    await db.delete(rollup1m).where(eq(rollup1m.deviceId, loggerId));
    await db.delete(rollup1h).where(eq(rollup1h.deviceId, loggerId));
  });

  async function rollupTotals(table: typeof rollup1m | typeof rollup1h, channel: string, fromTs: number, toTs: number) {
    const r = await getDb()
      .select({ count: sql<number>`coalesce(sum(${table.count}),0)`, sum: sql<number>`coalesce(sum(${table.sum}),0)`, sumSq: sql<number>`coalesce(sum(${table.sumSq}),0)`, min: sql<number>`min(${table.min})`, max: sql<number>`max(${table.max})` })
      .from(table)
      .where(and(eq(table.deviceId, loggerId), eq(table.channel, channel), gte(table.bucketTs, fromTs), lt(table.bucketTs, toTs)));
    return { count: Number(r[0].count), sum: Number(r[0].sum), sumSq: Number(r[0].sumSq), min: r[0].min === null ? null : Number(r[0].min), max: r[0].max === null ? null : Number(r[0].max) };
  }

  it("recent rows become readings and rollups; rows past the raw retention go to the rollups only; bad rows are listed", async () => {
    const text = loggerCsv([...old, ...recent], ["31.02.2026;10:00;20,0;40,0", "01.03.2026;10:05;20,0"]);
    const badDateLine = 2 + old.length + recent.length;
    const r = await runImportAction.run(engineer, { kind: "humidity_log", areaId: String(areaId), file: csvFile(text, "logger-th9.csv") });
    expect(r.ok).toBe(true);
    if (!r.ok || r.data!.kind !== "humidity_log") return;
    expect(r.data).toMatchObject({ deviceId: loggerId, rowsImported: 36, rawValuesAdded: 48, rollupOnlyValuesAdded: 24, duplicates: 0, rawRetentionDays: 14 });
    expect(r.data!.rejected).toEqual([
      { line: badDateLine, reason: 'date "31.02.2026 10:00" is not a valid date' },
      { line: badDateLine + 1, reason: expect.stringMatching(/^missing relative humidity/) },
    ]);

    const db = getDb();
    const raw = await db.select().from(readings).where(eq(readings.deviceId, loggerId));
    expect(raw).toHaveLength(48);
    expect(raw.every((x) => x.ts >= recentStart)).toBe(true);
    const rh = raw.filter((x) => x.channel === "rh_pct").sort((a, b) => a.ts - b.ts);
    expect(rh.map((x) => x.value)).toEqual(recent.map((x) => x.rhPct));

    // rollups: the same sums as the values themselves, minute and hour alike
    const sum = (xs: number[]) => xs.reduce((s, v) => s + v, 0);
    for (const [rows, from, to] of [
      [recent, recentStart, recentStart + 2 * 3_600_000],
      [old, oldStart, oldStart + 3_600_000],
    ] as const) {
      const expected = { count: rows.length, sum: sum(rows.map((x) => x.rhPct)), sumSq: sum(rows.map((x) => x.rhPct ** 2)), min: Math.min(...rows.map((x) => x.rhPct)), max: Math.max(...rows.map((x) => x.rhPct)) };
      for (const table of [rollup1m, rollup1h]) {
        const got = await rollupTotals(table, "rh_pct", from, to);
        expect(got.count).toBe(expected.count);
        expect(got.sum).toBeCloseTo(expected.sum, 9);
        expect(got.sumSq).toBeCloseTo(expected.sumSq, 6);
        expect(got.min).toBe(expected.min);
        expect(got.max).toBe(expected.max);
      }
    }
    // the 2 recent hours hold 12 five-minute readings each
    const hours = await db.select().from(rollup1h).where(and(eq(rollup1h.deviceId, loggerId), eq(rollup1h.channel, "temp_c"), gte(rollup1h.bucketTs, recentStart)));
    expect(hours.map((h) => h.count)).toEqual([12, 12]);
    // the old rows are not in the raw table
    expect(await db.select().from(readings).where(and(eq(readings.deviceId, loggerId), lt(readings.ts, now - 14 * DAY)))).toHaveLength(0);
  });

  it("a re-import of the same file adds nothing twice; an overlapping newer file adds only its new rows", async () => {
    const db = getDb();
    const totalsBefore = await rollupTotals(rollup1h, "rh_pct", 0, now + DAY);
    const text = loggerCsv([...old, ...recent], ["31.02.2026;10:00;20,0;40,0", "01.03.2026;10:05;20,0"]);
    const again = await runImportAction.run(engineer, { kind: "humidity_log", areaId: areaId, file: csvFile(text, "logger-th9.csv") });
    expect(again.ok && again.data).toMatchObject({ rowsImported: 0, rawValuesAdded: 0, rollupOnlyValuesAdded: 0, duplicates: 72 });
    expect(again.ok && again.data!.kind === "humidity_log" && again.data!.previousImports).toHaveLength(1);
    expect(await rollupTotals(rollup1h, "rh_pct", 0, now + DAY)).toEqual(totalsBefore);
    expect(await db.select().from(readings).where(eq(readings.deviceId, loggerId))).toHaveLength(48);

    // the logger exported again later: the same rows plus 6 more (and one row repeated inside the file)
    const more = Array.from({ length: 6 }, (_, i) => ({ ts: recentStart + (24 + i) * 300_000, tempC: 21, rhPct: 45 }));
    const overlap = loggerCsv([...recent, ...more, more[0]]);
    const r = await runImportAction.run(engineer, { kind: "humidity_log", areaId: areaId, file: csvFile(overlap, "logger-th9-later.csv") });
    expect(r.ok && r.data).toMatchObject({ rowsImported: 6, rawValuesAdded: 12, duplicates: 48 + 2 });
    const after = await rollupTotals(rollup1h, "rh_pct", 0, now + DAY);
    expect(after.count).toBe(totalsBefore.count + 6);
    expect(after.sum).toBeCloseTo(totalsBefore.sum + 6 * 45, 9);
  });

  it("a hall without a logger is refused with a field error", async () => {
    const db = getDb();
    const [res] = await db.insert(areas).values({ slug: `no-logger-${Date.now()}`, name: "Store room" });
    const r = await runImportAction.run(engineer, { kind: "humidity_log", areaId: res.insertId, file: csvFile(loggerCsv(recent), "x.csv") });
    expect(r).toMatchObject({ ok: false, status: 400, fieldErrors: { areaId: [expect.stringMatching(/no temperature\/humidity logger/)] } });
    await db.delete(areas).where(inArray(areas.id, [res.insertId]));
  });
});
