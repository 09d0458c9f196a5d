// The ingest worker against the real broker and MariaDB: each kind of
// bad input is rejected with its reason counted and kept for diagnosis while good messages sent
// right after are stored; the same batch sent twice yields one row per (device, channel, ts)
// and the rollups equal an aggregate computed from the raw rows; live snapshots and device
// online/offline reach the internal topics; counters reach `ingest_status`.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { MqttClient } from "mqtt";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { hashDeviceSecret } from "../../lib/device-secrets";
import { getIngestStatus, listRecentRejections } from "../../db/queries/ingest-diagnostics";
import { deviceTopics, internalTopics } from "../../lib/contract/topics";
import { deviceStatusChangeSchema, parseLiveSnapshot, type LiveSnapshot } from "../../lib/live";
import {
  connectDevice,
  connectService,
  endClient,
  publishAsync,
  startIngestStack,
  waitFor,
  type IngestStack,
} from "./ingest-support/processes";

let tdb: TestDatabase;
let stack: IngestStack;
let secrets: Record<string, string>;
let svc: MqttClient;
const snapshots: Array<{ topic: string; snap: LiveSnapshot }> = [];
const deviceChanges: unknown[] = [];

const FM = "fm-laminator-1-primary-unwind";
const TH = "th-converting-hall";
const SG = "sg-laminator-1";
const DAY = 86_400_000;

async function deviceId(code: string): Promise<number> {
  const [rows] = await tdb.pool.query("SELECT id FROM devices WHERE code = ?", [code]);
  const list = rows as Array<{ id: number }>;
  return list[0].id;
}

async function countRows(sql: string, params: unknown[] = []): Promise<number> {
  const [rows] = await tdb.pool.query(sql, params);
  return Number((rows as Array<{ n: number | string }>)[0].n);
}

beforeAll(async () => {
  tdb = await createTestDatabase("ingest_worker", { seed: true });
  secrets = readDeviceSecrets(tdb.name);
  stack = await startIngestStack("worker", tdb.env, {
    // the broker's own cut-off of removed or disabled devices is slowed down here, so that the
    // worker's checks behind it can be seen (tests/integration/services-broker.test.ts tests the broker's)
    env: { INGEST_DEVICE_REFRESH_MS: "300", INGEST_LIVE_INTERVAL_MS: "300", RAW_RETENTION_DAYS: "14", BROKER_DEVICE_CHECK_MS: "600000", BROKER_DEVICE_REFRESH_MS: "600000" },
  });
  svc = await connectService(stack, "svc-worker-test", "app");
  svc.on("message", (topic, msg) => {
    if (topic === internalTopics.devices) deviceChanges.push(JSON.parse(msg.toString()));
    else {
      const snap = parseLiveSnapshot(msg);
      if (snap) snapshots.push({ topic, snap });
    }
  });
  await new Promise<void>((r) => svc.subscribe("stillfield/internal/#", { qos: 0 }, () => r()));
});

afterAll(async () => {
  if (svc) await endClient(svc);
  await stack?.stop();
  await tdb?.close();
});

describe("bad input", () => {
  it("rejects each kind with its reason counted, and stores the good message sent right after", async () => {
    const fm = await connectDevice(stack, FM, secrets[FM]);
    const fmId = await deviceId(FM);
    const now = Date.now();
    // a device that signed in and was then removed: no account may publish for another device
    const GHOST = "fm-removed-after-sign-in";
    await tdb.pool.query("INSERT INTO devices (code, kind, label, secret_hash, line_id, area_id, created_at) VALUES (?, 'field_meter', 'Ghost', ?, 1, 1, ?)", [GHOST, hashDeviceSecret("ghost-secret-0123"), Date.now()]);
    const ghost = await connectDevice(stack, GHOST, "ghost-secret-0123");
    await tdb.pool.query("DELETE FROM devices WHERE code = ?", [GHOST]);
    await new Promise((r) => setTimeout(r, 1000)); // the worker reloads devices every 300 ms here
    const bad: Array<{ reason: string; body: string; via?: "ghost"; code?: string }> = [
      { reason: "malformed_json", body: `{"ts":${now},"values":{"charge_kv":` },
      { reason: "invalid_shape", body: JSON.stringify({ ts: now, values: { charge_kv: "high" } }) },
      { reason: "non_finite", body: `{"ts":${now},"values":{"charge_kv":NaN}}` },
      { reason: "non_finite", body: `{"ts":${now},"values":{"charge_kv":1e999}}` },
      { reason: "out_of_range", body: JSON.stringify({ ts: now, values: { charge_kv: 250 } }) },
      { reason: "wrong_channel", body: JSON.stringify({ ts: now, values: { rh_pct: 40 } }) },
      { reason: "unknown_channel", body: JSON.stringify({ ts: now, values: { voltage_v: 40 } }) },
      { reason: "bad_timestamp", body: JSON.stringify({ ts: "last tuesday", values: { charge_kv: 1 } }) },
      { reason: "ts_future", body: JSON.stringify({ ts: now + 10 * 60_000, values: { charge_kv: 1 } }) },
      { reason: "ts_too_old", body: JSON.stringify({ ts: now - 20 * DAY, values: { charge_kv: 1 } }) },
      { reason: "batch_too_long", body: JSON.stringify({ batch: Array.from({ length: 1001 }, (_, i) => ({ ts: now - i, values: { charge_kv: 1 } })) }) },
      { reason: "unknown_device", body: JSON.stringify({ ts: now, values: { charge_kv: 1 } }), via: "ghost", code: GHOST },
    ];
    for (const [i, b] of bad.entries()) {
      const code = b.code ?? FM;
      if (b.via === "ghost") await publishAsync(ghost, deviceTopics.readings(code), b.body);
      else await publishAsync(fm, deviceTopics.readings(FM), b.body);
      // the good message right after
      const goodTs = now - 60_000 + i * 10;
      await publishAsync(fm, deviceTopics.readings(FM), JSON.stringify({ ts: goodTs, values: { charge_kv: -2.5 } }));
      await waitFor(`the good message after ${b.reason}`, async () => (await countRows("SELECT COUNT(*) n FROM readings WHERE device_id = ? AND ts = ?", [fmId, goodTs])) === 1, 10_000);
    }

    const expected: Record<string, number> = {};
    for (const b of bad) expected[b.reason] = (expected[b.reason] ?? 0) + 1;
    const stats = await stack.workerStats();
    expect(stats.rejected.byReason).toEqual(expected);
    expect(stats.accepted.readings).toBe(bad.length);

    // kept for the Devices page, with device code, reason and a truncated payload
    const rows = await waitFor("rejections in the table", async () => {
      const r = await listRecentRejections(tdb.db, { limit: 100 });
      return r.length >= bad.length ? r : null;
    });
    expect(new Set(rows.map((r) => r.reason))).toEqual(new Set(Object.keys(expected)));
    const long = rows.find((r) => r.reason === "batch_too_long")!;
    expect(long.deviceCode).toBe(FM);
    expect(long.payload!.length).toBeLessThanOrEqual(500);
    expect((await listRecentRejections(tdb.db, { deviceCode: GHOST }))[0].reason).toBe("unknown_device");
    await endClient(fm);
    await endClient(ghost);
  });

  it("rejects a disabled device's messages (should one get past the broker) and stores them again once enabled", async () => {
    const code = "fm-labeller-1-dispense";
    const id = await deviceId(code);
    const dev = await connectDevice(stack, code, secrets[code]);
    await tdb.pool.query("UPDATE devices SET enabled = 0 WHERE id = ?", [id]);
    const before = (await stack.workerStats()).rejected.byReason.device_disabled ?? 0;
    const ts = Date.now() - 5000;
    // the worker reloads devices every 300 ms in this test (20 s by default)
    await new Promise((r) => setTimeout(r, 1000));
    await publishAsync(dev, deviceTopics.readings(code), JSON.stringify({ ts, values: { charge_kv: 1 } }));
    await waitFor("the rejection", async () => ((await stack.workerStats()).rejected.byReason.device_disabled ?? 0) === before + 1);
    await new Promise((r) => setTimeout(r, 500));
    expect(await countRows("SELECT COUNT(*) n FROM readings WHERE device_id = ?", [id])).toBe(0);
    await tdb.pool.query("UPDATE devices SET enabled = 1 WHERE id = ?", [id]);
    await waitFor("the message to be stored once enabled", async () => {
      await publishAsync(dev, deviceTopics.readings(code), JSON.stringify({ ts, values: { charge_kv: 1 } }));
      await new Promise((r) => setTimeout(r, 200));
      return (await countRows("SELECT COUNT(*) n FROM readings WHERE device_id = ?", [id])) === 1;
    }, 10_000, 200);
    await endClient(dev);
  });
});

describe("idempotent storage and exact rollups", () => {
  it("stores a batch sent twice once, and keeps the rollups equal to the raw aggregate", async () => {
    const th = await connectDevice(stack, TH, secrets[TH]);
    const sg = await connectDevice(stack, SG, secrets[SG]);
    const thId = await deviceId(TH);
    const sgId = await deviceId(SG);
    const t0 = Math.floor((Date.now() - 3 * 3_600_000) / 60_000) * 60_000; // spans hours and minutes
    const batch = Array.from({ length: 400 }, (_, i) => ({
      ts: t0 + i * 20_000,
      values: { temp_c: 20 + Math.sin(i / 7), rh_pct: 35 + 10 * Math.cos(i / 11) },
    }));
    const gw = Array.from({ length: 300 }, (_, i) => ({ ts: t0 + i * 30_000, values: { speed_mpm: 180 + (i % 17), running: i % 50 === 0 ? 0 : 1 } }));
    const send = async () => {
      for (let i = 0; i < batch.length; i += 100) await publishAsync(th, deviceTopics.readings(TH), JSON.stringify({ batch: batch.slice(i, i + 100) }));
      await publishAsync(sg, deviceTopics.readings(SG), JSON.stringify({ batch: gw }));
    };
    await send();
    await send(); // the same batches again
    // and once more with half of it overlapping new readings, as ISO timestamps
    const overlap = batch.slice(200).map((s, i) => ({ ts: new Date(s.ts + (i % 2) * 1000).toISOString(), values: s.values }));
    await publishAsync(th, deviceTopics.readings(TH), JSON.stringify({ batch: overlap }));

    const expectedTh = (400 + 100) * 2; // 400 sets, +100 new ones from the odd overlap entries, 2 channels each
    await waitFor("all rows", async () => (await countRows("SELECT COUNT(*) n FROM readings WHERE device_id = ?", [thId])) === expectedTh, 20_000);
    await waitFor("all gateway rows", async () => (await countRows("SELECT COUNT(*) n FROM readings WHERE device_id = ?", [sgId])) === 600, 20_000);
    // let any in-flight duplicate batches finish, then compare
    await waitFor("the worker to be idle", async () => (await stack.workerStats()).buffered.readings === 0);
    await new Promise((r) => setTimeout(r, 500));

    for (const [table, bucket] of [["rollup_1m", 60_000], ["rollup_1h", 3_600_000]] as const) {
      const [raw] = await tdb.pool.query(
        `SELECT device_id AS d, channel AS c, (ts DIV ${bucket}) * ${bucket} AS b, MIN(value) AS mn, MAX(value) AS mx, COUNT(*) AS n, SUM(value) AS s, SUM(value * value) AS ss
           FROM readings WHERE device_id IN (?, ?) GROUP BY d, c, b ORDER BY d, c, b`,
        [thId, sgId],
      );
      const [roll] = await tdb.pool.query(
        `SELECT device_id AS d, channel AS c, bucket_ts AS b, min AS mn, max AS mx, count AS n, sum AS s, sum_sq AS ss
           FROM ${table} WHERE device_id IN (?, ?) ORDER BY d, c, b`,
        [thId, sgId],
      );
      const a = raw as Array<Record<string, number | string>>;
      const r = roll as Array<Record<string, number | string>>;
      expect(r.length).toBe(a.length);
      for (let i = 0; i < a.length; i++) {
        expect([r[i].d, r[i].c, Number(r[i].b), Number(r[i].n)]).toEqual([a[i].d, a[i].c, Number(a[i].b), Number(a[i].n)]);
        expect(Number(r[i].mn)).toBe(Number(a[i].mn));
        expect(Number(r[i].mx)).toBe(Number(a[i].mx));
        // sums: same numbers added in another order; equal to rounding
        expect(Number(r[i].s)).toBeCloseTo(Number(a[i].s), 8);
        expect(Number(r[i].ss)).toBeCloseTo(Number(a[i].ss), 6);
      }
    }
    const stats = await stack.workerStats();
    expect(stats.committed.duplicates).toBeGreaterThanOrEqual(400 * 2 + 300 * 2 + 100 * 2);
    await endClient(th);
    await endClient(sg);
  });
});

describe("live data and devices", () => {
  it("publishes live snapshots per line and per hall that the app's schema accepts", async () => {
    const fm = await connectDevice(stack, FM, secrets[FM]);
    const th = await connectDevice(stack, TH, secrets[TH]);
    const fmId = await deviceId(FM);
    const now = Date.now();
    await publishAsync(fm, deviceTopics.readings(FM), JSON.stringify({ batch: [0, 1, 2].map((i) => ({ ts: now - 3000 + i * 1000, values: { charge_kv: 4 + i } })) }));
    await publishAsync(th, deviceTopics.readings(TH), JSON.stringify({ ts: now, values: { temp_c: 21, rh_pct: 33.5 } }));
    const [lines] = await tdb.pool.query("SELECT line_id AS lineId, area_id AS areaId FROM devices WHERE code = ?", [FM]);
    const { lineId, areaId } = (lines as Array<{ lineId: number; areaId: number }>)[0];
    const lineSnap = await waitFor("a line snapshot", async () =>
      snapshots.find((s) => s.topic === internalTopics.liveLine(lineId) && s.snap.series.some((x) => x.deviceId === fmId && x.samples.some(([ts]) => ts === now - 1000))),
    );
    const series = lineSnap.snap.series.find((x) => x.deviceId === fmId && x.channel === "charge_kv")!;
    expect(series.samples.filter(([ts]) => ts >= now - 3000)).toEqual([[now - 3000, 4], [now - 2000, 5], [now - 1000, 6]]);
    const areaSnap = await waitFor("an area snapshot", async () => snapshots.find((s) => s.topic === internalTopics.liveArea(areaId) && s.snap.scope === "area"));
    expect(areaSnap.snap.series.map((x) => x.channel).sort()).toEqual(["rh_pct", "temp_c"]);
    await endClient(fm);
    await endClient(th);
  });

  it("marks a device online from its status and offline from its last will, and tells the app", async () => {
    const code = "fm-bagger-1-unwind";
    const id = await deviceId(code);
    const dev = await connectDevice(stack, code, secrets[code], {
      will: { topic: deviceTopics.status(code), payload: Buffer.from('{"online":false}'), qos: 1, retain: false },
    });
    await publishAsync(dev, deviceTopics.status(code), '{"online":true}');
    const online = async () => {
      const [r] = await tdb.pool.query("SELECT online FROM devices WHERE id = ?", [id]);
      return Number((r as Array<{ online: number }>)[0].online);
    };
    await waitFor("online = 1", async () => (await online()) === 1);
    dev.stream.destroy(); // the connection drops without DISCONNECT: the broker sends the will
    await waitFor("online = 0", async () => (await online()) === 0, 15_000);
    const changesFor = () => deviceChanges.map((c) => deviceStatusChangeSchema.parse(c)).filter((c) => c.deviceId === id);
    // the change message travels through the broker; it may land just after the database row
    await waitFor("both change messages", async () => changesFor().length >= 2);
    expect(changesFor().map((c) => c.online)).toEqual([true, false]);
    dev.end(true);
  });

  it("writes its counters to ingest_status and each device's last-seen time", async () => {
    const rows = await waitFor("a worker status row", async () => {
      const r = await getIngestStatus(tdb.db);
      const w = r.find((x) => x.workerId === stack.env.INGEST_CLIENT_ID);
      return w?.stats && w.stats.kind === "worker" && w.stats.accepted.readings > 0 ? w : null;
    });
    expect(rows.stats?.kind).toBe("worker");
    if (rows.stats?.kind === "worker") {
      expect(rows.stats.devices[FM].messages).toBeGreaterThan(0);
      expect(rows.stats.rejected.byReason.malformed_json).toBe(1);
    }
    const [seen] = await tdb.pool.query("SELECT last_seen_ts AS t FROM devices WHERE code = ?", [FM]);
    expect(Number((seen as Array<{ t: number }>)[0].t)).toBeGreaterThan(Date.now() - 120_000);
  });
});

describe("diagnostics", () => {
  it("keeps only the newest 500 rejections", async () => {
    const fm = await connectDevice(stack, FM, secrets[FM]);
    for (let i = 0; i < 700; i++) fm.publish(deviceTopics.readings(FM), `{"broken": ${i}`, { qos: 0 });
    await publishAsync(fm, deviceTopics.readings(FM), `{"broken": "last"`);
    await waitFor("the last rejection stored", async () => (await listRecentRejections(tdb.db, { limit: 1 }))[0]?.payload === `{"broken": "last"`, 20_000);
    await waitFor("the table trimmed", async () => (await countRows("SELECT COUNT(*) n FROM ingest_rejections")) <= 500, 20_000);
    const newest = await listRecentRejections(tdb.db, { limit: 500 });
    expect(newest).toHaveLength(500);
    expect(newest[0].payload).toBe(`{"broken": "last"`);
    await endClient(fm);
  });
});
