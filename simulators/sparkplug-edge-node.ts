// A Sparkplug B edge node built on sparkplug-payload and mqtt.js: what a gateway on a line does.
// It signs in with its code and secret, registers NDEATH (with its bdSeq) as its will, publishes
// NBIRTH then a DBIRTH per device (names, aliases, datatypes, units), then DDATA by alias with
// seq 0–255; answers NCMD "Node Control/Rebirth" with fresh births; can buffer readings while
// "the network is down" and upload them as historical metrics when it returns. Used by the demo
// (simulators/sparkplug-line.ts), the benchmark and the integration tests.
import mqtt, { type MqttClient } from "mqtt";
import sparkplug from "sparkplug-payload";
import type { UMetric, UPayload } from "sparkplug-payload/lib/sparkplugbpayload";

const codec = sparkplug.get("spBv1.0")!;

export type EdgeMetricSpec = { name: string; datatype: "Float" | "Double" | "Int32" | "Int64" | "Boolean" | "String"; unit?: string };
export type EdgeDeviceSpec = { name: string; metrics: EdgeMetricSpec[] };
export type EdgeNodeOptions = {
  host?: string;
  port: number;
  code: string;
  secret: string;
  groupId: string;
  nodeId: string;
  devices: EdgeDeviceSpec[];
  /** node-level metrics besides bdSeq and Node Control/Rebirth */
  nodeMetrics?: EdgeMetricSpec[];
  /** the node's clock: its offset from the real one in ms (positive = ahead) */
  clockOffsetMs?: number;
  /** bdSeq of the first session (it counts up by one per connection) */
  bdSeq?: number;
};

type Buffered = { device: string; ts: number; values: Record<string, number | boolean | string> };

export class EdgeNode {
  client: MqttClient | null = null;
  bdSeq: number;
  seq = 0;
  rebirths = 0;
  offline = false;
  private readonly aliases = new Map<string, { alias: number; spec: EdgeMetricSpec }>();
  private readonly buffer: Buffered[] = [];

  constructor(readonly opts: EdgeNodeOptions) {
    this.bdSeq = opts.bdSeq ?? 0;
    let alias = 1;
    for (const m of opts.nodeMetrics ?? []) this.aliases.set(`\u0000${m.name}`, { alias: alias++, spec: m });
    for (const d of opts.devices) for (const m of d.metrics) this.aliases.set(`${d.name}\u0000${m.name}`, { alias: alias++, spec: m });
  }

  now(): number {
    return Date.now() + (this.opts.clockOffsetMs ?? 0);
  }

  private topic(type: string, device?: string): string {
    return `spBv1.0/${this.opts.groupId}/${type}/${this.opts.nodeId}${device ? `/${device}` : ""}`;
  }

  private nextSeq(): number {
    const s = this.seq;
    this.seq = (this.seq + 1) % 256;
    return s;
  }

  encode(p: UPayload): Buffer {
    return Buffer.from(codec.encodePayload(p));
  }

  /** Connects (will = NDEATH with this session's bdSeq) and publishes the births. */
  async connect(): Promise<void> {
    const will = this.encode({ timestamp: this.now(), metrics: [{ name: "bdSeq", type: "Int64", value: this.bdSeq }] });
    const client = mqtt.connect({
      host: this.opts.host ?? "127.0.0.1",
      port: this.opts.port,
      protocolVersion: 4,
      clientId: this.opts.code,
      username: this.opts.code,
      password: this.opts.secret,
      clean: true,
      reconnectPeriod: 0,
      connectTimeout: 5000,
      will: { topic: this.topic("NDEATH"), payload: will, qos: 1, retain: false },
    });
    this.client = client;
    await new Promise<void>((resolve, reject) => {
      client.once("connect", () => resolve());
      client.once("error", reject);
      client.once("close", () => reject(new Error("connection closed before CONNACK")));
    });
    client.on("error", () => undefined);
    client.on("message", (topic, msg) => {
      if (topic !== this.topic("NCMD")) return;
      const p = codec.decodePayload(msg);
      if (p.metrics?.some((m) => m.name === "Node Control/Rebirth" && m.value === true)) {
        this.rebirths++;
        void this.publishBirths();
      }
    });
    await client.subscribeAsync(this.topic("NCMD"), { qos: 0 });
    await this.publishBirths();
  }

  async publishBirths(): Promise<void> {
    this.seq = 0;
    const ts = this.now();
    const nodeMetrics: UMetric[] = [
      { name: "bdSeq", type: "Int64", value: this.bdSeq, timestamp: ts },
      { name: "Node Control/Rebirth", type: "Boolean", value: false, timestamp: ts },
      ...(this.opts.nodeMetrics ?? []).map((m) => this.birthMetric("", m, ts)),
    ];
    await this.publish(this.topic("NBIRTH"), { timestamp: ts, seq: this.nextSeq(), metrics: nodeMetrics });
    for (const d of this.opts.devices) {
      await this.publish(this.topic("DBIRTH", d.name), { timestamp: ts, seq: this.nextSeq(), metrics: d.metrics.map((m) => this.birthMetric(d.name, m, ts)) });
    }
  }

  private birthMetric(device: string, m: EdgeMetricSpec, ts: number): UMetric {
    const a = this.aliases.get(`${device}\u0000${m.name}`)!;
    return {
      name: m.name,
      alias: a.alias,
      type: m.datatype,
      value: null,
      isNull: true,
      timestamp: ts,
      ...(m.unit ? { properties: { engUnit: { type: "String", value: m.unit } } } : {}),
    };
  }

  /** DDATA by alias; while offline the values are buffered for a historical upload. */
  async data(device: string, values: Record<string, number | boolean | string>, ts = this.now()): Promise<void> {
    if (this.offline) {
      this.buffer.push({ device, ts, values });
      return;
    }
    await this.publish(this.topic("DDATA", device), { timestamp: this.now(), seq: this.nextSeq(), metrics: this.dataMetrics(device, values, ts, false) });
  }

  dataMetrics(device: string, values: Record<string, number | boolean | string>, ts: number, historical: boolean): UMetric[] {
    return Object.entries(values).map(([name, value]) => {
      const a = this.aliases.get(`${device}\u0000${name}`);
      if (!a) throw new Error(`metric ${name} of ${device} was not born`);
      return { alias: a.alias, type: a.spec.datatype, value, timestamp: ts, ...(historical ? { isHistorical: true } : {}) };
    });
  }

  /** Buffered readings go up as historical metrics, up to `perMessage` readings sets a message. */
  async uploadBuffer(perMessage = 60): Promise<number> {
    const items = this.buffer.splice(0);
    const byDevice = new Map<string, Buffered[]>();
    for (const b of items) byDevice.set(b.device, [...(byDevice.get(b.device) ?? []), b]);
    for (const [device, list] of byDevice) {
      for (let i = 0; i < list.length; i += perMessage) {
        const metrics = list.slice(i, i + perMessage).flatMap((b) => this.dataMetrics(device, b.values, b.ts, true));
        await this.publish(this.topic("DDATA", device), { timestamp: this.now(), seq: this.nextSeq(), metrics });
      }
    }
    return items.length;
  }

  async publish(topic: string, payload: UPayload | Buffer, qos: 0 | 1 = 0): Promise<void> {
    const body = Buffer.isBuffer(payload) ? payload : this.encode(payload);
    await this.client!.publishAsync(topic, body, { qos });
  }

  /** Raw access for tests: publish bytes under any type of this node. */
  rawTopic(type: string, device?: string): string {
    return this.topic(type, device);
  }

  /** A clean stop: NDEATH first (a clean disconnect sends no will), then disconnect. */
  async stop(): Promise<void> {
    if (!this.client) return;
    await this.publish(this.topic("NDEATH"), { timestamp: this.now(), metrics: [{ name: "bdSeq", type: "Int64", value: this.bdSeq }] }, 1);
    await this.client.endAsync();
    this.client = null;
    this.bdSeq = (this.bdSeq + 1) % 256;
  }

  /** The connection drops without a word: the broker sends the will (NDEATH). */
  drop(): void {
    this.client?.stream.destroy();
    this.client = null;
    this.bdSeq = (this.bdSeq + 1) % 256;
  }
}
