// The host's state machine (Sparkplug 3.0, "Operational Behavior"): births open a session named
// by bdSeq, seq 0–255 wraps and a gap asks for a rebirth, data by alias, refusals, deaths
// matched by bdSeq; and the clock-skew estimate.
import { describe, expect, it } from "vitest";
import { SparkplugHostState, metricKey, type DecodedMetric, type DecodedPayload, type HandleContext } from "../../../lib/sparkplug/host-state";
import { ClockSkewTracker, describeSkew, isClockOff, readingTime } from "../../../lib/clock-skew";

const NOW = 1_800_000_000_000;
const ctx = (arrivalMs = NOW): HandleContext => ({ arrivalMs, oldestAcceptedMs: NOW - 14 * 86_400_000, clockOf: () => ({ source: "device", skewMs: null }) });
const m = (x: Partial<DecodedMetric>): DecodedMetric => ({ name: null, alias: null, datatype: null, value: null, timestamp: null, isHistorical: false, isNull: false, unit: null, ...x });
const p = (seq: number | null, metrics: DecodedMetric[], timestamp: number | null = NOW): DecodedPayload => ({ seq, timestamp, metrics });
const K = "g/n";

function born(): SparkplugHostState {
  const s = new SparkplugHostState();
  s.setMappings(new Map([[metricKey(K, "dev", "Charge"), { targetDeviceId: 7, channel: "charge_kv", conversion: "v_to_kv" }]]));
  s.handle(K, "NBIRTH", "", p(0, [m({ name: "bdSeq", datatype: "Int64", value: 3 }), m({ name: "Node Control/Rebirth", datatype: "Boolean", value: false })]), ctx());
  s.handle(K, "DBIRTH", "dev", p(1, [m({ name: "Charge", alias: 10, datatype: "Float", value: null, isNull: true, unit: "V" })]), ctx());
  return s;
}

describe("SparkplugHostState", () => {
  it("stores data by alias through the mapping and conversion", () => {
    const s = born();
    const fx = s.handle(K, "DDATA", "dev", p(2, [m({ alias: 10, value: -2500, timestamp: NOW - 1000 })]), ctx());
    expect(fx.readings).toEqual([{ deviceId: 7, channel: "charge_kv", ts: NOW - 1000, value: -2.5, historical: false }]);
    expect(fx.rebirth).toBe(false);
    expect(fx.deviceOffsets).toEqual([{ deviceId: 7, offsetMs: 1000 }]);
  });

  it("wraps seq after 255 without a gap, and asks for a rebirth on a real gap", () => {
    const s = born();
    let seq = 2;
    for (let i = 0; i < 300; i++) {
      const fx = s.handle(K, "DDATA", "dev", p(seq, [m({ alias: 10, value: 1 })]), ctx());
      expect(fx.seqGap).toBeNull();
      seq = (seq + 1) % 256;
    }
    const gap = s.handle(K, "DDATA", "dev", p((seq + 3) % 256, [m({ alias: 10, value: 1 })]), ctx());
    expect(gap.seqGap).toEqual({ expected: seq, got: (seq + 3) % 256 });
    expect(gap.rebirth).toBe(true);
    expect(gap.readings).toHaveLength(1); // the message itself is still used
  });

  it("refuses data before a birth, unknown aliases and wrong datatypes", () => {
    const s = new SparkplugHostState();
    expect(s.handle(K, "DDATA", "dev", p(5, [m({ alias: 10, value: 1 })]), ctx()).rejections[0].reason).toBe("no_birth");
    const b = born();
    const unknown = b.handle(K, "DDATA", "dev", p(2, [m({ alias: 99, value: 1 })]), ctx());
    expect(unknown.rejections[0].reason).toBe("unknown_alias");
    expect(unknown.rebirth).toBe(true);
    const wrong = b.handle(K, "DDATA", "dev", p(3, [m({ alias: 10, datatype: "String", value: "x" })]), ctx());
    expect(wrong.rejections[0].reason).toBe("wrong_datatype");
    const wrongValue = b.handle(K, "DDATA", "dev", p(4, [m({ alias: 10, value: "x" })]), ctx());
    expect(wrongValue.rejections[0].reason).toBe("wrong_datatype");
    const undevice = b.handle(K, "DDATA", "other", p(5, [m({ alias: 10, value: 1 })]), ctx());
    expect(undevice.rejections[0].reason).toBe("no_birth");
  });

  it("ends a session only on a death with the session's bdSeq", () => {
    const s = born();
    const stale = s.handle(K, "NDEATH", "", p(null, [m({ name: "bdSeq", datatype: "Int64", value: 2 })]), ctx());
    expect(stale.staleDeath).toBe(true);
    expect(s.isOnline(K)).toBe(true);
    const death = s.handle(K, "NDEATH", "", p(null, [m({ name: "bdSeq", datatype: "Int64", value: 3 })]), ctx());
    expect(death.online).toEqual([{ deviceName: "", online: false }, { deviceName: "dev", online: false }]);
    expect(s.isOnline(K)).toBe(false);
  });

  it("keeps historical metrics out of the skew and refuses readings too far ahead", () => {
    const s = born();
    const hist = s.handle(K, "DDATA", "dev", p(2, [m({ alias: 10, value: 100, timestamp: NOW - 1_200_000, isHistorical: true })]), ctx());
    expect(hist.readings[0]).toMatchObject({ historical: true, ts: NOW - 1_200_000 });
    expect(hist.deviceOffsets).toEqual([]);
    expect(hist.nodeOffsetMs).toBeNull();
    const future = s.handle(K, "DDATA", "dev", p(3, [m({ alias: 10, value: 100, timestamp: NOW + 10 * 60_000 })]), ctx());
    expect(future.rejections[0].reason).toBe("ts_future");
  });
});

describe("clock skew", () => {
  it("takes the smallest offset in the window (transit delay is never negative)", () => {
    const t = new ClockSkewTracker(60_000);
    t.add(1, NOW, NOW - 45_000 - 300); // 300 ms in transit
    t.add(1, NOW + 1000, NOW + 1000 - 45_000 - 40);
    t.add(1, NOW + 2000, NOW + 2000 - 45_000 - 2000);
    expect(t.skewMs(1)).toBe(45_040);
    expect(isClockOff(t.skewMs(1), 30_000)).toBe(true);
    expect(isClockOff(29_000, 30_000)).toBe(false);
    expect(isClockOff(-31_000, 30_000)).toBe(true);
    expect(describeSkew(45_040)).toBe("45 s behind");
    expect(describeSkew(-125_000)).toBe("2 min 5 s ahead");
    expect(readingTime(NOW, "arrival", -90_000)).toBe(NOW - 90_000);
    expect(readingTime(NOW, "device", -90_000)).toBe(NOW);
  });

  it("gives the smallest offset of the window at thousands of messages a second, and forgets what left it", () => {
    const t = new ClockSkewTracker(60_000);
    const offsets: Array<{ at: number; off: number }> = [];
    // 20,000 messages over 100 s: offsets 5,000 ms plus a transit delay drawn from a fixed sequence
    for (let i = 0; i < 20_000; i++) {
      const at = NOW + i * 5;
      const off = 5000 + ((i * 7919) % 997);
      offsets.push({ at, off });
      t.add("n", at, at - off);
    }
    const last = NOW + 19_999 * 5;
    // computed here over every message still inside the window (by its second, as the tracker keeps them)
    const inWindow = offsets.filter((o) => Math.floor(o.at / 1000) * 1000 >= Math.floor((last - 60_000) / 1000) * 1000 - 1000);
    expect(t.skewMs("n")).toBe(Math.min(...inWindow.map((o) => o.off)));
    // a smaller offset 70 s ago has left the window
    const t2 = new ClockSkewTracker(60_000);
    t2.add("n", NOW, NOW - 100);
    for (let s2 = 1; s2 <= 70; s2++) t2.add("n", NOW + s2 * 1000, NOW + s2 * 1000 - 900);
    expect(t2.skewMs("n")).toBe(900);
    // one second's messages fold into one sample keeping its smallest offset
    const t3 = new ClockSkewTracker(60_000);
    t3.add("n", NOW + 10, NOW + 10 - 800);
    t3.add("n", NOW + 500, NOW + 500 - 200);
    t3.add("n", NOW + 990, NOW + 990 - 600);
    expect(t3.skewMs("n")).toBe(200);
  });
});
