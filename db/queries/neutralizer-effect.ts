// The effect of a neutralizer from line data: charge at the point before it vs the point after
// it, while the line runs, over the last shift, day and week (1-minute rollups).
import { and, eq, gte, inArray, lt } from "drizzle-orm";
import type { Db } from "../client";
import { devices, neutralizers, points, rollup1m } from "../schema";
import { effectFraction } from "../../lib/physics/neutralizer";
import { lastCompletedShift } from "../../lib/plant-time";
import { DAY_MS } from "../../lib/vocabulary";
import { getPlantSettings } from "./plant-settings";

export type EffectWindow = { key: string; label: string; fromTs: number; toTs: number };

export type EffectFigure = {
  key: string;
  label: string;
  fromTs: number;
  toTs: number;
  /** 1 − mean|after| / mean|before| over running minutes; null when it cannot be computed */
  effect: number | null;
  meanBeforeKv: number | null;
  meanAfterKv: number | null;
  runningMinutes: number;
  reason: string | null;
};

export type NeutralizerTopology = {
  neutralizerId: number;
  lineId: number;
  beforePoint: { id: number; name: string; meterId: number | null } | null;
  afterPoint: { id: number; name: string; meterId: number | null };
  gatewayId: number | null;
};

export async function getNeutralizerTopology(db: Db, neutralizerIds: number[]): Promise<Map<number, NeutralizerTopology>> {
  const out = new Map<number, NeutralizerTopology>();
  if (!neutralizerIds.length) return out;
  const ns = await db
    .select({ id: neutralizers.id, pointId: neutralizers.pointId, lineId: points.lineId, position: points.position, pointName: points.name })
    .from(neutralizers)
    .innerJoin(points, eq(points.id, neutralizers.pointId))
    .where(inArray(neutralizers.id, neutralizerIds));
  if (!ns.length) return out;
  const lineIds = [...new Set(ns.map((n) => n.lineId))];
  const [pts, devs] = await Promise.all([
    db.select({ id: points.id, lineId: points.lineId, position: points.position, name: points.name }).from(points).where(inArray(points.lineId, lineIds)),
    db
      .select({ id: devices.id, kind: devices.kind, pointId: devices.pointId, lineId: devices.lineId })
      .from(devices)
      .where(and(eq(devices.enabled, true), inArray(devices.kind, ["field_meter", "speed_gateway"]))),
  ]);
  const meterOf = (pointId: number) => devs.find((d) => d.kind === "field_meter" && d.pointId === pointId)?.id ?? null;
  for (const n of ns) {
    if (n.pointId === null) continue;
    const before = pts.filter((p) => p.lineId === n.lineId && p.position < n.position).sort((a, b) => b.position - a.position)[0];
    out.set(n.id, {
      neutralizerId: n.id,
      lineId: n.lineId,
      beforePoint: before ? { id: before.id, name: before.name, meterId: meterOf(before.id) } : null,
      afterPoint: { id: n.pointId, name: n.pointName, meterId: meterOf(n.pointId) },
      gatewayId: devs.find((d) => d.kind === "speed_gateway" && d.lineId === n.lineId)?.id ?? null,
    });
  }
  return out;
}

/**
 * The effect of each neutralizer over each window, from the 1-minute rollups: the minute means
 * of charge at the point before it and at its own point, kept only for minutes in which both
 * meters reported and the line ran (the speed gateway's running flag averaged > 0.5 in that
 * minute; a line without a gateway counts as running, as in the live rules), then
 * effectFraction (1 − mean|after| / mean|before|).
 */
export async function computeNeutralizerEffects(db: Db, neutralizerIds: number[], windows: EffectWindow[]): Promise<Map<number, EffectFigure[]>> {
  const out = new Map<number, EffectFigure[]>();
  const topo = await getNeutralizerTopology(db, neutralizerIds);
  const empty = (w: EffectWindow, reason: string): EffectFigure => ({ ...w, effect: null, meanBeforeKv: null, meanAfterKv: null, runningMinutes: 0, reason });
  for (const id of neutralizerIds) {
    const t = topo.get(id);
    if (!t) out.set(id, windows.map((w) => empty(w, "Not attached to a measuring point.")));
    else if (!t.beforePoint) out.set(id, windows.map((w) => empty(w, "No measuring point before it on the line.")));
    else if (t.beforePoint.meterId === null || t.afterPoint.meterId === null) out.set(id, windows.map((w) => empty(w, "A field meter before or after it is missing.")));
  }
  const live = [...topo.values()].filter((t) => t.beforePoint?.meterId && t.afterPoint.meterId);
  if (!live.length || !windows.length) return out;

  const fromTs = Math.min(...windows.map((w) => w.fromTs));
  const toTs = Math.max(...windows.map((w) => w.toTs));
  const meterIds = [...new Set(live.flatMap((t) => [t.beforePoint!.meterId!, t.afterPoint.meterId!]))];
  const gatewayIds = [...new Set(live.map((t) => t.gatewayId).filter((g): g is number => g !== null))];
  const series = await db
    .select({ deviceId: rollup1m.deviceId, channel: rollup1m.channel, bucketTs: rollup1m.bucketTs, sum: rollup1m.sum, count: rollup1m.count })
    .from(rollup1m)
    .where(
      and(
        inArray(rollup1m.deviceId, [...meterIds, ...gatewayIds]),
        inArray(rollup1m.channel, ["charge_kv", "running"]),
        gte(rollup1m.bucketTs, fromTs),
        lt(rollup1m.bucketTs, toTs),
      ),
    );
  const means = new Map<string, Map<number, number>>();
  for (const r of series) {
    if (!r.count) continue;
    const key = `${r.deviceId}:${r.channel}`;
    let m = means.get(key);
    if (!m) means.set(key, (m = new Map()));
    m.set(Number(r.bucketTs), Number(r.sum) / Number(r.count));
  }
  for (const t of live) {
    const before = means.get(`${t.beforePoint!.meterId}:charge_kv`) ?? new Map<number, number>();
    const after = means.get(`${t.afterPoint.meterId}:charge_kv`) ?? new Map<number, number>();
    const running = t.gatewayId !== null ? (means.get(`${t.gatewayId}:running`) ?? new Map<number, number>()) : null;
    out.set(
      t.neutralizerId,
      windows.map((w) => {
        const b: number[] = [];
        const a: number[] = [];
        for (const [bucket, bv] of before) {
          if (bucket < w.fromTs || bucket >= w.toTs) continue;
          const av = after.get(bucket);
          if (av === undefined) continue;
          if (running !== null && !((running.get(bucket) ?? 0) > 0.5)) continue;
          b.push(bv);
          a.push(av);
        }
        if (!b.length) return empty(w, running !== null ? "The line did not run with both meters reporting." : "No readings from both meters.");
        const effect = effectFraction(b, a);
        const meanAbs = (xs: number[]) => xs.reduce((s, x) => s + Math.abs(x), 0) / xs.length;
        return {
          ...w,
          effect,
          meanBeforeKv: meanAbs(b),
          meanAfterKv: meanAbs(a),
          runningMinutes: b.length,
          reason: effect === null ? "No charge before it to remove." : null,
        };
      }),
    );
  }
  return out;
}


export async function effectWindows(db: Db, nowMs: number): Promise<EffectWindow[]> {
  const plant = await getPlantSettings(db);
  const shift = lastCompletedShift(nowMs, plant);
  return [
    { key: "shift", label: `Last shift (${shift.name})`, fromTs: shift.startTs, toTs: shift.endTs },
    { key: "day", label: "Last 24 h", fromTs: nowMs - DAY_MS, toTs: nowMs },
    { key: "week", label: "Last 7 days", fromTs: nowMs - 7 * DAY_MS, toTs: nowMs },
  ];
}
