// The newest value of each Sparkplug metric since the last write, kept for the Gateways page
// (written about once a second by ingest/sparkplug/host.ts). A DDATA of ten metrics arrives tens
// of thousands of times a second in a busy plant, so a value is kept under its node, device and
// metric name as they come, without building a key or a copy per metric.
import type { LastValue } from "../../db/queries/gateways-write";

type Seen = Omit<LastValue, "edgeNodeId">;

export class LatestValues {
  private readonly byNode = new Map<number, Map<string, Map<string, Seen>>>();

  set(edgeNodeId: number, v: Seen): void {
    let devices = this.byNode.get(edgeNodeId);
    if (!devices) this.byNode.set(edgeNodeId, (devices = new Map()));
    let metrics = devices.get(v.deviceName);
    if (!metrics) devices.set(v.deviceName, (metrics = new Map()));
    metrics.set(v.name, v);
  }

  /** Every value kept, and the store emptied. */
  take(): LastValue[] {
    const out: LastValue[] = [];
    for (const [edgeNodeId, devices] of this.byNode)
      for (const metrics of devices.values()) for (const v of metrics.values()) out.push({ edgeNodeId, deviceName: v.deviceName, name: v.name, value: v.value, ts: v.ts });
    this.byNode.clear();
    return out;
  }

  /** Puts back what a failed write took, unless a newer value came in meanwhile. */
  restore(values: readonly LastValue[]): void {
    for (const v of values) {
      if (this.byNode.get(v.edgeNodeId)?.get(v.deviceName)?.has(v.name)) continue;
      this.set(v.edgeNodeId, { deviceName: v.deviceName, name: v.name, value: v.value, ts: v.ts });
    }
  }
}
