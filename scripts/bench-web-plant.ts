// A generated plant for npm run bench:web: `points` field meters in halls of 5 lines × 10 points
// (plus a logger per hall and a speed gateway per line), 16 minutes of 1 Hz readings written
// through the ingest worker's writer (so the 1-minute rollups are filled as in production), in a
// scratch database of its own. Then the Floor's snapshot is read and serialised several times.
import { performance } from "node:perf_hooks";
import { createTestDatabase } from "../tests/helpers/test-db";
import { areas, devices, lines, points } from "../db/schema";
import { getFloorSnapshot } from "../db/queries/floor";
import { writeReadings, type ReadingRow } from "../db/queries/readings-write";

const POINTS_PER_LINE = 10;
const LINES_PER_HALL = 5;

export async function generatePlant(pointCount: number, runs = 7) {
  const tdb = await createTestDatabase("bench_web_plant");
  const db = tdb.db;
  const now = Date.now();
  const halls = Math.ceil(pointCount / (POINTS_PER_LINE * LINES_PER_HALL));
  const sensorIds: Array<{ id: number; channels: ReadingRow["channel"][] }> = [];
  let made = 0;
  for (let a = 0; a < halls; a++) {
    const [area] = await db.insert(areas).values({ slug: `hall-${a}`, name: `Hall ${a + 1}`, displayOrder: a });
    const [logger] = await db.insert(devices).values({ code: `th-${a}`, kind: "th_logger", label: `Logger ${a + 1}`, secretHash: "-", areaId: area.insertId, createdAt: now });
    sensorIds.push({ id: logger.insertId, channels: ["temp_c", "rh_pct"] });
    for (let l = 0; l < LINES_PER_HALL && made < pointCount; l++) {
      const [line] = await db.insert(lines).values({ areaId: area.insertId, slug: `line-${a}-${l}`, name: `Line ${a + 1}.${l + 1}`, kind: "slitter_rewinder", nominalSpeedMpm: 300, displayOrder: l });
      const [gw] = await db.insert(devices).values({ code: `sp-${a}-${l}`, kind: "speed_gateway", label: "Speed", secretHash: "-", lineId: line.insertId, areaId: area.insertId, createdAt: now });
      sensorIds.push({ id: gw.insertId, channels: ["speed_mpm"] });
      const pointRows = Array.from({ length: Math.min(POINTS_PER_LINE, pointCount - made) }, (_, p) => ({ lineId: line.insertId, name: `P${p + 1}`, position: p + 1 }));
      const [first] = await db.insert(points).values(pointRows);
      const meterRows = pointRows.map((_, p) => ({
        code: `fm-${a}-${l}-${p}`,
        kind: "field_meter" as const,
        label: "Field meter",
        secretHash: "-",
        pointId: first.insertId + p,
        lineId: line.insertId,
        areaId: area.insertId,
        createdAt: now,
      }));
      const [fm] = await db.insert(devices).values(meterRows);
      for (let p = 0; p < meterRows.length; p++) sensorIds.push({ id: fm.insertId + p, channels: ["charge_kv"] });
      made += pointRows.length;
    }
  }
  // 16 minutes at 1 Hz, a second at a time across all sensors (as the worker writes them)
  const from = Math.floor(now / 1000) * 1000 - 16 * 60_000;
  let batch: ReadingRow[] = [];
  for (let ts = from; ts <= now; ts += 1000) {
    for (const s of sensorIds) for (const channel of s.channels) batch.push({ deviceId: s.id, channel, ts, value: channel === "charge_kv" ? Math.sin(ts / 50_000 + s.id) * 5 : channel === "rh_pct" ? 45 : channel === "temp_c" ? 21 : 300 });
    if (batch.length >= 5000) {
      await writeReadings(tdb.pool, batch);
      batch = [];
    }
  }
  if (batch.length) await writeReadings(tdb.pool, batch);

  const times: number[] = [];
  let bytes = 0;
  let series = 0;
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    const snap = await getFloorSnapshot(db);
    bytes = JSON.stringify(snap).length;
    times.push(performance.now() - t0);
    series = snap.series.length;
  }
  times.sort((x, y) => x - y);
  return { medianSnapshotMs: times[Math.floor(times.length / 2)], runs, bytes, series, close: () => tdb.close() };
}
