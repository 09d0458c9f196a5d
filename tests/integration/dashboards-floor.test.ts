// The Floor's snapshot and the limits it draws, against a seeded database of its own.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { alerts, rollup1m, ruleVersions, rules, settings } from "@/db/schema";
import { eq } from "drizzle-orm";
import { getFloorSnapshot, getPlantSettings, listLineAlerts } from "@/db/queries/floor";
import { DEMO_AREAS, DEMO_LINES } from "@/lib/demo-plant";
import { writeReadings } from "@/db/queries/readings-write";
import { getFloorTrends } from "@/db/queries/floor-trends";
import * as schema from "@/db/schema";
import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";

let tdb: TestDatabase;
const now = Math.floor(Date.now() / 1000) * 1000;

beforeAll(async () => {
  tdb = await createTestDatabase("dashboards_floor", { seed: true });
});
afterAll(async () => {
  await tdb?.close();
});

async function addRule(kind: "charge_high" | "rh_low", scope: { pointId?: number; lineId?: number; areaId?: number }, params: Record<string, number>, enabled = true) {
  const [r] = await tdb.db.insert(rules).values({ kind, name: `test ${kind}`, createdAt: now, currentVersion: 2, enabled, ...scope });
  // version 1 is stale; the current version (2) is the one in force
  await tdb.db.insert(ruleVersions).values([
    { ruleId: r.insertId, version: 1, severity: "medium", onDelayS: 10, offDelayS: 30, params: { ...params, limitKv: 99, limitPct: 1 }, createdAt: now },
    { ruleId: r.insertId, version: 2, severity: "medium", onDelayS: 10, offDelayS: 30, params, createdAt: now },
  ]);
  return r.insertId;
}

describe("floor snapshot", () => {
  it("has every demo hall, line and point in web-path order, with the plant defaults as limits", async () => {
    const snap = await getFloorSnapshot(tdb.db, { nowMs: now });
    expect(snap.areas.map((a) => a.name)).toEqual(DEMO_AREAS.map((a) => a.name));
    const all = snap.areas.flatMap((a) => a.lines);
    // the demo's survey-only line (walked with a handheld meter, lib/surveys/demo.ts) has spots
    // but no fixed meter; every other line is the simulated plant's
    expect(all.filter((l) => !l.points.some((p) => p.fieldMeter)).map((l) => l.name)).toEqual(["Slitter-Rewinder S2"]);
    const lines = all.filter((l) => l.points.some((p) => p.fieldMeter));
    expect(lines.map((l) => l.name)).toEqual(DEMO_LINES.map((l) => l.name));
    for (const [i, l] of lines.entries()) {
      expect(l.points.map((p) => p.name)).toEqual(DEMO_LINES[i].points.map((p) => p.name));
      expect(l.points.map((p) => p.position)).toEqual(l.points.map((_, j) => j + 1));
      expect(l.speedGateway).not.toBeNull();
      for (const p of l.points) {
        expect(p.fieldMeter).not.toBeNull();
        expect(p.limit).toMatchObject({ limitKv: 12, clearKv: 10, level: "plant" });
      }
    }
    for (const a of snap.areas) expect(a.rhLimit).toMatchObject({ limitPct: 30, level: "plant" });
    expect(snap.series).toEqual([]); // no readings yet
    expect(snap.settings.timeZone).toBe("Europe/London");
    expect(JSON.stringify(snap)).not.toMatch(/secret|\$2[aby]\$|sha256:/i);
  });

  it("uses a line's own limit over the plant default, a point's over the line's, the current version's params", async () => {
    const before = await getFloorSnapshot(tdb.db, { nowMs: now });
    const line = before.areas[0].lines[0];
    await addRule("charge_high", { lineId: line.id }, { limitKv: 8, clearKv: 6 });
    await addRule("charge_high", { pointId: line.points[1].id, lineId: line.id, areaId: line.areaId }, { limitKv: 25, clearKv: 20 });
    await addRule("charge_high", { pointId: line.points[2].id, lineId: line.id, areaId: line.areaId }, { limitKv: 2, clearKv: 1 }, false);
    await addRule("rh_low", { areaId: before.areas[1].id }, { limitPct: 35, clearPct: 38 });
    const after = await getFloorSnapshot(tdb.db, { nowMs: now });
    const l = after.areas[0].lines[0];
    expect(l.points[0].limit).toMatchObject({ limitKv: 8, level: "line" });
    // the limits in force are the engine's (lib/rules/limits-in-force.ts), per severity: the
    // point's medium 25 kV replaces the line's medium 8 kV, and the plant's high 20 kV still
    // applies there, so the line drawn is 20 kV — the first one a rising value crosses
    expect(l.points[1].limit).toMatchObject({ limitKv: 20, level: "plant" });
    // a disabled point rule is an exemption from the line's medium rule (as in the engine): only
    // the plant's high rule is left there
    expect(l.points[2].limit).toMatchObject({ limitKv: 20, level: "plant" });
    expect(after.areas[0].lines[1].points[0].limit).toMatchObject({ limitKv: 12, level: "plant" });
    expect(after.areas[1].rhLimit).toMatchObject({ limitPct: 35, level: "area" });
    expect(after.areas[0].rhLimit).toMatchObject({ limitPct: 30, level: "plant" });
  });

  it("counts open alerts per line and hall and marks shelved points", async () => {
    const snap = await getFloorSnapshot(tdb.db, { nowMs: now });
    const area = snap.areas[0];
    const line = area.lines[0];
    const base = { ruleId: 1, ruleVersion: 1, kind: "charge_high" as const, severity: "medium" as const, message: "test", startTs: now - 600_000 };
    await tdb.db.insert(alerts).values([
      { ...base, subjectKey: "a", areaId: area.id, lineId: line.id, pointId: line.points[0].id },
      { ...base, subjectKey: "b", areaId: area.id, lineId: line.id, pointId: line.points[1].id, shelvedUntilTs: now + 3_600_000, shelvedReason: "bar being cleaned" },
      { ...base, subjectKey: "c", areaId: area.id, lineId: line.id, pointId: line.points[2].id, state: "closed", endTs: now - 60_000, closedTs: now - 30_000 },
      { ...base, kind: "rh_low", subjectKey: "d", areaId: area.id },
    ]);
    const after = await getFloorSnapshot(tdb.db, { nowMs: now });
    const l = after.areas[0].lines[0];
    expect(l.openAlerts).toBe(2);
    expect(after.areas[0].openAlerts).toBe(1);
    expect(l.points.map((p) => p.shelved)).toEqual([false, true, false, false]);
    expect(after.areas[0].lines[1].openAlerts).toBe(0);

    const timeline = await listLineAlerts(tdb.db, { lineId: line.id, areaId: area.id, fromTs: now - 3_600_000, toTs: now });
    expect(timeline.map((a) => a.message)).toHaveLength(4); // the line's three and the hall's humidity alert
    const otherLine = await listLineAlerts(tdb.db, { lineId: area.lines[1].id, areaId: area.id, fromTs: now - 3_600_000, toTs: now });
    expect(otherLine).toHaveLength(1);
    expect(otherLine[0].kind).toBe("rh_low");
    const before = await listLineAlerts(tdb.db, { lineId: line.id, areaId: area.id, fromTs: now - 7_200_000, toTs: now - 3_600_000 });
    expect(before).toEqual([]);
  });

  it("reads the plant settings and falls back to defaults when the row is damaged", async () => {
    expect((await getPlantSettings(tdb.db)).shifts).toHaveLength(3);
    await tdb.db.update(settings).set({ value: { name: "Harrow Fen Packaging", timeZone: "America/Chicago", shifts: [{ name: "Days", start: "07:00" }] } }).where(eq(settings.key, "plant"));
    expect(await getPlantSettings(tdb.db)).toMatchObject({ timeZone: "America/Chicago", shifts: [{ name: "Days", start: "07:00" }], chargeUnit: "kV" });
    await tdb.db.update(settings).set({ value: { shifts: "three" } }).where(eq(settings.key, "plant"));
    expect((await getPlantSettings(tdb.db)).timeZone).toBe("Europe/London");
  });

  it("draws the last 15 minutes from the 1-minute rollups and ends each trend on the exact newest reading", async () => {
    const minute = 60_000;
    const at = Math.floor(now / minute) * minute + 42_000; // 42 s into the open minute
    const snap0 = await getFloorSnapshot(tdb.db, { nowMs: at });
    const meter = snap0.areas[0].lines[0].points[0].fieldMeter!;
    const value = (ts: number) => Number((Math.sin(ts / 61_000) * 4 - 2).toFixed(3));
    // 20 minutes at 1 Hz through the worker's writer, which adds each minute to rollup_1m
    const rows = [];
    for (let ts = at - 20 * minute; ts <= at; ts += 1000) rows.push({ deviceId: meter.deviceId, channel: "charge_kv" as const, ts, value: value(ts) });
    await writeReadings(tdb.pool, rows);
    const snap = await getFloorSnapshot(tdb.db, { nowMs: at });
    const s = snap.series.find((x) => x.deviceId === meter.deviceId && x.channel === "charge_kv")!;
    // minutes from the one holding (now − 15 min) to the open one: 16 minute means, then the newest reading
    const firstMinute = Math.floor((at - 15 * minute) / minute) * minute;
    expect(s.samples.slice(0, -1).map((x) => x[0])).toEqual(Array.from({ length: 16 }, (_, i) => firstMinute + i * minute));
    expect(s.samples[s.samples.length - 1]).toEqual([at, value(at)]);
    // each minute's point is the arithmetic mean of its readings (computed here from the rows written)
    for (const [ts, mean] of s.samples.slice(0, -1)) {
      const vals = rows.filter((r) => r.ts >= ts && r.ts < ts + minute).map((r) => r.value);
      expect(mean).toBeCloseTo(vals.reduce((a, b) => a + b, 0) / vals.length, 2); // means are kept to 0.001
    }
    // the answer stays small: a few hundred bytes per series, not one point per 10 s
    expect(JSON.stringify(s).length).toBeLessThan(600);
  });

  it("reads the trends' 15 minutes of rollups only, however much history a sensor has", async () => {
    const minute = 60_000;
    const at = Math.floor(now / minute) * minute;
    const snap0 = await getFloorSnapshot(tdb.db, { nowMs: at });
    const meter = snap0.areas[0].lines[1].points[0].fieldMeter!;
    // 30 days of 1-minute rollups before the window, as the demo keeps
    const old: (typeof rollup1m.$inferInsert)[] = [];
    for (let ts = at - 30 * 1440 * minute; ts < at - 60 * minute; ts += minute) old.push({ deviceId: meter.deviceId, channel: "charge_kv", bucketTs: ts, min: 1, max: 2, count: 60, sum: 90, sumSq: 140 });
    for (let i = 0; i < old.length; i += 2000) await tdb.db.insert(rollup1m).values(old.slice(i, i + 2000));
    // one connection of its own, so its session counters count this query's row reads only
    const conn = await mysql.createConnection({ host: tdb.env.DB_HOST, port: Number(tdb.env.DB_PORT), user: tdb.env.DB_USER, password: tdb.env.DB_PASSWORD, database: tdb.name });
    try {
      const db = drizzle(conn, { schema, mode: "default" });
      const reads = async () => {
        const [rows] = await conn.query("SHOW SESSION STATUS WHERE Variable_name IN ('Handler_read_next', 'Handler_read_key')");
        return (rows as Array<{ Value: string }>).reduce((n, r) => n + Number(r.Value), 0);
      };
      const before = await reads();
      const trends = await getFloorTrends(db, [meter.deviceId], at, 15 * minute);
      const read = (await reads()) - before;
      expect(trends.find((t) => t.channel === "charge_kv")?.samples.length ?? 0).toBeLessThanOrEqual(17);
      // index dives and the window's rows (the newest-reading query reads the recent raw readings too);
      // reading the device's history as well would be over 43,000
      expect(read).toBeLessThan(10_000);
    } finally {
      await conn.end();
    }
  });
});
