// Sparkplug B payloads in and out, with the Eclipse Tahu package (sparkplug-payload 1.0.3).
// 64-bit fields (seq, timestamps, aliases, Int64/UInt64 values) come back as Long objects and
// are converted with longToNumber (lib/sparkplug/metrics.ts), exact for every epoch-ms time and
// every alias in use.
// Sparkplug 3.0 lets data messages leave a metric's datatype out (it was given in the birth);
// the package then cannot pick the value, so such metrics are read again from the package's own
// protobuf message and the value field that is set is taken as it stands.
import sparkplug from "sparkplug-payload";
import proto from "sparkplug-payload/lib/sparkplugPayloadProto.js";
import type { UMetric, UPayload } from "sparkplug-payload/lib/sparkplugbpayload";
import type { DecodedMetric, DecodedPayload } from "../../lib/sparkplug/host-state";
import { REBIRTH_METRIC } from "../../lib/sparkplug/host-state";
import { longToNumber } from "../../lib/sparkplug/metrics";

const codec = sparkplug.get("spBv1.0")!;
const RawPayload = proto.org.eclipse.tahu.protobuf.Payload;
const VALUE_FIELDS = ["intValue", "longValue", "floatValue", "doubleValue", "booleanValue", "stringValue"] as const;

/** A number from a decoded field (seq, alias, timestamps: Longs, read with lib's longToNumber). */
export function toNum(v: unknown): number | null {
  if (v === null || v === undefined) return null;
  return typeof v === "object" ? longToNumber(v) : Number(v);
}

function unitOf(m: UMetric): string | null {
  const props = m.properties;
  if (!props) return null;
  for (const [k, p] of Object.entries(props)) {
    const key = k.toLowerCase();
    if ((key === "engunit" || key === "engineeringunit" || key === "unit" || key === "units") && typeof p.value === "string") return p.value.slice(0, 24);
  }
  return null;
}

export function decodeSparkplug(buf: Uint8Array): { ok: true; payload: DecodedPayload } | { ok: false; error: string } {
  let p: UPayload;
  try {
    p = codec.decodePayload(buf);
  } catch (err) {
    return { ok: false, error: err instanceof Error ? err.message.slice(0, 200) : "undecodable" };
  }
  const list = p.metrics ?? [];
  let raw: ReturnType<typeof RawPayload.decode> | null = null;
  const metrics: DecodedMetric[] = new Array(list.length);
  for (let i = 0; i < list.length; i++) {
    const m = list[i];
    let value: unknown = m.value;
    const datatype = typeof m.type === "string" && m.type ? m.type : null;
    if (datatype === null && !m.isNull) {
      raw ??= RawPayload.decode(buf);
      const rm = raw.metrics[i] as unknown as Record<string, unknown>;
      const field = VALUE_FIELDS.find((f) => typeof rm.value === "string" && rm.value === f);
      value = field ? rm[field] : null;
    }
    metrics[i] = {
      name: typeof m.name === "string" && m.name !== "" ? m.name : null,
      alias: toNum(m.alias),
      datatype,
      value,
      timestamp: toNum(m.timestamp),
      isHistorical: m.isHistorical === true,
      isNull: m.isNull === true,
      unit: unitOf(m),
    };
  }
  return { ok: true, payload: { timestamp: toNum(p.timestamp), seq: toNum(p.seq), metrics } };
}

/** NCMD asking a node to publish its births again. */
export function encodeRebirthCommand(nowMs: number): Uint8Array {
  return codec.encodePayload({ timestamp: nowMs, metrics: [{ name: REBIRTH_METRIC, type: "Boolean", value: true }] });
}

export const encodePayload = (p: UPayload): Uint8Array => codec.encodePayload(p);
export const decodePayload = (b: Uint8Array): UPayload => codec.decodePayload(b);
export type { UPayload, UMetric };
