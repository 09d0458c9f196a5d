// The host application's view of every edge node (Sparkplug 3.0, "Operational Behavior"), pure:
// it takes decoded messages with their arrival time and says what follows — readings to store,
// refusals with their reasons, births and deaths to record, whether to ask for a rebirth. The
// ingest host (ingest/sparkplug/host.ts) does the decoding and every write.
//
// - NBIRTH opens a session: its bdSeq metric names the session, seq restarts (0), metric names,
//   aliases and datatypes are learnt; devices wait for their DBIRTH.
// - NDEATH ends the session only when its bdSeq matches the session's: an old death (a will
//   delivered late, after the node came back) never kills a new session.
// - seq runs 0–255 and wraps, one counter per node shared by its devices. A gap asks the node for
//   a rebirth (NCMD "Node Control/Rebirth"); the message itself is still used.
// - Data before any birth, an unknown alias, a value of the wrong datatype: refused with a reason
//   (the first two also ask for a rebirth). Ingest goes on.
import { FUTURE_TOLERANCE_MS, type Channel } from "../contract/readings-payload";
import { readingTime, type TimeSource } from "../clock-skew";
import { convertValue, inChannelRange, isNumericDatatype, numericValue, type Conversion } from "./metrics";
import type { SpbMessageType } from "./topics";

export type DecodedMetric = {
  name: string | null;
  alias: number | null;
  datatype: string | null;
  value: unknown;
  timestamp: number | null;
  isHistorical: boolean;
  isNull: boolean;
  /** engineering unit from the birth's metric properties, when it gave one */
  unit: string | null;
};
export type DecodedPayload = { timestamp: number | null; seq: number | null; metrics: DecodedMetric[] };

export const GATEWAY_REJECTION_REASONS = [
  "malformed_payload",
  "unknown_alias",
  "wrong_datatype",
  "foreign_node_id",
  "no_birth",
  "bad_birth",
  "unknown_edge_node",
  "ts_future",
  "ts_too_old",
  "out_of_range",
] as const;
export type GatewayRejectionReason = (typeof GATEWAY_REJECTION_REASONS)[number];
export const GATEWAY_REJECTION_LABELS: Record<GatewayRejectionReason, string> = {
  malformed_payload: "Not a readable Sparkplug B payload",
  unknown_alias: "Metric alias not declared in a birth",
  wrong_datatype: "Value does not match the metric's datatype",
  foreign_node_id: "Published under another edge node's id",
  no_birth: "Data before any birth",
  bad_birth: "Birth without its bdSeq metric, names or datatypes",
  unknown_edge_node: "Edge node not registered in Stillfield",
  ts_future: "Timestamp too far in the future",
  ts_too_old: "Timestamp older than the raw-data retention",
  out_of_range: "Value outside the channel's physical range",
};

/** Names of the node-control metrics every edge node carries; listed nowhere, mapped never. */
export const REBIRTH_METRIC = "Node Control/Rebirth";
export const BDSEQ_METRIC = "bdSeq";
const isControlMetric = (name: string) => name === BDSEQ_METRIC || name.startsWith("Node Control/") || name.startsWith("Properties/");

export type MetricDef = { deviceName: string; name: string; alias: number | null; datatype: string; unit: string | null };
/** A metric of a live session, with its mapping key made once at birth (not per data message). */
type KnownMetric = MetricDef & { key: string };
/** Where a mapped metric goes; keyed by metricKey(node, device, name). */
export type MetricMapping = { targetDeviceId: number; channel: Channel; conversion: Conversion };
export type DeviceClock = { source: TimeSource; skewMs: number | null };

export const metricKey = (nodeKey: string, deviceName: string, name: string) => `${nodeKey}\u0000${deviceName}\u0000${name}`;

export type HostReading = { deviceId: number; channel: Channel; ts: number; value: number; historical: boolean };
export type HostEffects = {
  readings: HostReading[];
  rejections: Array<{ reason: GatewayRejectionReason; detail: string; deviceName: string | null }>;
  rebirth: boolean;
  /** births to record: device "" is the node itself */
  births: Array<{ deviceName: string; metrics: MetricDef[] }>;
  /** online changes: device "" is the node itself */
  online: Array<{ deviceName: string; online: boolean }>;
  lastValues: Array<{ deviceName: string; name: string; value: number | string | null; ts: number }>;
  nodeOffsetMs: number | null;
  deviceOffsets: Array<{ deviceId: number; offsetMs: number }>;
  seqGap: { expected: number; got: number } | null;
  staleDeath: boolean;
};

type Session = {
  bdSeq: number;
  expectedSeq: number;
  byAlias: Map<number, KnownMetric>;
  byName: Map<string, KnownMetric>;
  devicesBorn: Set<string>;
};

export type HandleContext = {
  arrivalMs: number;
  oldestAcceptedMs: number;
  clockOf(deviceId: number): DeviceClock;
};

const REBIRTH_EVERY_MS = 2000;

function emptyEffects(): HostEffects {
  return { readings: [], rejections: [], rebirth: false, births: [], online: [], lastValues: [], nodeOffsetMs: null, deviceOffsets: [], seqGap: null, staleDeath: false };
}

export class SparkplugHostState {
  private readonly sessions = new Map<string, Session>();
  private readonly lastRebirthAsk = new Map<string, number>();
  private mappings = new Map<string, MetricMapping>();

  setMappings(m: Map<string, MetricMapping>): void {
    this.mappings = m;
  }

  isOnline(nodeKey: string): boolean {
    return this.sessions.has(nodeKey);
  }

  bdSeqOf(nodeKey: string): number | null {
    return this.sessions.get(nodeKey)?.bdSeq ?? null;
  }

  /** Handles one message of a node (`deviceName` "" for node-level messages). */
  handle(nodeKey: string, type: SpbMessageType, deviceName: string, payload: DecodedPayload, ctx: HandleContext): HostEffects {
    const fx = emptyEffects();
    switch (type) {
      case "NBIRTH":
        this.nodeBirth(nodeKey, payload, ctx, fx);
        break;
      case "NDEATH":
        this.nodeDeath(nodeKey, payload, fx);
        break;
      case "DBIRTH":
      case "DDEATH":
      case "NDATA":
      case "DDATA": {
        const s = this.sessions.get(nodeKey);
        if (!s) {
          fx.rejections.push({ reason: "no_birth", detail: `${type} before the node's birth`, deviceName: deviceName || null });
          this.askRebirth(nodeKey, ctx.arrivalMs, fx);
          break;
        }
        this.checkSeq(nodeKey, s, payload.seq, ctx.arrivalMs, fx);
        if (type === "DBIRTH") this.deviceBirth(nodeKey, s, deviceName, payload, ctx, fx);
        else if (type === "DDEATH") {
          s.devicesBorn.delete(deviceName);
          fx.online.push({ deviceName, online: false });
        } else if (type === "DDATA" && !s.devicesBorn.has(deviceName)) {
          fx.rejections.push({ reason: "no_birth", detail: `DDATA from device "${deviceName}" before its birth`, deviceName });
          this.askRebirth(nodeKey, ctx.arrivalMs, fx);
        } else this.data(nodeKey, s, deviceName, payload, ctx, fx);
        break;
      }
      default:
        // NCMD/DCMD are the host's own commands coming back: nothing to do
        break;
    }
    return fx;
  }

  /** Forgets a node's session (its connection is gone without a death we could match). */
  forget(nodeKey: string): void {
    this.sessions.delete(nodeKey);
  }

  private askRebirth(nodeKey: string, now: number, fx: HostEffects): void {
    const last = this.lastRebirthAsk.get(nodeKey) ?? -Infinity;
    if (now - last < REBIRTH_EVERY_MS) return;
    this.lastRebirthAsk.set(nodeKey, now);
    fx.rebirth = true;
  }

  private checkSeq(nodeKey: string, s: Session, seq: number | null, now: number, fx: HostEffects): void {
    if (seq === null || seq < 0 || seq > 255) {
      fx.seqGap = { expected: s.expectedSeq, got: seq ?? -1 };
      this.askRebirth(nodeKey, now, fx);
      return;
    }
    if (seq !== s.expectedSeq) {
      fx.seqGap = { expected: s.expectedSeq, got: seq };
      this.askRebirth(nodeKey, now, fx);
    }
    s.expectedSeq = (seq + 1) % 256;
  }

  private nodeBirth(nodeKey: string, p: DecodedPayload, ctx: HandleContext, fx: HostEffects): void {
    const bd = p.metrics.find((m) => m.name === BDSEQ_METRIC);
    const bdSeq = bd ? numericValue(bd.datatype ?? "Int64", bd.value) : null;
    const bad = p.metrics.find((m) => !m.name || !m.datatype);
    if (bdSeq === null || bad) {
      fx.rejections.push({ reason: "bad_birth", detail: bdSeq === null ? "NBIRTH without a bdSeq metric" : "NBIRTH metric without a name or datatype", deviceName: null });
      this.sessions.delete(nodeKey);
      this.askRebirth(nodeKey, ctx.arrivalMs, fx);
      return;
    }
    const s: Session = { bdSeq, expectedSeq: ((p.seq ?? 0) + 1) % 256, byAlias: new Map(), byName: new Map(), devicesBorn: new Set() };
    this.sessions.set(nodeKey, s);
    fx.online.push({ deviceName: "", online: true });
    this.learn(nodeKey, s, "", p, ctx, fx);
  }

  private nodeDeath(nodeKey: string, p: DecodedPayload, fx: HostEffects): void {
    const s = this.sessions.get(nodeKey);
    const bd = p.metrics.find((m) => m.name === BDSEQ_METRIC);
    const bdSeq = bd ? numericValue(bd.datatype ?? "Int64", bd.value) : null;
    if (!s || bdSeq === null || bdSeq !== s.bdSeq) {
      fx.staleDeath = true;
      return;
    }
    this.sessions.delete(nodeKey);
    fx.online.push({ deviceName: "", online: false });
    for (const d of s.devicesBorn) fx.online.push({ deviceName: d, online: false });
  }

  private deviceBirth(nodeKey: string, s: Session, deviceName: string, p: DecodedPayload, ctx: HandleContext, fx: HostEffects): void {
    if (p.metrics.some((m) => !m.name || !m.datatype)) {
      fx.rejections.push({ reason: "bad_birth", detail: `DBIRTH of "${deviceName}": metric without a name or datatype`, deviceName });
      this.askRebirth(nodeKey, ctx.arrivalMs, fx);
      return;
    }
    // a rebirth of the device replaces its metric list
    for (const [alias, def] of s.byAlias) if (def.deviceName === deviceName) s.byAlias.delete(alias);
    for (const [k, def] of s.byName) if (def.deviceName === deviceName) s.byName.delete(k);
    s.devicesBorn.add(deviceName);
    fx.online.push({ deviceName, online: true });
    this.learn(nodeKey, s, deviceName, p, ctx, fx);
  }

  /** A birth's metrics: definitions learnt, then their values used like data. */
  private learn(nodeKey: string, s: Session, deviceName: string, p: DecodedPayload, ctx: HandleContext, fx: HostEffects): void {
    const defs: MetricDef[] = [];
    for (const m of p.metrics) {
      const def: KnownMetric = { deviceName, name: m.name!, alias: m.alias, datatype: m.datatype!, unit: m.unit, key: metricKey(nodeKey, deviceName, m.name!) };
      if (m.alias !== null) s.byAlias.set(m.alias, def);
      s.byName.set(`${deviceName}\u0000${def.name}`, def);
      if (!isControlMetric(def.name)) defs.push(def);
    }
    fx.births.push({ deviceName, metrics: defs });
    this.data(nodeKey, s, deviceName, p, ctx, fx);
  }

  private data(nodeKey: string, s: Session, deviceName: string, p: DecodedPayload, ctx: HandleContext, fx: HostEffects): void {
    const payloadTs = p.timestamp ?? ctx.arrivalMs;
    let live = false;
    const offsets = new Map<number, number>();
    for (const m of p.metrics) {
      const def = m.alias !== null && !m.name ? s.byAlias.get(m.alias) : m.name ? s.byName.get(`${deviceName}\u0000${m.name}`) : undefined;
      if (!def || def.deviceName !== deviceName) {
        const what = m.name ? `name "${m.name.slice(0, 80)}"` : `alias ${m.alias ?? "(none)"}`;
        fx.rejections.push({ reason: "unknown_alias", detail: `metric ${what} not in the birth${deviceName ? ` of "${deviceName}"` : ""}`, deviceName: deviceName || null });
        this.askRebirth(nodeKey, ctx.arrivalMs, fx);
        continue;
      }
      if (isControlMetric(def.name)) continue;
      const ts = m.timestamp ?? payloadTs;
      if (!m.isHistorical) live = true;
      if (m.datatype && m.datatype !== def.datatype) {
        fx.rejections.push({ reason: "wrong_datatype", detail: `"${def.name}" sent as ${m.datatype}, born as ${def.datatype}`, deviceName: deviceName || null });
        continue;
      }
      if (m.isNull || m.value === null || m.value === undefined) {
        fx.lastValues.push({ deviceName, name: def.name, value: null, ts });
        continue;
      }
      if (!isNumericDatatype(def.datatype)) {
        const text = typeof m.value === "string" ? m.value.slice(0, 120) : null;
        if (text === null && (def.datatype === "String" || def.datatype === "Text")) {
          fx.rejections.push({ reason: "wrong_datatype", detail: `"${def.name}" is ${def.datatype} but carried no text`, deviceName: deviceName || null });
        } else fx.lastValues.push({ deviceName, name: def.name, value: text, ts });
        continue;
      }
      const n = numericValue(def.datatype, m.value);
      if (n === null) {
        fx.rejections.push({ reason: "wrong_datatype", detail: `"${def.name}" (${def.datatype}) carried ${typeof m.value}`, deviceName: deviceName || null });
        continue;
      }
      if (!m.isHistorical) fx.lastValues.push({ deviceName, name: def.name, value: n, ts });
      const mapping = this.mappings.get(def.key);
      if (!mapping) continue;
      const clock = ctx.clockOf(mapping.targetDeviceId);
      const storedTs = readingTime(ts, clock.source, clock.skewMs);
      if (!m.isHistorical) {
        const o = ctx.arrivalMs - ts;
        const prev = offsets.get(mapping.targetDeviceId);
        if (prev === undefined || o < prev) offsets.set(mapping.targetDeviceId, o);
      }
      if (storedTs > ctx.arrivalMs + FUTURE_TOLERANCE_MS) {
        fx.rejections.push({ reason: "ts_future", detail: `"${def.name}" stamped ${Math.round((storedTs - ctx.arrivalMs) / 1000)} s ahead`, deviceName: deviceName || null });
        continue;
      }
      if (storedTs < ctx.oldestAcceptedMs) {
        fx.rejections.push({ reason: "ts_too_old", detail: `"${def.name}" older than the raw-data retention`, deviceName: deviceName || null });
        continue;
      }
      const value = convertValue(n, mapping.conversion);
      if (!inChannelRange(mapping.channel, value)) {
        fx.rejections.push({ reason: "out_of_range", detail: `"${def.name}" → ${mapping.channel} = ${value}`, deviceName: deviceName || null });
        continue;
      }
      fx.readings.push({ deviceId: mapping.targetDeviceId, channel: mapping.channel, ts: storedTs, value, historical: m.isHistorical });
    }
    if (live && p.timestamp !== null) fx.nodeOffsetMs = ctx.arrivalMs - p.timestamp;
    for (const [deviceId, offsetMs] of offsets) fx.deviceOffsets.push({ deviceId, offsetMs });
  }
}
