// What the Floor and the wallboard show for a hall, a line and a point, computed from the
// snapshot's structure and the live store: current value, state against the limit, trend.
import type { FloorArea, FloorLine, FloorPoint } from "@/lib/views/floor";
import type { LiveStore, Sample } from "@/components/live/live-store";
import { absoluteHumidityGPerM3, dewPointC } from "@/lib/physics/psychrometrics";
import { pointState } from "@/lib/point-state";
import { worstState, type PointState } from "@/lib/vocabulary";

export const TREND_MS = 15 * 60_000;

export type PointView = {
  point: FloorPoint;
  value: number | null;
  ts: number | null;
  state: PointState;
  trend: Sample[];
};

export type RunState = "running" | "stopped" | "silent" | "unknown";

export type LineView = {
  line: FloorLine;
  run: RunState;
  speedMpm: number | null;
  points: PointView[];
  worst: PointState;
};

export type HallView = {
  area: FloorArea;
  tempC: number | null;
  rhPct: number | null;
  dewPointC: number | null;
  absHumidityGPerM3: number | null;
  ts: number | null;
  rhState: PointState;
  rhTrend: Sample[];
  lines: LineView[];
};

const SPEED_SILENT_MS = 120_000;

export function pointView(p: FloorPoint, store: LiveStore, now: number): PointView {
  const dev = p.fieldMeter?.deviceId;
  const latest = dev !== undefined ? store.latest(dev, "charge_kv") : null;
  const lastTs = latest?.[0] ?? null;
  return {
    point: p,
    value: latest?.[1] ?? null,
    ts: lastTs ?? p.fieldMeter?.lastSeenTs ?? null,
    state: pointState({
      value: latest?.[1] ?? null,
      lastTs,
      nowMs: now,
      limit: p.limit ? { direction: "high", limit: p.limit.limitKv } : null,
      shelved: p.shelved,
    }),
    trend: dev !== undefined ? store.since(dev, "charge_kv", now - TREND_MS) : [],
  };
}

export function lineView(l: FloorLine, store: LiveStore, now: number): LineView {
  const gw = l.speedGateway?.deviceId;
  const running = gw !== undefined ? store.latest(gw, "running") : null;
  const speed = gw !== undefined ? store.latest(gw, "speed_mpm") : null;
  let run: RunState = "unknown";
  if (gw !== undefined) {
    const newest = Math.max(running?.[0] ?? -Infinity, speed?.[0] ?? -Infinity);
    if (now - newest > SPEED_SILENT_MS) run = "silent";
    else if (running) run = running[1] >= 0.5 ? "running" : "stopped";
    else if (speed) run = speed[1] > 0 ? "running" : "stopped";
  }
  const points = l.points.map((p) => pointView(p, store, now));
  return { line: l, run, speedMpm: speed?.[1] ?? null, points, worst: worstState(points.map((p) => p.state)) };
}

export function hallView(a: FloorArea, store: LiveStore, now: number): HallView {
  const dev = a.logger?.deviceId;
  const t = dev !== undefined ? store.latest(dev, "temp_c") : null;
  const rh = dev !== undefined ? store.latest(dev, "rh_pct") : null;
  const ts = rh?.[0] ?? t?.[0] ?? null;
  let dew: number | null = null;
  let abs: number | null = null;
  if (t && rh && rh[1] > 0) {
    try {
      dew = dewPointC(t[1], rh[1]);
      abs = absoluteHumidityGPerM3(t[1], rh[1]);
    } catch {
      dew = null;
    }
  }
  return {
    area: a,
    tempC: t?.[1] ?? null,
    rhPct: rh?.[1] ?? null,
    dewPointC: dew,
    absHumidityGPerM3: abs,
    ts: ts ?? a.logger?.lastSeenTs ?? null,
    rhState: pointState({ value: rh?.[1] ?? null, lastTs: rh?.[0] ?? null, nowMs: now, limit: { direction: "low", limit: a.rhLimit.limitPct } }),
    rhTrend: dev !== undefined ? store.since(dev, "rh_pct", now - TREND_MS) : [],
    lines: a.lines.map((l) => lineView(l, store, now)),
  };
}
