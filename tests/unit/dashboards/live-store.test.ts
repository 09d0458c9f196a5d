// The browser's live buffer (components/live/live-store.ts): bounded, ordered, time-windowed.
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { LiveStore } from "@/components/live/live-store";

beforeEach(() => vi.useFakeTimers());
afterEach(() => vi.useRealTimers());

const t0 = 1_767_225_600_000;
const series = (from: number, n: number, stepMs = 1000, deviceId = 5) => ({
  deviceId,
  channel: "charge_kv",
  samples: Array.from({ length: n }, (_, i) => [from + i * stepMs, i] as [number, number]),
});

describe("LiveStore", () => {
  it("appends in time order and skips repeats and older samples (a back-fill overlap)", () => {
    const s = new LiveStore(60_000);
    s.ingest([series(t0, 10)]);
    s.ingest([series(t0 + 5000, 10)]); // overlaps the last 5
    const all = s.since(5, "charge_kv", 0);
    expect(all.length).toBe(15);
    expect(all.map((x) => x[0])).toEqual(Array.from({ length: 15 }, (_, i) => t0 + i * 1000));
    expect(s.latest(5, "charge_kv")).toEqual([t0 + 14_000, 9]);
  });

  it("keeps only its window and never more than its capacity", () => {
    const s = new LiveStore(10_000, 50);
    s.ingest([series(t0, 100)]); // 100 s of data, 10 s window
    const kept = s.since(5, "charge_kv", 0);
    expect(kept.length).toBe(11);
    expect(kept[0][0]).toBe(t0 + 89_000);
    const dense = new LiveStore(3_600_000, 50);
    dense.ingest([series(t0, 500, 10)]);
    expect(dense.since(5, "charge_kv", 0).length).toBe(50);
    expect(dense.latest(5, "charge_kv")?.[0]).toBe(t0 + 4990);
  });

  it("stays the same size over a long run (no growth)", () => {
    const s = new LiveStore(15 * 60_000, 2000);
    for (let minute = 0; minute < 24 * 60; minute++) s.ingest([series(t0 + minute * 60_000, 60)]);
    expect(s.since(5, "charge_kv", 0).length).toBe(901);
    expect(s.seriesCount()).toBe(1);
  });

  it("tells subscribers once per burst, not once per message", () => {
    const s = new LiveStore(60_000, 100, 250);
    const listener = vi.fn();
    s.subscribe(listener);
    for (let i = 0; i < 20; i++) s.ingest([series(t0 + i * 1000, 1)]);
    expect(listener).not.toHaveBeenCalled();
    vi.advanceTimersByTime(260);
    expect(listener).toHaveBeenCalledTimes(1);
    expect(s.getVersion()).toBe(1);
    s.ingest([series(t0, 1)]); // nothing new
    vi.advanceTimersByTime(260);
    expect(listener).toHaveBeenCalledTimes(1);
  });

  it("drops non-finite values and starts over on reset", () => {
    const s = new LiveStore(60_000);
    s.ingest([{ deviceId: 1, channel: "rh_pct", samples: [[t0, Number.NaN], [t0 + 1000, 40]] }]);
    expect(s.since(1, "rh_pct", 0)).toEqual([[t0 + 1000, 40]]);
    s.reset([{ deviceId: 1, channel: "rh_pct", samples: [[t0 - 5000, 38]] }]);
    expect(s.since(1, "rh_pct", 0)).toEqual([[t0 - 5000, 38]]);
  });
});
