// The Sparkplug host's store of each metric's newest value between writes (ingest/sparkplug/latest-values.ts).
import { describe, expect, it } from "vitest";
import { LatestValues } from "../../../ingest/sparkplug/latest-values";

describe("LatestValues", () => {
  it("keeps the last value per node, device and metric, and empties on take", () => {
    const s = new LatestValues();
    s.set(1, { deviceName: "drive", name: "Web tension", value: 48, ts: 1000 });
    s.set(1, { deviceName: "drive", name: "Web tension", value: 49.5, ts: 2000 });
    s.set(1, { deviceName: "meter", name: "Web tension", value: 3, ts: 2000 });
    s.set(2, { deviceName: "drive", name: "Web tension", value: "stopped", ts: 2000 });
    const taken = s.take();
    expect(taken).toHaveLength(3);
    expect(taken).toContainEqual({ edgeNodeId: 1, deviceName: "drive", name: "Web tension", value: 49.5, ts: 2000 });
    expect(taken).toContainEqual({ edgeNodeId: 1, deviceName: "meter", name: "Web tension", value: 3, ts: 2000 });
    expect(taken).toContainEqual({ edgeNodeId: 2, deviceName: "drive", name: "Web tension", value: "stopped", ts: 2000 });
    expect(s.take()).toEqual([]);
  });

  it("puts back what a failed write took, but never over a newer value", () => {
    const s = new LatestValues();
    s.set(1, { deviceName: "drive", name: "Line speed", value: 58, ts: 1000 });
    s.set(1, { deviceName: "drive", name: "Running", value: 1, ts: 1000 });
    const failed = s.take();
    s.set(1, { deviceName: "drive", name: "Line speed", value: 60, ts: 3000 });
    s.restore(failed);
    const next = s.take();
    expect(next).toHaveLength(2);
    expect(next).toContainEqual({ edgeNodeId: 1, deviceName: "drive", name: "Line speed", value: 60, ts: 3000 });
    expect(next).toContainEqual({ edgeNodeId: 1, deviceName: "drive", name: "Running", value: 1, ts: 1000 });
  });
});
