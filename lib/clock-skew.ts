// Clock skew of a device or edge node: how far its clock is from the server's, judged from
// when its live readings arrive. Each message gives offset = arrival − reading time, which is
// (server clock − device clock) + transit delay. Transit delay is never negative, so the smallest
// offset over a recent window is the best estimate of the skew alone (positive: the device clock
// is behind; negative: ahead). Uploads of buffered history are left out by the callers
// (Sparkplug historical metrics) or pass through harmlessly once live messages arrive again.
export const DEFAULT_CLOCK_SKEW_LIMIT_MS = 30_000;
export const CLOCK_WINDOW_MS = 5 * 60_000;

export const TIME_SOURCES = ["device", "arrival"] as const;
export type TimeSource = (typeof TIME_SOURCES)[number];
export const TIME_SOURCE_LABELS: Record<TimeSource, string> = {
  device: "Device time",
  arrival: "Arrival time (corrected by the measured skew)",
};

type Sample = { arrivalMs: number; offsetMs: number };

export class ClockSkewTracker {
  private readonly samples = new Map<string | number, Sample[]>();

  constructor(private readonly windowMs = CLOCK_WINDOW_MS) {}

  /**
   * Records one message: its arrival and the newest reading time it carried. Messages arriving
   * in the same second as the last one kept fold into it (the smaller offset stays), so a key
   * holds at most one sample per second of the window however fast its messages come, and
   * the estimate (the smallest offset in the window) is the same as over every message.
   */
  add(key: string | number, arrivalMs: number, readingMs: number): void {
    let list = this.samples.get(key);
    if (!list) this.samples.set(key, (list = []));
    const offsetMs = arrivalMs - readingMs;
    const last = list[list.length - 1];
    if (last && Math.floor(last.arrivalMs / 1000) === Math.floor(arrivalMs / 1000)) {
      if (offsetMs < last.offsetMs) last.offsetMs = offsetMs;
      return;
    }
    list.push({ arrivalMs, offsetMs });
    const cut = arrivalMs - this.windowMs;
    let drop = 0;
    while (drop < list.length - 1 && list[drop].arrivalMs < cut) drop++;
    if (drop > 0) list.splice(0, drop);
  }

  /** The skew estimate (ms; positive = the device clock is behind), or null with no samples. */
  skewMs(key: string | number): number | null {
    const list = this.samples.get(key);
    if (!list || list.length === 0) return null;
    let min = Infinity;
    for (const s of list) if (s.offsetMs < min) min = s.offsetMs;
    return min;
  }

  keys(): Array<string | number> {
    return [...this.samples.keys()];
  }
}

/** Whether a skew is past the limit either way. */
/** `limitMs` is the CLOCK_SKEW_LIMIT_MS setting (lib/settings.ts; DEFAULT_CLOCK_SKEW_LIMIT_MS unless set). */
export function isClockOff(skewMs: number | null | undefined, limitMs: number): boolean {
  return skewMs !== null && skewMs !== undefined && Math.abs(skewMs) > limitMs;
}

/** The time to store a reading under: the device's own, or shifted onto the server clock. */
export function readingTime(deviceTs: number, source: TimeSource, skewMs: number | null): number {
  return source === "arrival" && skewMs !== null ? Math.round(deviceTs + skewMs) : deviceTs;
}

/** "12 s behind", "3 min 5 s ahead" */
export function describeSkew(skewMs: number): string {
  const abs = Math.abs(Math.round(skewMs / 1000));
  const text = abs >= 60 ? `${Math.floor(abs / 60)} min ${abs % 60} s` : `${abs} s`;
  return abs === 0 ? "in step" : `${text} ${skewMs > 0 ? "behind" : "ahead"}`;
}
