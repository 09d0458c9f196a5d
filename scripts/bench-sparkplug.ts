// Part of the ingest benchmark (scripts/bench-ingest.ts): Sparkplug B DDATA with 10 metrics per
// message through the same pipeline (broker → the worker's Sparkplug host → writer → MariaDB
// with rollups). A gateway with ten field meters behind it: one DDATA per moment carries the
// ten meters' charge (in V, converted to kV), each mapped onto its own Stillfield device, so the
// host splits every message over ten devices as a real line gateway's would be.
import type mysql from "mysql2/promise";
import { hashDeviceSecret } from "../lib/device-secrets";
import { EdgeNode } from "../simulators/sparkplug-edge-node";
import { waitFor, type IngestStack } from "../tests/integration/ingest-support/processes";

const METRICS = 10;

export type SparkplugBenchResult = { readings: number; rate: number };

export async function benchSparkplugDdata(
  stack: IngestStack,
  tdb: { pool: mysql.Pool },
  opts: { readings: number; window: number; committedBefore: number; waitCommitted(target: number): Promise<number> },
): Promise<SparkplugBenchResult> {
  const secret = `bench-spb-secret-${Date.now()}`;
  // written directly: the scratch database has no people for the audit trail of the product's own writes
  await tdb.pool.query("INSERT INTO edge_nodes (code, group_id, node_id, label, secret_hash, created_at) VALUES ('bench-spb', 'bench', 'bench-gw', 'Bench gateway', ?, ?)", [hashDeviceSecret(secret), Date.now()]);
  const targets: number[] = [];
  for (let i = 1; i <= METRICS; i++) {
    const [res] = await tdb.pool.query<mysql.ResultSetHeader>(
      "INSERT INTO devices (code, kind, label, secret_hash, line_id, area_id, created_at) VALUES (?, 'field_meter', ?, ?, 1, 1, ?)",
      [`bench-spb-fm-${i}`, `Bench Sparkplug meter ${i}`, hashDeviceSecret(`unused-${i}-${Date.now()}`), Date.now()],
    );
    targets.push(res.insertId);
  }
  const names = Array.from({ length: METRICS }, (_, i) => `Charge ${i + 1}`);
  const node = new EdgeNode({ port: stack.mqttPort, code: "bench-spb", secret, groupId: "bench", nodeId: "bench-gw", devices: [{ name: "meters", metrics: names.map((name) => ({ name, datatype: "Float", unit: "V" })) }] });
  // the broker learns of a new edge node on its next refresh of the sign-in list
  await waitFor("the broker to accept the bench gateway", () => node.connect().then(() => true, () => false), 60_000, 500);
  // the host also learns of new edge nodes on a refresh: births are repeated until it has them
  const rows = await waitFor("the bench gateway's birth", async () => {
    const [r] = await tdb.pool.query<mysql.RowDataPacket[]>("SELECT id, name FROM gateway_metrics WHERE device_name = 'meters' ORDER BY id");
    if (r.length === METRICS) return r;
    await node.publishBirths();
    await new Promise((w) => setTimeout(w, 1000));
    return null;
  }, 120_000);
  for (const r of rows) {
    const i = names.indexOf(String(r.name));
    await tdb.pool.query("UPDATE gateway_metrics SET target_device_id = ?, target_channel = 'charge_kv', conversion = 'v_to_kv', mapped_at = ? WHERE id = ?", [targets[i], Date.now(), Number(r.id)]);
  }
  // the host reloads its mappings every INGEST_DEVICE_REFRESH_MS; a test message shows when it has
  const probeTs = Date.now() - 60 * 60_000;
  await waitFor("the mappings in the host", async () => {
    await node.data("meters", Object.fromEntries(names.map((n) => [n, -1000])), probeTs);
    const [r] = await tdb.pool.query<mysql.RowDataPacket[]>("SELECT COUNT(*) AS n FROM readings WHERE ts = ? AND device_id IN (?)", [probeTs, targets]);
    return Number(r[0].n) === METRICS;
  }, 60_000, 500);
  await opts.waitCommitted(opts.committedBefore + METRICS);
  await new Promise((r) => setTimeout(r, 1000)); // repeated probes may still be counted (as duplicates)
  const st = await stack.workerStats();
  const base = st.committed.readings + st.committed.duplicates;

  const client = node.client!;
  const messages = Math.ceil(opts.readings / METRICS);
  const t0 = Date.now() - 20 * 60_000;
  const topic = node.rawTopic("DDATA", "meters");
  const seqOf = () => (node as unknown as { nextSeq(): number }).nextSeq();
  // encoded before the clock starts, in sending order (seq runs on): the device's encoder is not
  // ours to measure, and the JSON batches of (c) are built beforehand too
  const bodies: Buffer[] = [];
  for (let i = 0; i < messages; i++) {
    const ts = t0 + i;
    bodies.push(node.encode({ timestamp: ts, seq: seqOf(), metrics: names.map((_, k) => ({ alias: k + 1, type: "Float", value: -((i + k) % 1000) * 10, timestamp: ts })) }));
  }
  const startTs = Date.now();
  await new Promise<void>((resolve, reject) => {
    let sent = 0;
    let acked = 0;
    const window = Math.max(50, Math.round(opts.window / 5));
    const pump = () => {
      while (sent < messages && sent - acked < window) {
        const body = bodies[sent++];
        client.publish(topic, body, { qos: 1 }, (err) => {
          if (err) return reject(err);
          acked++;
          if (acked === messages) resolve();
          else if (sent - acked < window / 2) pump();
        });
      }
    };
    pump();
  });
  const done = await opts.waitCommitted(base + messages * METRICS);
  await node.stop().catch(() => undefined);
  return { readings: messages * METRICS, rate: (messages * METRICS) / ((done - startTs) / 1000) };
}
