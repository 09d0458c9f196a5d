// Test fixtures for the dashboards' browser tests: writes invented history straight into the
// stack's test database (raw readings for the recent past, 1-minute and 1-hour rollups for days
// before), with the same rollup arithmetic the worker uses (min, max, count, sum, sum of
// squares), and a small live publisher that signs in to the real broker as demo devices.
import { spawn } from "node:child_process";
import path from "node:path";
import mqtt, { type MqttClient } from "mqtt";
import mysql from "mysql2/promise";

export type FixtureDevice = { id: number; code: string; kind: "field_meter" | "th_logger" | "speed_gateway"; pointId: number | null; lineId: number | null; areaId: number | null };

export function testPool(): mysql.Pool {
  return mysql.createPool({
    host: process.env.DB_HOST ?? "127.0.0.1",
    port: Number(process.env.DB_PORT ?? 3407),
    user: process.env.DB_USER ?? "stillfield",
    password: process.env.DB_PASSWORD ?? "stillfield-local",
    database: process.env.DB_NAME ?? "stillfield_test0",
    connectionLimit: 4,
    timezone: "Z",
    supportBigNumbers: true,
    decimalNumbers: true,
  });
}

export async function listFixtureDevices(pool: mysql.Pool): Promise<FixtureDevice[]> {
  const [rows] = await pool.query("SELECT id, code, kind, point_id AS pointId, line_id AS lineId, area_id AS areaId FROM devices ORDER BY id");
  return (rows as Array<Record<string, unknown>>).map((r) => ({
    id: Number(r.id),
    code: String(r.code),
    kind: String(r.kind) as FixtureDevice["kind"],
    pointId: r.pointId === null ? null : Number(r.pointId),
    lineId: r.lineId === null ? null : Number(r.lineId),
    areaId: r.areaId === null ? null : Number(r.areaId),
  }));
}

/** An invented but plausible signal per device channel (deterministic in ts). */
export function fixtureValue(d: FixtureDevice, channel: string, ts: number): number {
  const s = ts / 1000;
  const seed = d.id * 7.3;
  switch (channel) {
    case "charge_kv": {
      const sign = d.id % 2 === 0 ? 1 : -1;
      const slow = 3 + 2 * Math.sin(s / 5400 + seed);
      const fast = 0.6 * Math.sin(s / 7 + seed) + 0.3 * Math.sin(s / 2.3);
      // a short spike every ~2 h that an average would hide
      const spike = Math.floor(s) % 7200 < 4 ? 9 : 0;
      return Number((sign * (slow + fast + spike)).toFixed(2));
    }
    case "rh_pct":
      return Number((41 + 6 * Math.sin(s / 13750 + seed) + 0.4 * Math.sin(s / 17)).toFixed(2));
    case "temp_c":
      return Number((21.5 + 1.2 * Math.sin(s / 13750 + seed + 1) + 0.1 * Math.sin(s / 11)).toFixed(2));
    case "speed_mpm":
      return Math.round(200 + 40 * Math.sin(s / 3600 + seed));
    case "running":
      return 1;
    default:
      return 0;
  }
}

export function channelsOf(kind: FixtureDevice["kind"]): string[] {
  return kind === "field_meter" ? ["charge_kv"] : kind === "th_logger" ? ["temp_c", "rh_pct"] : ["speed_mpm", "running"];
}

type Agg = { min: number; max: number; count: number; sum: number; sumSq: number };

function aggregate(values: number[]): Agg {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  let sumSq = 0;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
    sum += v;
    sumSq += v * v;
  }
  return { min, max, count: values.length, sum, sumSq };
}

async function insertRows(pool: mysql.Pool, sqlHead: string, rows: unknown[][], chunk = 2000) {
  for (let i = 0; i < rows.length; i += chunk) {
    await pool.query(`${sqlHead} VALUES ? ON DUPLICATE KEY UPDATE device_id = device_id`, [rows.slice(i, i + chunk)]);
  }
}

/**
 * History of `devices` from fromTs to toTs: raw 1 Hz readings for the last `rawMs`, 1-minute
 * rollups for the whole span (sampled at 1 Hz), 1-hour rollups built from the 1-minute ones.
 */
export async function writeFixtureHistory(pool: mysql.Pool, devices: FixtureDevice[], opts: { fromTs: number; toTs: number; rawMs: number }) {
  const minute = 60_000;
  const hour = 3_600_000;
  const from = Math.floor(opts.fromTs / hour) * hour;
  const rawFrom = Math.floor((opts.toTs - opts.rawMs) / 1000) * 1000;
  for (const d of devices) {
    for (const channel of channelsOf(d.kind)) {
      const raw: unknown[][] = [];
      const m1: unknown[][] = [];
      const h1: unknown[][] = [];
      const hour1: { agg: Agg | null; start: number } = { agg: null, start: from };
      const flushHour = () => {
        const a = hour1.agg;
        if (a) h1.push([d.id, channel, hour1.start, a.min, a.max, a.count, a.sum, a.sumSq]);
        hour1.agg = null;
      };
      for (let m = from; m < opts.toTs; m += minute) {
        const values: number[] = [];
        for (let t = m; t < Math.min(m + minute, opts.toTs); t += 1000) {
          const v = fixtureValue(d, channel, t);
          values.push(v);
          if (t >= rawFrom) raw.push([d.id, channel, t, v]);
        }
        if (!values.length) continue;
        const a = aggregate(values);
        m1.push([d.id, channel, m, a.min, a.max, a.count, a.sum, a.sumSq]);
        const hs = Math.floor(m / hour) * hour;
        if (hs !== hour1.start) {
          flushHour();
          hour1.start = hs;
        }
        const cur = hour1.agg;
        hour1.agg = cur
          ? { min: Math.min(cur.min, a.min), max: Math.max(cur.max, a.max), count: cur.count + a.count, sum: cur.sum + a.sum, sumSq: cur.sumSq + a.sumSq }
          : a;
      }
      flushHour();
      await insertRows(pool, "INSERT INTO readings (device_id, channel, ts, value)", raw);
      await insertRows(pool, "INSERT INTO rollup_1m (device_id, channel, bucket_ts, min, max, count, sum, sum_sq)", m1);
      await insertRows(pool, "INSERT INTO rollup_1h (device_id, channel, bucket_ts, min, max, count, sum, sum_sq)", h1);
    }
  }
}

/** Publishes 1 Hz readings as the given demo devices through the real broker (their own sign-in). */
export class FixturePublisher {
  private clients: Array<{ d: FixtureDevice; c: MqttClient }> = [];
  private timer: ReturnType<typeof setInterval> | null = null;
  private paused = false;

  constructor(
    private readonly devices: FixtureDevice[],
    private readonly secrets: Record<string, string>,
    private readonly broker = { host: "127.0.0.1", port: Number(process.env.MQTT_PORT ?? 1894) },
  ) {}

  async start(): Promise<void> {
    await Promise.all(
      this.devices.map(
        (d) =>
          new Promise<void>((resolve, reject) => {
            const c = mqtt.connect({ host: this.broker.host, port: this.broker.port, username: d.code, password: this.secrets[d.code], clientId: d.code, reconnectPeriod: 1000, connectTimeout: 5000 });
            const fail = (err: Error) => reject(new Error(`${d.code}: ${err.message}`));
            c.once("connect", () => {
              c.off("error", fail);
              resolve();
            });
            c.once("error", fail);
            this.clients.push({ d, c });
          }),
      ),
    );
    this.tick();
    this.timer = setInterval(() => this.tick(), 1000);
  }

  /** Publishes one reading now with a chosen value; resolves with its timestamp once the broker has it. */
  async publishNow(deviceId: number, channel: string, value: number): Promise<number> {
    const entry = this.clients.find((x) => x.d.id === deviceId);
    if (!entry) throw new Error(`no publisher for device ${deviceId}`);
    const ts = Date.now();
    await entry.c.publishAsync(`stillfield/d/${entry.d.code}/readings`, JSON.stringify({ ts, values: { [channel]: value } }), { qos: 1 });
    return ts;
  }

  /** Stops (or resumes) the regular 1 Hz readings, e.g. while probing with publishNow. */
  pause(paused = true) {
    this.paused = paused;
  }

  private tick() {
    if (this.paused) return;
    const ts = Math.floor(Date.now() / 1000) * 1000;
    for (const { d, c } of this.clients) {
      const values: Record<string, number> = {};
      for (const ch of channelsOf(d.kind)) values[ch] = fixtureValue(d, ch, ts);
      c.publish(`stillfield/d/${d.code}/readings`, JSON.stringify({ ts, values }), { qos: 1 });
    }
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    await Promise.all(this.clients.map(({ c }) => c.endAsync().catch(() => undefined)));
    this.clients = [];
  }
}

/**
 * Starts the plant simulator (simulators/plant.ts) against the stack's test database and broker:
 * a quick, thinned week of history first (idempotent: a second start finds it there), then live
 * readings. `exclude` leaves devices to the test's own publisher. Resolves once live readings from
 * at least ten devices are in the readings table.
 */
export async function startPlantSimulator(opts: { exclude?: string[]; devices: FixtureDevice[] }): Promise<{ stop(): Promise<void>; output(): string }> {
  const root = path.resolve(import.meta.dirname, "../..");
  const codes = opts.devices.map((d) => d.code).filter((c) => !(opts.exclude ?? []).includes(c));
  const args = ["--import", "tsx", "simulators/plant.ts", "--backfill-days", "7", "--full-rate-hours", "1", "--thin", "30", "--malformed-every-s", "0", "--devices", codes.join(",")];
  const child = spawn(process.execPath, args, { cwd: root, env: process.env, stdio: ["ignore", "pipe", "pipe"] });
  let out = "";
  const keep = (b: Buffer) => {
    out += b.toString("utf8");
    if (out.length > 100_000) out = out.slice(-50_000);
  };
  child.stdout.on("data", keep);
  child.stderr.on("data", keep);
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  // ready once live readings (stamped after the start, so not history) are in the table
  const startedAt = Date.now();
  const deadline = startedAt + 240_000;
  const pool = testPool();
  try {
    for (;;) {
      if (child.exitCode !== null) throw new Error(`the plant simulator stopped:\n${out}`);
      if (Date.now() > deadline) throw new Error(`the plant simulator published nothing live in time:\n${out}`);
      const [rows] = await pool.query("SELECT COUNT(DISTINCT device_id) AS n FROM readings WHERE ts > ?", [startedAt + 1000]);
      if (Number((rows as Array<{ n: number }>)[0]?.n ?? 0) >= Math.min(10, codes.length)) break;
      await new Promise((r) => setTimeout(r, 500));
    }
  } catch (err) {
    child.kill("SIGKILL");
    throw err;
  } finally {
    await pool.end();
  }
  return {
    output: () => out,
    async stop() {
      if (child.exitCode !== null) return;
      child.kill("SIGTERM");
      const t = setTimeout(() => child.kill("SIGKILL"), 10_000);
      await exited;
      clearTimeout(t);
    },
  };
}
