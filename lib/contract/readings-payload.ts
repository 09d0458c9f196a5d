// The device payload contract (lib/contract/README.md): one zod schema used by the ingest worker, the
// simulators and the tests. A message holds one reading set or a batch of them:
//
//   {"ts": 1767225600000, "values": {"charge_kv": -3.42}}
//   {"ts": "2026-01-01T00:00:10.000Z", "values": {"temp_c": 21.4, "rh_pct": 38.2}}
//   {"batch": [{"ts": 1767225600000, "values": {"speed_mpm": 248, "running": 1}}, …]}
//
// Timestamps are epoch milliseconds (integer) or ISO 8601 with a zone (Z or ±hh:mm).
// Channels carry their unit in the name. Validation happens in three layers, each with its
// own rejection reason: JSON syntax, shape (this schema), then per-value checks against the
// device's kind, the channel's physical range and the accepted time window (checkReadingSets).
import { z } from "zod";

export const CHANNELS = ["charge_kv", "temp_c", "rh_pct", "speed_mpm", "running"] as const;
export type Channel = (typeof CHANNELS)[number];

export const DEVICE_KINDS = ["field_meter", "th_logger", "speed_gateway"] as const;
export type DeviceKind = (typeof DEVICE_KINDS)[number];

/** Which channels a device of each kind may send. */
export const CHANNELS_BY_KIND: Record<DeviceKind, readonly Channel[]> = {
  field_meter: ["charge_kv"],
  th_logger: ["temp_c", "rh_pct"],
  speed_gateway: ["speed_mpm", "running"],
};

/**
 * Physical range of each channel; a value outside is a sensor or encoding fault, not data.
 * charge_kv: fixed field meters read ±20…±200 kV full scale depending on model and distance
 * (common practice); air breakdown at 25 mm caps a real reading near 75 kV (lib/physics).
 * temp_c/rh_pct: the range of industrial T/RH loggers (common practice). speed_mpm: no
 * converting line runs near 2,000 m/min (common practice). running: a 0/1 flag.
 */
export const CHANNEL_RANGES: Record<Channel, { min: number; max: number; integer?: boolean }> = {
  charge_kv: { min: -200, max: 200 },
  temp_c: { min: -40, max: 90 },
  rh_pct: { min: 0, max: 100 },
  speed_mpm: { min: 0, max: 2000 },
  running: { min: 0, max: 1, integer: true },
};

export const MAX_BATCH_LENGTH = 1000;
/** Largest message the broker accepts from a device (a full batch is about 80 kB). */
export const MAX_PAYLOAD_BYTES = 256 * 1024;
/** How far ahead of the server clock a reading may be stamped (device clocks drift). */
export const FUTURE_TOLERANCE_MS = 5 * 60_000;

export const REJECTION_REASONS = [
  "malformed_json",
  "invalid_shape",
  "non_finite",
  "bad_timestamp",
  "batch_too_long",
  "unknown_channel",
  "wrong_channel",
  "out_of_range",
  "ts_future",
  "ts_too_old",
  "unknown_device",
  "device_disabled",
  "oversized",
] as const;
export type RejectionReason = (typeof REJECTION_REASONS)[number];

export const REJECTION_REASON_LABELS: Record<RejectionReason, string> = {
  malformed_json: "Not valid JSON",
  invalid_shape: "Wrong message shape or value type",
  non_finite: "NaN or infinite value",
  bad_timestamp: "Unreadable timestamp",
  batch_too_long: `Batch longer than ${MAX_BATCH_LENGTH} reading sets`,
  unknown_channel: "Unknown channel",
  wrong_channel: "Channel not sent by this kind of device",
  out_of_range: "Value outside the channel's physical range",
  ts_future: "Timestamp too far in the future",
  ts_too_old: "Timestamp older than the raw-data retention",
  unknown_device: "Unknown device",
  device_disabled: "Device disabled",
  oversized: "Message too large",
};

// ISO 8601 with an explicit zone; a local time without zone would be ambiguous.
const isoTimestamp = z.iso.datetime({ offset: true });
export const timestampSchema = z.union([z.number().int().min(0), isoTimestamp]);

export const readingValuesSchema = z
  .object({
    charge_kv: z.number().optional(),
    temp_c: z.number().optional(),
    rh_pct: z.number().optional(),
    speed_mpm: z.number().optional(),
    running: z.number().optional(),
  })
  .strict();

export const readingSetSchema = z.object({ ts: timestampSchema, values: readingValuesSchema }).strict();
export const readingBatchSchema = z.object({ batch: z.array(readingSetSchema).min(1).max(MAX_BATCH_LENGTH) }).strict();

/** The whole device message: one reading set or a batch. */
export const devicePayloadSchema = z.union([readingSetSchema, readingBatchSchema]);

export type ReadingSetInput = z.input<typeof readingSetSchema>;
export type DevicePayload = z.input<typeof devicePayloadSchema>;
export type ReadingSet = z.output<typeof readingSetSchema>;

/** A device's online/offline message on its status topic (also its last will). */
export const deviceStatusSchema = z.object({ online: z.boolean() }).strict();
export type DeviceStatus = z.infer<typeof deviceStatusSchema>;

export type PayloadRejection = { reason: RejectionReason; detail: string };
export type ParsedPayload = { ok: true; sets: ReadingSet[] } | { ok: false; rejection: PayloadRejection };

const utf8 = new TextDecoder("utf-8");

function valueAt(root: unknown, path: readonly PropertyKey[]): unknown {
  let cur: unknown = root;
  for (const key of path) {
    if (cur === null || typeof cur !== "object") return undefined;
    cur = Reflect.get(cur, key);
  }
  return cur;
}

function reasonForIssue(issue: z.core.$ZodIssue, raw: unknown): RejectionReason {
  const path = issue.path;
  const last = path[path.length - 1];
  if (issue.code === "too_big" && path.length === 1 && path[0] === "batch") return "batch_too_long";
  if (issue.code === "unrecognized_keys" && last === "values") return "unknown_channel";
  if (last === "ts") return "bad_timestamp";
  const value = valueAt(raw, path);
  if (typeof value === "number" && !Number.isFinite(value)) return "non_finite";
  return "invalid_shape";
}

const CHANNEL_NAMES: ReadonlySet<string> = new Set(CHANNELS);

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === "object" && !Array.isArray(v);
}

/**
 * The usual message checked by hand: epoch-millisecond timestamps and finite numbers on known
 * channels, nothing else. It accepts exactly what the schemas above accept for that shape (a
 * unit test compares the two); anything else (ISO timestamps, a fault) goes through zod, which
 * also words the refusal. Zod copies every object it checks, and at tens of thousands of
 * messages a second that copying was a tenth of what the worker allocated.
 */
function plainSet(raw: unknown): raw is ReadingSet {
  if (!isPlainObject(raw)) return false;
  let keys = 0;
  for (const key in raw) {
    if (key !== "ts" && key !== "values") return false;
    keys++;
  }
  if (keys !== 2) return false;
  const ts = raw.ts;
  const values = raw.values;
  if (typeof ts !== "number" || !Number.isSafeInteger(ts) || ts < 0 || !isPlainObject(values)) return false;
  for (const key in values) {
    const v = values[key];
    if (!CHANNEL_NAMES.has(key) || typeof v !== "number" || !Number.isFinite(v)) return false;
  }
  return true;
}

function plainPayload(raw: unknown): ReadingSet[] | null {
  if (!isPlainObject(raw)) return null;
  if (plainSet(raw)) return [raw];
  let keys = 0;
  for (const key in raw) {
    if (key !== "batch") return null;
    keys++;
  }
  const batch = raw.batch;
  if (keys !== 1 || !Array.isArray(batch) || batch.length < 1 || batch.length > MAX_BATCH_LENGTH) return null;
  for (const set of batch) if (!plainSet(set)) return null;
  return batch as ReadingSet[];
}

/**
 * Parses a message body (bytes or text) into reading sets, or says why it was refused.
 * Only syntax and shape are checked here; see checkReadingSets for values and times.
 */
export function parseDevicePayload(body: string | Uint8Array): ParsedPayload {
  const text = typeof body === "string" ? body : utf8.decode(body);
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    // NaN and Infinity are not JSON; name them when that is what broke the parse
    const reason: RejectionReason = /(^|[^A-Za-z])(NaN|-?Infinity)([^A-Za-z]|$)/.test(text) ? "non_finite" : "malformed_json";
    return { ok: false, rejection: { reason, detail: reason === "non_finite" ? "NaN or Infinity in the message" : "Message is not valid JSON" } };
  }
  const plain = plainPayload(raw);
  if (plain) return { ok: true, sets: plain };
  const isBatch = isPlainObject(raw) && "batch" in raw;
  if (isBatch) {
    const parsed = readingBatchSchema.safeParse(raw);
    if (parsed.success) return { ok: true, sets: parsed.data.batch };
    const issue = parsed.error.issues[0];
    return { ok: false, rejection: { reason: reasonForIssue(issue, raw), detail: describeIssue(issue) } };
  }
  const parsed = readingSetSchema.safeParse(raw);
  if (parsed.success) return { ok: true, sets: [parsed.data] };
  const issue = parsed.error.issues[0];
  return { ok: false, rejection: { reason: reasonForIssue(issue, raw), detail: describeIssue(issue) } };
}

function describeIssue(issue: z.core.$ZodIssue): string {
  const where = issue.path.length > 0 ? issue.path.join(".") : "message";
  return `${where}: ${issue.message}`.slice(0, 280);
}

/** Epoch ms of a parsed timestamp (ISO strings are converted here). */
export function timestampMs(ts: number | string): number {
  return typeof ts === "number" ? ts : Date.parse(ts);
}

export type CheckedReading = { channel: Channel; ts: number; value: number };
export type CheckContext = {
  deviceKind: DeviceKind;
  nowMs: number;
  /** readings stamped before this are older than the raw retention */
  oldestAcceptedMs: number;
  futureToleranceMs?: number;
};
export type CheckResult = { readings: CheckedReading[]; rejections: ReadonlyArray<PayloadRejection & { count: number }> };
const NO_REJECTIONS: CheckResult["rejections"] = Object.freeze([]);

type Failures = Map<RejectionReason, { count: number; detail: string }>;

function addFailure(failures: Failures | null, reason: RejectionReason, detail: string, count = 1): Failures {
  const map = failures ?? new Map();
  const f = map.get(reason);
  if (f) f.count += count;
  else map.set(reason, { count, detail });
  return map;
}

/**
 * Checks each value of already-parsed reading sets against the device's kind, the channel's
 * range and the accepted time window. Good values pass even when others in the same message
 * fail; every failure is reported once per reason with how many values it hit.
 */
export function checkReadingSets(sets: readonly ReadingSet[], ctx: CheckContext): CheckResult {
  const allowed = CHANNELS_BY_KIND[ctx.deviceKind];
  const latestMs = ctx.nowMs + (ctx.futureToleranceMs ?? FUTURE_TOLERANCE_MS);
  const readings: CheckedReading[] = [];
  // made on the first failure only: most messages have none
  let failures: Failures | null = null;
  for (const set of sets) {
    const ts = timestampMs(set.ts);
    const values = set.values;
    // no per-set arrays: this runs for every reading at tens of thousands a second
    let present = 0;
    for (const channel of CHANNELS) if (values[channel] !== undefined) present++;
    if (present === 0) {
      failures = addFailure(failures, "invalid_shape", "values: no channel in the reading set");
      continue;
    }
    if (!Number.isFinite(ts)) {
      failures = addFailure(failures, "bad_timestamp", `ts: cannot read ${String(set.ts)}`, present);
      continue;
    }
    if (ts > latestMs) {
      failures = addFailure(failures, "ts_future", `ts ${new Date(ts).toISOString()} is ${Math.round((ts - ctx.nowMs) / 1000)} s ahead`, present);
      continue;
    }
    if (ts < ctx.oldestAcceptedMs) {
      failures = addFailure(failures, "ts_too_old", `ts ${new Date(ts).toISOString()} is older than the raw retention`, present);
      continue;
    }
    for (const channel of CHANNELS) {
      const value = values[channel];
      if (value === undefined) continue;
      if (!allowed.includes(channel)) {
        failures = addFailure(failures, "wrong_channel", `${channel} is not a ${ctx.deviceKind} channel`);
        continue;
      }
      const range = CHANNEL_RANGES[channel];
      if (value < range.min || value > range.max || (range.integer && !Number.isInteger(value))) {
        failures = addFailure(failures, "out_of_range", `${channel}=${value} outside ${range.min}…${range.max}`);
        continue;
      }
      readings.push({ channel, ts, value });
    }
  }
  return { readings, rejections: failures ? [...failures].map(([reason, f]) => ({ reason, detail: f.detail, count: f.count })) : NO_REJECTIONS };
}
