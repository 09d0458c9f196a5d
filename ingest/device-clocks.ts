// Clock skew per device (JSON devices and devices fed through a gateway) and per edge node,
// measured from live messages (lib/clock-skew.ts), and each device's chosen time source.
// Written to `device_clocks` with the worker's status; the choice is reloaded with the devices.
import type { Db } from "../db/client";
import { listDeviceClocks, recordDeviceSkews } from "../db/queries/gateways-write";
import { ClockSkewTracker, readingTime, type TimeSource } from "../lib/clock-skew";
import type { DeviceClock } from "../lib/sparkplug/host-state";

export class DeviceClocks {
  readonly tracker = new ClockSkewTracker();
  private sources = new Map<number, TimeSource>();
  private readonly written = new Map<number, number>();

  async reload(db: Db): Promise<void> {
    const rows = await listDeviceClocks(db);
    this.sources = new Map(rows.map((r) => [r.deviceId, r.timeSource]));
  }

  /** The device's time source, with its measured skew where readings are shifted by it (arrival time). */
  clockOf = (deviceId: number): DeviceClock => {
    const source = this.sources.get(deviceId) ?? "device";
    // the skew scan runs per metric of every Sparkplug message: skipped where device time is kept
    return { source, skewMs: source === "arrival" ? this.tracker.skewMs(deviceId) : null };
  };

  /** One JSON message: measures the skew from its newest reading, then the time to store each reading under. */
  observe(deviceId: number, arrivalMs: number, newestTs: number): (ts: number) => number {
    this.tracker.add(deviceId, arrivalMs, newestTs);
    const clock = this.clockOf(deviceId);
    if (clock.source === "device") return (ts) => ts;
    return (ts) => readingTime(ts, clock.source, clock.skewMs);
  }

  /** Writes the device skews that changed by more than half a second since last written. */
  async flush(db: Db, now: number): Promise<void> {
    const changed = new Map<number, number>();
    for (const key of this.tracker.keys()) {
      if (typeof key !== "number") continue;
      const skew = this.tracker.skewMs(key);
      if (skew === null) continue;
      const last = this.written.get(key);
      if (last === undefined || Math.abs(last - skew) > 500) changed.set(key, skew);
    }
    if (changed.size === 0) return;
    await recordDeviceSkews(db, changed, now);
    for (const [k, v] of changed) this.written.set(k, v);
  }
}
