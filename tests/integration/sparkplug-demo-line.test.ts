// The demo's Sparkplug line on the real broker, worker and MariaDB: the seed registers the demo
// gateway with its metrics mapped (db/seed-gateway.ts); the plant simulator with
// SIM_SPARKPLUG_LINE=on leaves Labeller LB1 to the simulated edge node (simulators/sparkplug-line.ts),
// which drops its connection for a short outage, buffers, comes back with a new session and
// uploads the buffer as historical metrics: the line's meter then has a reading every second
// across the outage, with no gap.
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { ROOT, spawnTs, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";
import { DEMO_GATEWAY } from "../../lib/demo-gateway";
import { fieldMeterCode } from "../../lib/demo-plant";

let tdb: TestDatabase;
let stack: IngestStack;

async function q<T>(sql: string, params: unknown[] = []): Promise<T[]> {
  const [rows] = await tdb.pool.query(sql, params);
  return rows as T[];
}

beforeAll(async () => {
  tdb = await createTestDatabase("spb_demo_line", { seed: true });
  stack = await startIngestStack("spb_demo_line", tdb.env, { env: { ALERTS_RUNNER: "off", INGEST_DEVICE_REFRESH_MS: "300", BROKER_DEVICE_CHECK_MS: "300" } });
}, 120_000);

afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
});

describe("the demo's Sparkplug line", () => {
  it("is seeded mapped, and fills its outage with a historical upload", async () => {
    const mapped = await q<{ name: string; device_name: string; target_device_id: number | null; conversion: string }>(
      "SELECT m.name, m.device_name, m.target_device_id, m.conversion FROM gateway_metrics m JOIN edge_nodes n ON n.id = m.edge_node_id WHERE n.code = ? ORDER BY m.id",
      [DEMO_GATEWAY.code],
    );
    expect(mapped.filter((m) => m.target_device_id !== null)).toHaveLength(4);
    expect(mapped.find((m) => m.name === "Web tension")?.target_device_id).toBeNull();
    expect(mapped.find((m) => m.device_name === "liner-unwind-meter")?.conversion).toBe("v_to_kv");

    const started = Date.now();
    const plant = spawnTs("plant", "simulators/plant.ts", ["--backfill-days", "0", "--duration-s", "28", "--malformed-every-s", "0", "--devices", [fieldMeterCode("labeller-1", "liner-unwind"), fieldMeterCode("labeller-1", "dispense"), "sg-labeller-1", "th-labelling-room"].join(",")], {
      ...tdb.env,
      MQTT_HOST: "127.0.0.1",
      MQTT_PORT: String(stack.mqttPort),
      DATA_DIR: path.join(ROOT, ".data"),
      SIM_SPARKPLUG_LINE: "on",
      SIM_SPARKPLUG_OUTAGE_AFTER_S: "6",
      SIM_SPARKPLUG_OUTAGE_S: "10",
      SIM_SPARKPLUG_OUTAGE_EVERY_S: "3600",
    });
    const code = await plant.exit(90_000);
    expect(code, plant.output()).toBe(0);
    expect(plant.output()).toMatch(/uploaded \d+ buffered reading sets as historical metrics/);

    // a second session after the outage (bdSeq counted up), and the node online
    const node = await waitFor("the node's second session", async () => {
      const [n] = await q<{ bd_seq: number | null; online: number; last_death_ts: number | null }>("SELECT bd_seq, online, last_death_ts FROM edge_nodes WHERE code = ?", [DEMO_GATEWAY.code]);
      return n && n.bd_seq === 1 && n.last_death_ts !== null ? n : null;
    }, 20_000);
    expect(Number(node.last_death_ts)).toBeGreaterThan(started);

    // the meter: a reading every second from the first to the last, outage included
    const fm = fieldMeterCode("labeller-1", "liner-unwind");
    const rows = await waitFor("the uploaded readings", async () => {
      const r = await q<{ ts: number }>("SELECT r.ts FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.code = ? AND r.channel = 'charge_kv' AND r.ts >= ? ORDER BY r.ts", [fm, started - 60_000]);
      return r.length >= 20 ? r : null;
    });
    const ts = rows.map((r) => Number(r.ts));
    let longest = 0;
    for (let i = 1; i < ts.length; i++) longest = Math.max(longest, ts[i] - ts[i - 1]);
    expect(longest).toBe(1000); // 1 Hz field meters (simulators/plant-model.ts SAMPLE_PERIOD_MS)
    // the span covers the outage (6 s to 16 s after start)
    expect(ts[0]).toBeLessThan(started + 6000);
    expect(ts[ts.length - 1]).toBeGreaterThan(started + 16_000);
    // the hall logger stayed on JSON, and the unmapped metric has a last value on the Gateways page
    const [logger] = await q<{ n: number }>("SELECT COUNT(*) AS n FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.code = 'th-labelling-room' AND r.ts >= ?", [started - 60_000]);
    expect(Number(logger.n)).toBeGreaterThan(0);
    const [tension] = await q<{ last_value: number | null }>("SELECT last_value FROM gateway_metrics WHERE name = 'Web tension'");
    expect(tension.last_value).not.toBeNull();
  }, 150_000);
});
