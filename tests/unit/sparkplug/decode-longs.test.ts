// 64-bit fields of a Sparkplug B payload (timestamps, seq, Int64/UInt64 values) come out of the
// Eclipse Tahu decoder as Long objects; they are read exactly with the Long's own toNumber().
// Expected values: the numbers encoded, round-tripped through sparkplug-payload's own encoder. A
// negative Int64 travels in the uint64 long_value field as two's complement (Sparkplug B 3.0
// specification, metric datatypes; from memory) and is read back signed.
import { describe, expect, it } from "vitest";
import { decodeSparkplug, encodePayload, toNum } from "../../../ingest/sparkplug/decode";
import { numericValue } from "../../../lib/sparkplug/metrics";

describe("64-bit fields from the decoder", () => {
  it("reads epoch-ms timestamps, seq and Int64/UInt64 values exactly", () => {
    const ts = 1_796_244_904_708; // 2026-12-02, above 2^32
    const buf = encodePayload({
      timestamp: ts,
      seq: 255,
      metrics: [
        { name: "big", type: "Int64", value: 2 ** 53 - 1, timestamp: ts + 1 },
        { name: "neg", type: "Int64", value: -4_294_967_301, timestamp: ts + 2 },
        { name: "u", type: "UInt64", value: 4_294_967_301, timestamp: ts + 3 },
        { name: "f", type: "Float", value: 1.5, timestamp: ts + 4 },
      ],
    });
    const r = decodeSparkplug(buf);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.payload.timestamp).toBe(ts);
    expect(r.payload.seq).toBe(255);
    expect(r.payload.metrics.map((m) => m.timestamp)).toEqual([ts + 1, ts + 2, ts + 3, ts + 4]);
    expect(r.payload.metrics.map((m) => numericValue(m.datatype!, m.value))).toEqual([2 ** 53 - 1, -4_294_967_301, 4_294_967_301, 1.5]);
  });

  it("takes plain numbers, Long-like objects and nothing", () => {
    expect(toNum(null)).toBeNull();
    expect(toNum(undefined)).toBeNull();
    expect(toNum(42)).toBe(42);
    expect(toNum({ toNumber: () => 7 })).toBe(7);
    expect(toNum("12")).toBe(12);
  });
});
