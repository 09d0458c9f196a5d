// Sparkplug metric datatypes as Stillfield reads them, and how a gateway's metric becomes a
// Stillfield reading: a mapping to a device (the field meter at a point, the logger of a hall,
// a line-speed gateway) and channel, with a unit conversion where the units differ.
import { z } from "zod";
import { CHANNEL_RANGES, CHANNELS, type Channel } from "../contract/readings-payload";

/** Datatype names as Sparkplug B defines them (payload definition, "DataType" enum). */
export const SPB_DATATYPES = [
  "Int8", "Int16", "Int32", "Int64", "UInt8", "UInt16", "UInt32", "UInt64",
  "Float", "Double", "Boolean", "String", "DateTime", "Text", "UUID", "DataSet", "Bytes", "File", "Template",
] as const;
export type SpbDatatype = (typeof SPB_DATATYPES)[number];
const NUMERIC: ReadonlySet<string> = new Set(["Int8", "Int16", "Int32", "Int64", "UInt8", "UInt16", "UInt32", "UInt64", "Float", "Double", "Boolean"]);
const SIGNED32: ReadonlySet<string> = new Set(["Int8", "Int16", "Int32"]);
const INTEGER: ReadonlySet<string> = new Set(["Int8", "Int16", "Int32", "Int64", "UInt8", "UInt16", "UInt32", "UInt64"]);

/** Whether a metric of this datatype can feed a Stillfield channel (numbers and booleans). */
export function isNumericDatatype(datatype: string): boolean {
  return NUMERIC.has(datatype);
}

/**
 * A 64-bit field the decoder gave as a Long, as a number: with the Long's own toNumber()
 * (high·2³² + low, exact below 2⁵³; Number() would go through its toString(), a loop of 64-bit
 * divisions that cost more than the rest of decoding a 10-metric message), read as signed when
 * asked; anything without toNumber() with Number().
 */
export function longToNumber(v: object, signed = false): number {
  const long = v as { toNumber?: () => number; toSigned?: () => { toNumber(): number } };
  if (signed && typeof long.toSigned === "function") return long.toSigned().toNumber();
  return typeof long.toNumber === "function" ? long.toNumber() : Number(v);
}

/**
 * The number a metric value stands for, or null when the value does not fit its datatype
 * (a string in a Float metric, a fraction in an Int32 …). 64-bit values arrive as Long objects
 * from the decoder; they are converted with their toNumber() (exact below 2^53).
 */
export function numericValue(datatype: string, value: unknown): number | null {
  if (datatype === "Boolean") return typeof value === "boolean" ? (value ? 1 : 0) : null;
  if (!NUMERIC.has(datatype)) return null;
  let n: number;
  if (typeof value === "number") n = value;
  // Int64 travels in protobuf's uint64 field as two's complement: read it signed
  else if (typeof value === "object" && value !== null && "low" in value && "high" in value) n = longToNumber(value, datatype === "Int64");
  else return null;
  if (!Number.isFinite(n)) return null;
  // signed 8–32-bit values travel in protobuf's uint32 field as two's complement
  if (SIGNED32.has(datatype) && n > 0x7fffffff && n <= 0xffffffff) n -= 0x100000000;
  if (INTEGER.has(datatype) && !Number.isInteger(n)) return null;
  return n;
}

export const CONVERSIONS = ["none", "v_to_kv", "f_to_c", "fraction_to_pct"] as const;
export type Conversion = (typeof CONVERSIONS)[number];

export const CONVERSION_LABELS: Record<Conversion, string> = {
  none: "Same unit",
  v_to_kv: "V → kV (÷ 1000)",
  f_to_c: "°F → °C",
  fraction_to_pct: "Fraction → % (× 100)",
};

/** The unit each channel is stored in (its name says so: lib/contract/README.md). */
export const CHANNEL_UNITS: Record<Channel, string> = {
  charge_kv: "kV",
  temp_c: "°C",
  rh_pct: "%",
  speed_mpm: "m/min",
  running: "0/1",
};

/** Applies a conversion (V→kV: ÷1000; °F→°C: (F − 32) × 5/9; fraction→%: × 100). */
export function convertValue(value: number, conversion: Conversion): number {
  switch (conversion) {
    case "v_to_kv":
      return value / 1000;
    case "f_to_c":
      return ((value - 32) * 5) / 9;
    case "fraction_to_pct":
      return value * 100;
    default:
      return value;
  }
}

/** Which channels a conversion can feed (a conversion to kV only makes sense for charge). */
export const CONVERSION_TARGETS: Record<Conversion, readonly Channel[]> = {
  none: CHANNELS,
  v_to_kv: ["charge_kv"],
  f_to_c: ["temp_c"],
  fraction_to_pct: ["rh_pct"],
};

function normalUnit(unit: string): string {
  return unit.trim().toLowerCase().replace(/^deg\s*/, "°").replace(/^º/, "°");
}

/**
 * The conversion a gateway metric needs to reach a channel, judged from the unit its birth
 * declared; null when the units do not go together (e.g. "mA" to charge_kv) and the engineer
 * must decide. A metric with no unit is taken as already in the channel's unit.
 */
export function suggestConversion(metricUnit: string | null | undefined, channel: Channel): Conversion | null {
  if (!metricUnit || !metricUnit.trim()) return "none";
  const u = normalUnit(metricUnit);
  switch (channel) {
    case "charge_kv":
      return u === "kv" ? "none" : u === "v" ? "v_to_kv" : null;
    case "temp_c":
      return u === "°c" || u === "c" || u === "degc" ? "none" : u === "°f" || u === "f" || u === "degf" ? "f_to_c" : null;
    case "rh_pct":
      return u === "%" || u === "%rh" || u === "pct" ? "none" : u === "fraction" || u === "1" || u === "ratio" ? "fraction_to_pct" : null;
    case "speed_mpm":
      return u === "m/min" || u === "mpm" ? "none" : null;
    case "running":
      return "none";
  }
}

export const mappingInputSchema = z
  .object({
    metricId: z.coerce.number().int().positive(),
    targetDeviceId: z.coerce.number().int().positive().nullable(),
    channel: z.enum(CHANNELS).nullable(),
    conversion: z.enum(CONVERSIONS),
  })
  .superRefine((m, ctx) => {
    if ((m.targetDeviceId === null) !== (m.channel === null)) {
      ctx.addIssue({ code: "custom", path: ["channel"], message: "Choose both a device and a channel, or neither to unmap" });
    }
    if (m.channel && !CONVERSION_TARGETS[m.conversion].includes(m.channel)) {
      ctx.addIssue({ code: "custom", path: ["conversion"], message: `${CONVERSION_LABELS[m.conversion]} does not lead to ${CHANNEL_UNITS[m.channel]}` });
    }
  });
export type MappingInput = z.infer<typeof mappingInputSchema>;

/** Whether a converted value lies in the channel's physical range (the JSON contract's check). */
export function inChannelRange(channel: Channel, value: number): boolean {
  const r = CHANNEL_RANGES[channel];
  return value >= r.min && value <= r.max && (!r.integer || Number.isInteger(value));
}
