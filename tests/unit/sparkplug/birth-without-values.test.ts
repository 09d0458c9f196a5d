// A birth that declares metrics without values (as the wire carries a null value when the
// is_null flag is lost in encoding) is a declaration, not bad data: nothing is refused
// (lib/sparkplug/host-state.ts), and data by alias flows afterwards.
import { describe, expect, it } from "vitest";
import { SparkplugHostState, metricKey, type DecodedMetric, type DecodedPayload, type HandleContext } from "../../../lib/sparkplug/host-state";

const NOW = 1_800_000_000_000;
const ctx: HandleContext = { arrivalMs: NOW, oldestAcceptedMs: NOW - 86_400_000, clockOf: () => ({ source: "device", skewMs: null }) };
const m = (x: Partial<DecodedMetric>): DecodedMetric => ({ name: null, alias: null, datatype: null, value: null, timestamp: null, isHistorical: false, isNull: false, unit: null, ...x });
const p = (seq: number, metrics: DecodedMetric[]): DecodedPayload => ({ seq, timestamp: NOW, metrics });

describe("births without values", () => {
  it("refuse nothing, and the metrics' data is stored afterwards", () => {
    const s = new SparkplugHostState();
    s.setMappings(new Map([[metricKey("g/n", "drive", "Running"), { targetDeviceId: 4, channel: "running", conversion: "none" }]]));
    s.handle("g/n", "NBIRTH", "", p(0, [m({ name: "bdSeq", datatype: "Int64", value: 0 }), m({ name: "Node Control/Rebirth", datatype: "Boolean", value: false })]), ctx);
    const birth = s.handle("g/n", "DBIRTH", "drive", p(1, [m({ name: "Running", alias: 4, datatype: "Boolean" }), m({ name: "Line speed", alias: 3, datatype: "Float", unit: "m/min" })]), ctx);
    expect(birth.rejections).toEqual([]);
    const data = s.handle("g/n", "DDATA", "drive", p(2, [m({ alias: 4, value: true, timestamp: NOW - 500 })]), ctx);
    expect(data.rejections).toEqual([]);
    expect(data.readings).toEqual([{ deviceId: 4, channel: "running", ts: NOW - 500, value: 1, historical: false }]);
  });
});
