// The Sparkplug B host application against the real broker, worker and MariaDB, with real edge
// nodes built on sparkplug-payload (simulators/sparkplug-edge-node.ts): birth then data by
// alias with unit conversion; a seq gap and an unknown alias get a rebirth request; each kind of
// bad input is refused with its reason and counted while ingest goes on; a death turns the node
// and the devices it feeds offline; an old death (bdSeq) does not end a new session; a
// historical upload and late JSON batches land in already-rolled minutes and the rollups equal
// a recomputation from raw; re-sending changes nothing; clock skew is measured and flagged.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { createEdgeNode, saveMapping, setDeviceTimeSource } from "../../db/queries/gateways";
import { hashDeviceSecret } from "../../lib/device-secrets";
import { isClockOff } from "../../lib/clock-skew";
import { EdgeNode, type EdgeDeviceSpec } from "../../simulators/sparkplug-edge-node";
import { connectClient, connectDevice, endClient, publishAsync, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";
import { recomputedRollups, rollupDifferences, storedRollups } from "./sparkplug-support/rollups";
import type { Conversion } from "../../lib/sparkplug/metrics";
import type { Channel } from "../../lib/contract/readings-payload";

let tdb: TestDatabase;
let stack: IngestStack;
let secrets: Record<string, string>;
const GROUP = "harrow-fen";
const FM = "fm-laminator-1-primary-unwind";
const TH = "th-converting-hall";
const NODES = { a: { code: "spb-lam1", nodeId: "lam1-gw", secret: "edge-a-secret-0123456789" }, c: { code: "spb-rogue", nodeId: "rogue-gw", secret: "edge-c-secret-0123456789" } };
const DEVICES: EdgeDeviceSpec[] = [
  { name: "unwind-meter", metrics: [{ name: "Charge", datatype: "Float", unit: "V" }] },
  { name: "hall-logger", metrics: [{ name: "Temperature", datatype: "Float", unit: "°F" }, { name: "Humidity", datatype: "Double", unit: "fraction" }, { name: "Model", datatype: "String" }] },
];

async function q<T>(sql: string, params: unknown[] = []): Promise<T[]> {
  const [rows] = await tdb.pool.query(sql, params);
  return rows as T[];
}
const deviceId = async (code: string) => (await q<{ id: number }>("SELECT id FROM devices WHERE code = ?", [code]))[0].id;
const nodeRow = async (code: string) =>
  (await q<{ id: number; online: number; bd_seq: number | null; rebirth_requests: number; seq_gaps: number; rejected_count: number; clock_skew_ms: number | null }>("SELECT * FROM edge_nodes WHERE code = ?", [code]))[0];
const rejections = async (reason: string) => (await q<{ n: number }>("SELECT COUNT(*) AS n FROM gateway_rejections WHERE reason = ?", [reason]))[0].n;

async function mapMetric(device: string, name: string, target: string, channel: Channel, conversion: Conversion) {
  const [m] = await waitFor(`metric ${name} from the birth`, async () => {
    const rows = await q<{ id: number }>("SELECT id FROM gateway_metrics WHERE device_name = ? AND name = ?", [device, name]);
    return rows.length ? rows : null;
  });
  await saveMapping(tdb.db, { metricId: m.id, targetDeviceId: await deviceId(target), channel, conversion }, null);
}

function node(extra: Partial<ConstructorParameters<typeof EdgeNode>[0]> = {}) {
  return new EdgeNode({ port: stack.mqttPort, code: NODES.a.code, secret: NODES.a.secret, groupId: GROUP, nodeId: NODES.a.nodeId, devices: DEVICES, ...extra });
}

beforeAll(async () => {
  tdb = await createTestDatabase("sparkplug_host", { seed: true });
  secrets = readDeviceSecrets(tdb.name);
  for (const n of Object.values(NODES)) await createEdgeNode(tdb.db, { code: n.code, groupId: GROUP, nodeId: n.nodeId, label: n.code, secretHash: hashDeviceSecret(n.secret) }, null);
  stack = await startIngestStack("sparkplug", tdb.env, {
    env: { INGEST_DEVICE_REFRESH_MS: "300", INGEST_STATUS_INTERVAL_MS: "300", BROKER_DEVICE_CHECK_MS: "300", RAW_RETENTION_DAYS: "14", ALERTS_RUNNER: "off" },
  });
}, 120_000);

afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
});

describe("Sparkplug B host application", () => {
  let a: EdgeNode;

  it("publishes its retained STATE, learns births and stores data sent by alias, converted to the channel's unit", async () => {
    const watcher = await connectClient(stack.mqttPort, { clientId: NODES.c.code, username: NODES.c.code, password: NODES.c.secret, clean: true });
    const state = new Promise<string>((resolve) => watcher.on("message", (_t, m) => resolve(m.toString("utf8"))));
    await watcher.subscribeAsync("spBv1.0/STATE/stillfield", { qos: 1 });
    expect(JSON.parse(await state)).toMatchObject({ online: true, timestamp: expect.any(Number) });
    await endClient(watcher);

    a = node();
    await a.connect();
    const bornBy = Date.now();
    await waitFor("the node online", async () => (await nodeRow(NODES.a.code)).online === 1);
    await mapMetric("unwind-meter", "Charge", FM, "charge_kv", "v_to_kv");
    await mapMetric("hall-logger", "Temperature", TH, "temp_c", "f_to_c");
    await mapMetric("hall-logger", "Humidity", TH, "rh_pct", "fraction_to_pct");
    await new Promise((r) => setTimeout(r, 800)); // the host reloads mappings every 300 ms

    // after the births: their empty values carry the birth time, and a last value gives way only
    // to a newer one
    const ts = Math.max(Date.now() - 1000, bornBy + 1);
    await a.data("unwind-meter", { Charge: -3420 }, ts);
    await a.data("hall-logger", { Temperature: 70.7, Humidity: 0.383, Model: "HL-2" }, ts);
    const fm = await deviceId(FM);
    const th = await deviceId(TH);
    const rows = await waitFor("three readings", async () => {
      const r = await q<{ device_id: number; channel: string; value: number }>("SELECT device_id, channel, value FROM readings WHERE ts = ? ORDER BY channel", [ts]);
      return r.length === 3 ? r : null;
    });
    // V → kV: 1 kV = 1000 V (SI prefix kilo, BIPM SI Brochure 9th ed., table 7)
    expect(rows.find((r) => r.channel === "charge_kv")).toMatchObject({ device_id: fm });
    expect(rows.find((r) => r.channel === "charge_kv")!.value).toBeCloseTo(-3.42, 9);
    // °F → °C: t/°C = (t/°F − 32)/1.8 (NIST SP 811, 2008, B.8): 70.7 °F = 21.5 °C
    // (the metric is a 32-bit Float: 70.7 travels as 70.69999695, hence 5 decimals)
    expect(rows.find((r) => r.channel === "temp_c")!.value).toBeCloseTo(21.5, 5);
    expect(rows.find((r) => r.channel === "temp_c")!.device_id).toBe(th);
    // fraction → %: × 100 (definition of per cent)
    expect(rows.find((r) => r.channel === "rh_pct")!.value).toBeCloseTo(38.3, 9);
    // last values (the unmapped string one too) for the Gateways page
    await waitFor("last values", async () => {
      const m = await q<{ name: string; last_value: number | null; last_text: string | null }>("SELECT name, last_value, last_text FROM gateway_metrics WHERE device_name = 'hall-logger' ORDER BY name");
      return m.find((x) => x.name === "Model")?.last_text === "HL-2" && Math.abs((m.find((x) => x.name === "Temperature")?.last_value ?? 0) - 70.7) < 1e-4;
    });
  });

  it("asks for a rebirth on a seq gap and on an unknown alias; refuses bad input with reasons and goes on", async () => {
    const before = await nodeRow(NODES.a.code);
    a.seq = (a.seq + 5) % 256; // five messages lost
    await a.data("unwind-meter", { Charge: -3000 });
    await waitFor("a rebirth answered", async () => a.rebirths >= 1);
    const after = await waitFor("the gap counted", async () => {
      const r = await nodeRow(NODES.a.code);
      return r.seq_gaps > before.seq_gaps && r.rebirth_requests > before.rebirth_requests ? r : null;
    });
    expect(after.online).toBe(1);

    // unknown alias: refused and a rebirth asked
    const rebirthsBefore = a.rebirths;
    await new Promise((r) => setTimeout(r, 2100)); // rebirth requests are at most one per 2 s per node
    await a.publish(a.rawTopic("DDATA", "unwind-meter"), { timestamp: Date.now(), seq: a["nextSeq"](), metrics: [{ alias: 999, type: "Float", value: 1 }] });
    await waitFor("unknown alias refused", async () => (await rejections("unknown_alias")) >= 1);
    await waitFor("rebirth after the unknown alias", async () => a.rebirths > rebirthsBefore);
    // wrong datatype: a Float metric carrying a string
    await a.publish(a.rawTopic("DDATA", "unwind-meter"), { timestamp: Date.now(), seq: a["nextSeq"](), metrics: [{ alias: 1, type: "String", value: "high" }] });
    await waitFor("wrong datatype refused", async () => (await rejections("wrong_datatype")) >= 1);
    // malformed protobuf
    await a.publish(a.rawTopic("DDATA", "unwind-meter"), Buffer.from([0x0a, 0xff, 0xff, 0xff, 0x0f, 0x01]));
    await waitFor("malformed payload refused", async () => (await rejections("malformed_payload")) >= 1);

    // DDATA before any birth, and a node publishing under another node's id
    const rogue = await connectClient(stack.mqttPort, { clientId: NODES.c.code, username: NODES.c.code, password: NODES.c.secret, clean: true });
    rogue.on("error", () => undefined);
    await publishAsync(rogue, `spBv1.0/${GROUP}/DDATA/${NODES.c.nodeId}/x`, Buffer.from(a.encode({ timestamp: Date.now(), seq: 1, metrics: [{ alias: 1, type: "Float", value: 1 }] })));
    await waitFor("data before birth refused", async () => (await rejections("no_birth")) >= 1);
    rogue.publish(`spBv1.0/${GROUP}/DDATA/${NODES.a.nodeId}/unwind-meter`, Buffer.from(a.encode({ timestamp: Date.now(), seq: 9, metrics: [{ alias: 1, type: "Float", value: -99000 }] })), { qos: 1 });
    await waitFor("foreign node id refused", async () => (await rejections("foreign_node_id")) >= 1);
    rogue.end(true);
    const c = await nodeRow(NODES.c.code);
    expect(c.rejected_count).toBeGreaterThanOrEqual(2);
    expect((await q("SELECT 1 FROM readings WHERE value = -99")).length).toBe(0);

    // ingest went on: the next good message is stored
    const ts = Date.now() - 500;
    await a.data("unwind-meter", { Charge: -2500 }, ts);
    await waitFor("good data after the bad", async () => (await q("SELECT 1 FROM readings WHERE ts = ? AND channel = 'charge_kv'", [ts])).length === 1);
  });

  it("a death turns the node and the devices it feeds offline; an old death does not end a new session (bdSeq)", async () => {
    const fm = await deviceId(FM);
    await waitFor("the fed device online", async () => (await q<{ online: number }>("SELECT online FROM devices WHERE id = ?", [fm]))[0].online === 1);
    const oldBdSeq = a.bdSeq;
    a.drop(); // the broker sends the will: NDEATH with the session's bdSeq
    await waitFor("node offline", async () => (await nodeRow(NODES.a.code)).online === 0);
    await waitFor("fed device offline (its point silent)", async () => (await q<{ online: number }>("SELECT online FROM devices WHERE id = ?", [fm]))[0].online === 0);
    expect((await q<{ online: number }>("SELECT online FROM gateway_devices WHERE device_name = 'unwind-meter'"))[0].online).toBe(0);

    await a.connect(); // new session, bdSeq + 1
    await waitFor("node online again", async () => (await nodeRow(NODES.a.code)).bd_seq === oldBdSeq + 1 && (await nodeRow(NODES.a.code)).online === 1);
    await waitFor("fed device online again", async () => (await q<{ online: number }>("SELECT online FROM devices WHERE id = ?", [fm]))[0].online === 1);
    // a late death of the old session
    await a.publish(a.rawTopic("NDEATH"), { timestamp: Date.now(), metrics: [{ name: "bdSeq", type: "Int64", value: oldBdSeq }] }, 1);
    await new Promise((r) => setTimeout(r, 1500));
    expect((await nodeRow(NODES.a.code)).online).toBe(1);
    const ts = Date.now() - 200;
    await a.data("unwind-meter", { Charge: -2100 }, ts);
    await waitFor("data still flows in the new session", async () => (await q("SELECT 1 FROM readings WHERE ts = ?", [ts])).length === 1);
  });

  it("a 20-minute historical upload and late JSON batches fill already-rolled minutes exactly; re-sending changes nothing", async () => {
    const fm = await deviceId(FM);
    const MIN = 60_000;
    const start = Math.floor((Date.now() - 40 * MIN) / MIN) * MIN;
    const dev = await connectDevice(stack, FM, secrets[FM]);
    // live JSON readings first (:00, :20, :40 of each minute): their minutes are rolled up
    const first = Array.from({ length: 60 }, (_, i) => ({ ts: start + i * 20_000, values: { charge_kv: -2 - (i % 7) * 0.1 } }));
    await publishAsync(dev, `stillfield/d/${FM}/readings`, JSON.stringify({ batch: first }));
    await waitFor("first batch", async () => (await q("SELECT 1 FROM readings WHERE device_id = ? AND ts >= ? AND ts < ?", [fm, start, start + 20 * MIN])).length === 60);
    // a late JSON batch into the same minutes (:10, :30, :50), sent twice
    const late = Array.from({ length: 60 }, (_, i) => ({ ts: start + 10_000 + i * 20_000, values: { charge_kv: -5 + (i % 5) * 0.3 } }));
    await publishAsync(dev, `stillfield/d/${FM}/readings`, JSON.stringify({ batch: late }));
    await publishAsync(dev, `stillfield/d/${FM}/readings`, JSON.stringify({ batch: late }));
    await endClient(dev);
    // the gateway was cut off for 20 minutes: it buffered and now uploads as historical metrics
    a.offline = true;
    for (let i = 0; i < 120; i++) await a.data("unwind-meter", { Charge: -1000 - i * 37 }, start + 5_000 + i * 10_000);
    a.offline = false;
    const uploaded = await a.uploadBuffer(40);
    expect(uploaded).toBe(120);
    const end = start + 20 * MIN;
    await waitFor("all 240 readings", async () => (await q("SELECT 1 FROM readings WHERE device_id = ? AND channel = 'charge_kv' AND ts >= ? AND ts < ?", [fm, start, end])).length === 240, 20_000);
    await new Promise((r) => setTimeout(r, 800));
    const check = async () => {
      const hourStart = Math.floor(start / 3_600_000) * 3_600_000;
      const hourEnd = Math.ceil(end / 3_600_000) * 3_600_000;
      const d1 = rollupDifferences(await storedRollups(tdb.pool, "rollup_1m", fm, "charge_kv", start, end - 1), await recomputedRollups(tdb.pool, MIN, fm, "charge_kv", start, end));
      const d2 = rollupDifferences(await storedRollups(tdb.pool, "rollup_1h", fm, "charge_kv", hourStart, hourEnd - 1), await recomputedRollups(tdb.pool, 3_600_000, fm, "charge_kv", hourStart, hourEnd));
      return [...d1, ...d2];
    };
    expect(await check()).toEqual([]);
    const minute = await storedRollups(tdb.pool, "rollup_1m", fm, "charge_kv", start, start);
    expect(minute[0].count).toBe(12); // 3 live + 3 late JSON + 6 historical in that minute
    // the same upload again: nothing changes
    a.offline = true;
    for (let i = 0; i < 120; i++) await a.data("unwind-meter", { Charge: -1000 - i * 37 }, start + 5_000 + i * 10_000);
    a.offline = false;
    await a.uploadBuffer(40);
    await new Promise((r) => setTimeout(r, 1500));
    expect((await storedRollups(tdb.pool, "rollup_1m", fm, "charge_kv", start, start))[0].count).toBe(12);
    expect(await check()).toEqual([]);
  });

  it("measures clock skew per device and per edge node, flags it past 30 s, and can keep arrival time instead", async () => {
    await a.stop();
    const skewed = node({ clockOffsetMs: 90_000, bdSeq: a.bdSeq });
    await skewed.connect();
    const fm = await deviceId(FM);
    for (let i = 0; i < 3; i++) {
      await skewed.data("unwind-meter", { Charge: -1500 - i });
      await new Promise((r) => setTimeout(r, 200));
    }
    const clock = await waitFor("device skew measured", async () => {
      const r = await q<{ skew_ms: number | null }>("SELECT skew_ms FROM device_clocks WHERE device_id = ?", [fm]);
      return r[0]?.skew_ms !== null && r[0]?.skew_ms !== undefined && r[0].skew_ms < -60_000 ? r[0] : null;
    });
    expect(clock.skew_ms!).toBeGreaterThan(-92_000);
    expect(isClockOff(clock.skew_ms, 30_000)).toBe(true);
    const n = await waitFor("node skew measured", async () => {
      const r = await nodeRow(NODES.a.code);
      return r.clock_skew_ms !== null && r.clock_skew_ms < -60_000 ? r : null;
    });
    expect(n.clock_skew_ms!).toBeLessThan(-85_000);

    // arrival time chosen for the device: the next reading lands near the server's clock
    await setDeviceTimeSource(tdb.db, fm, "arrival", null);
    await new Promise((r) => setTimeout(r, 800));
    const sentTs = skewed.now();
    await skewed.data("unwind-meter", { Charge: -1234.5 }, sentTs);
    const row = await waitFor("arrival-time reading", async () => (await q<{ ts: number }>("SELECT ts FROM readings WHERE device_id = ? AND value = -1.2345", [fm]))[0]);
    expect(Math.abs(Number(row.ts) - (sentTs - 90_000))).toBeLessThan(3000);
    await setDeviceTimeSource(tdb.db, fm, "device", null);

    // too far in the future: refused as for JSON devices
    await new Promise((r) => setTimeout(r, 800));
    await skewed.data("unwind-meter", { Charge: -1888 }, Date.now() + 20 * 60_000);
    await waitFor("future reading refused", async () => (await rejections("ts_future")) >= 1);
    await skewed.stop();
  });
});
