// Collects committed readings per line (field meters, speed gateway) and per hall (T/RH logger)
// and publishes them about once a second on the internal live topics for the app's SSE routes
// (format and schema in lib/live.ts). Only readings new since the last snapshot are sent, at
// most LIVE_MAX_SAMPLES_PER_SERIES per series (the newest).
import type { ReadingRow } from "../db/queries/readings-write";
import { internalTopics } from "../lib/contract/topics";
import { LIVE_MAX_SAMPLES_PER_SERIES, LIVE_SNAPSHOT_VERSION, type LiveSnapshot } from "../lib/live";
import type { DeviceDirectory } from "./device-directory";

type Series = { deviceId: number; channel: ReadingRow["channel"]; samples: Array<[number, number]> };
type Scope = { scope: "line" | "area"; id: number; series: Map<string, Series> };

export class LiveSnapshots {
  private scopes = new Map<string, Scope>();

  constructor(private readonly directory: DeviceDirectory) {}

  add(rows: readonly ReadingRow[]): void {
    let lastDevice = -1;
    let lastChannel = "";
    let scope: Scope | null = null;
    let s: Series | undefined;
    for (const r of rows) {
      if (r.deviceId !== lastDevice) {
        lastDevice = r.deviceId;
        lastChannel = "";
        scope = this.scopeFor(r.deviceId);
      }
      if (!scope) continue;
      if (r.channel !== lastChannel) {
        lastChannel = r.channel;
        const key = `${r.deviceId}|${r.channel}`;
        s = scope.series.get(key);
        if (!s) scope.series.set(key, (s = { deviceId: r.deviceId, channel: r.channel, samples: [] }));
      }
      s!.samples.push([r.ts, r.value]);
      if (s!.samples.length > LIVE_MAX_SAMPLES_PER_SERIES * 4) s!.samples.splice(0, s!.samples.length - LIVE_MAX_SAMPLES_PER_SERIES);
    }
  }

  private scopeFor(deviceId: number): Scope | null {
    const d = this.directory.getById(deviceId);
    if (!d) return null;
    const target = d.kind === "th_logger" ? (d.areaId !== null ? { scope: "area" as const, id: d.areaId } : null) : d.lineId !== null ? { scope: "line" as const, id: d.lineId } : null;
    if (!target) return null;
    const key = `${target.scope}:${target.id}`;
    let s = this.scopes.get(key);
    if (!s) this.scopes.set(key, (s = { ...target, series: new Map() }));
    return s;
  }

  /** The snapshots due now (and forgets their samples). */
  take(nowMs: number): Array<{ topic: string; snapshot: LiveSnapshot }> {
    const out: Array<{ topic: string; snapshot: LiveSnapshot }> = [];
    for (const s of this.scopes.values()) {
      if (s.series.size === 0) continue;
      const series = [...s.series.values()].map((x) => {
        const samples = x.samples.sort((a, b) => a[0] - b[0]).slice(-LIVE_MAX_SAMPLES_PER_SERIES);
        return { deviceId: x.deviceId, channel: x.channel, samples };
      });
      s.series = new Map();
      out.push({
        topic: s.scope === "line" ? internalTopics.liveLine(s.id) : internalTopics.liveArea(s.id),
        snapshot: { v: LIVE_SNAPSHOT_VERSION, scope: s.scope, id: s.id, ts: nowMs, series },
      });
    }
    return out;
  }
}
