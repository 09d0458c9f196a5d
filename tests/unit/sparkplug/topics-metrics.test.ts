// Sparkplug topic parsing and the edge-node access rules (Sparkplug 3.0, chapter "Topics":
// spBv1.0/<group>/<type>/<edge node>[/<device>], node-level types without a device level,
// STATE on spBv1.0/STATE/<host id>); metric values by datatype and unit conversions.
import { describe, expect, it } from "vitest";
import { edgeNodeMayPublish, edgeNodeMaySubscribe, hostMayPublish, parseSparkplugTopic, sparkplugTopics } from "../../../lib/sparkplug/topics";
import { convertValue, mappingInputSchema, numericValue, suggestConversion } from "../../../lib/sparkplug/metrics";

describe("Sparkplug topics", () => {
  it("parses node, device and STATE topics and refuses malformed ones", () => {
    expect(parseSparkplugTopic("spBv1.0/plant/NBIRTH/gw1")).toEqual({ kind: "message", groupId: "plant", type: "NBIRTH", nodeId: "gw1", deviceId: null });
    expect(parseSparkplugTopic("spBv1.0/plant/DDATA/gw1/meter-3")).toEqual({ kind: "message", groupId: "plant", type: "DDATA", nodeId: "gw1", deviceId: "meter-3" });
    expect(parseSparkplugTopic("spBv1.0/STATE/host-a")).toEqual({ kind: "state", hostId: "host-a" });
    expect(parseSparkplugTopic("spBv1.0/plant/NDATA/gw1/extra")).toBeNull(); // node type with a device level
    expect(parseSparkplugTopic("spBv1.0/plant/DDATA/gw1")).toBeNull(); // device type without one
    expect(parseSparkplugTopic("spBv1.0/plant/XDATA/gw1")).toBeNull();
    expect(parseSparkplugTopic("spAv1.0/plant/NDATA/gw1")).toBeNull();
    expect(parseSparkplugTopic(sparkplugTopics.device("g", "DCMD", "n", "d"))).toMatchObject({ type: "DCMD", deviceId: "d" });
  });

  it("confines an edge node to its own group and node id", () => {
    const me = { groupId: "plant", nodeId: "gw1" };
    expect(edgeNodeMayPublish(me, "spBv1.0/plant/NBIRTH/gw1")).toBe(true);
    expect(edgeNodeMayPublish(me, "spBv1.0/plant/DDATA/gw1/m1")).toBe(true);
    expect(edgeNodeMayPublish(me, "spBv1.0/plant/DDATA/gw2/m1")).toBe(false); // another node's id
    expect(edgeNodeMayPublish(me, "spBv1.0/other/DDATA/gw1/m1")).toBe(false); // another group
    expect(edgeNodeMayPublish(me, "spBv1.0/plant/NCMD/gw1")).toBe(false); // commands are the host's
    expect(edgeNodeMayPublish(me, "spBv1.0/STATE/stillfield")).toBe(false);
    expect(edgeNodeMaySubscribe(me, "spBv1.0/plant/NCMD/gw1")).toBe(true);
    expect(edgeNodeMaySubscribe(me, "spBv1.0/plant/DCMD/gw1/#")).toBe(true);
    expect(edgeNodeMaySubscribe(me, "spBv1.0/STATE/stillfield")).toBe(true);
    expect(edgeNodeMaySubscribe(me, "spBv1.0/plant/NCMD/gw2")).toBe(false);
    expect(edgeNodeMaySubscribe(me, "spBv1.0/plant/DDATA/gw1/#")).toBe(false);
    expect(edgeNodeMaySubscribe(me, "spBv1.0/#")).toBe(false);
    expect(hostMayPublish("spBv1.0/plant/NCMD/gw1")).toBe(true);
    expect(hostMayPublish("spBv1.0/plant/NDATA/gw1")).toBe(false);
  });
});

describe("metric values and conversions", () => {
  it("reads values by datatype, 64-bit Longs with Number(), and refuses mismatches", () => {
    expect(numericValue("Float", 2.5)).toBe(2.5);
    expect(numericValue("Int64", { low: 5, high: 1, unsigned: false, valueOf: () => 4294967301 })).toBe(4294967301);
    expect(numericValue("Int32", 4294967291)).toBe(-5); // two's complement in the uint32 field
    expect(numericValue("Int32", 2.5)).toBeNull();
    expect(numericValue("Float", "2.5")).toBeNull();
    expect(numericValue("Boolean", true)).toBe(1);
    expect(numericValue("String", "x")).toBeNull();
  });

  it("converts V→kV, °F→°C and fraction→%", () => {
    // 1 kV = 1000 V (SI prefix kilo, BIPM SI Brochure 9th ed., table 7)
    expect(convertValue(-3420, "v_to_kv")).toBeCloseTo(-3.42, 12);
    // t/°C = (t/°F − 32)/1.8 (NIST SP 811, 2008, B.8): 32 °F = 0 °C, 212 °F = 100 °C, −40 °F = −40 °C
    expect(convertValue(32, "f_to_c")).toBeCloseTo(0, 12);
    expect(convertValue(212, "f_to_c")).toBeCloseTo(100, 12);
    expect(convertValue(-40, "f_to_c")).toBeCloseTo(-40, 12);
    expect(convertValue(0.383, "fraction_to_pct")).toBeCloseTo(38.3, 12);
    expect(suggestConversion("V", "charge_kv")).toBe("v_to_kv");
    expect(suggestConversion("degF", "temp_c")).toBe("f_to_c");
    expect(suggestConversion("mA", "charge_kv")).toBeNull();
  });

  it("refuses a mapping whose conversion does not lead to the channel's unit", () => {
    expect(mappingInputSchema.safeParse({ metricId: 1, targetDeviceId: 2, channel: "temp_c", conversion: "v_to_kv" }).success).toBe(false);
    expect(mappingInputSchema.safeParse({ metricId: 1, targetDeviceId: 2, channel: null, conversion: "none" }).success).toBe(false);
    expect(mappingInputSchema.safeParse({ metricId: 1, targetDeviceId: 2, channel: "charge_kv", conversion: "v_to_kv" }).success).toBe(true);
    expect(mappingInputSchema.safeParse({ metricId: 1, targetDeviceId: null, channel: null, conversion: "none" }).success).toBe(true);
  });
});
