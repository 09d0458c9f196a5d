// The browser's copy of recent live readings: one fixed-size ring buffer per sensor channel,
// fed by the live stream (and seeded from a snapshot or history). Fixed capacity and a time
// window keep memory flat however long a page stays open (the wallboard runs for days).
// Subscribers are told about changes at most every `notifyEveryMs`, so a plant-wide stream
// with a dozen snapshots a second re-renders the page a few times a second, not per message.

export type Sample = [number, number];
export type SeriesInput = { deviceId: number; channel: string; samples: ReadonlyArray<readonly [number, number]> };

export const seriesKey = (deviceId: number, channel: string) => `${deviceId}:${channel}`;

class Ring {
  private readonly ts: Float64Array;
  private readonly v: Float64Array;
  private start = 0;
  length = 0;
  constructor(readonly capacity: number) {
    this.ts = new Float64Array(capacity);
    this.v = new Float64Array(capacity);
  }
  private at(i: number) {
    return (this.start + i) % this.capacity;
  }
  lastTs(): number {
    return this.length ? this.ts[this.at(this.length - 1)] : -Infinity;
  }
  last(): Sample | null {
    if (!this.length) return null;
    const j = this.at(this.length - 1);
    return [this.ts[j], this.v[j]];
  }
  push(ts: number, value: number) {
    if (this.length < this.capacity) {
      const j = this.at(this.length);
      this.ts[j] = ts;
      this.v[j] = value;
      this.length++;
    } else {
      this.ts[this.start] = ts;
      this.v[this.start] = value;
      this.start = (this.start + 1) % this.capacity;
    }
  }
  dropBefore(ts: number) {
    while (this.length && this.ts[this.start] < ts) {
      this.start = (this.start + 1) % this.capacity;
      this.length--;
    }
  }
  clear() {
    this.start = 0;
    this.length = 0;
  }
  /** samples with ts ≥ fromTs, oldest first */
  since(fromTs: number): Sample[] {
    const out: Sample[] = [];
    for (let i = 0; i < this.length; i++) {
      const j = this.at(i);
      if (this.ts[j] >= fromTs) out.push([this.ts[j], this.v[j]]);
    }
    return out;
  }
}

export class LiveStore {
  private readonly rings = new Map<string, Ring>();
  private readonly listeners = new Set<() => void>();
  private timer: ReturnType<typeof setTimeout> | null = null;
  private version = 0;

  constructor(
    readonly windowMs: number,
    readonly capacityPerSeries = 2_000,
    private readonly notifyEveryMs = 250,
  ) {}

  /** Appends samples newer than what each series holds (older or repeated ones are skipped). */
  ingest(series: ReadonlyArray<SeriesInput>) {
    let changed = false;
    for (const s of series) {
      if (!s.samples.length) continue;
      const key = seriesKey(s.deviceId, s.channel);
      let ring = this.rings.get(key);
      if (!ring) this.rings.set(key, (ring = new Ring(this.capacityPerSeries)));
      let lastTs = ring.lastTs();
      for (const [ts, value] of s.samples) {
        if (ts > lastTs && Number.isFinite(value)) {
          ring.push(ts, value);
          lastTs = ts;
          changed = true;
        }
      }
      ring.dropBefore(lastTs - this.windowMs);
    }
    if (changed) this.changed();
  }

  /** Replaces everything with a fresh snapshot (e.g. after a long disconnect). */
  reset(series: ReadonlyArray<SeriesInput>) {
    for (const ring of this.rings.values()) ring.clear();
    this.ingest(series);
    this.changed();
  }

  latest(deviceId: number, channel: string): Sample | null {
    return this.rings.get(seriesKey(deviceId, channel))?.last() ?? null;
  }

  since(deviceId: number, channel: string, fromTs: number): Sample[] {
    return this.rings.get(seriesKey(deviceId, channel))?.since(fromTs) ?? [];
  }

  seriesCount(): number {
    return this.rings.size;
  }

  subscribe = (listener: () => void) => {
    this.listeners.add(listener);
    return () => {
      this.listeners.delete(listener);
    };
  };

  getVersion = () => this.version;

  private changed() {
    if (this.timer) return;
    this.timer = setTimeout(() => {
      this.timer = null;
      this.version++;
      for (const l of this.listeners) l();
    }, this.notifyEveryMs);
  }

  /** Stops a pending notification (the data stays: React may mount the same store again). */
  dispose() {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
  }
}
