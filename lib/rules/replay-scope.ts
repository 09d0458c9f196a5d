// What a replay of one rule kind within a scope needs (limits editor): the topology trimmed to
// the sensors involved, which sensors and channels to read, and the merge of their series into
// time order. Pure; db/use-cases/replay-rule-proposal.ts reads the data.
import type { Channel, Reading, RuleKind, Topology } from "./types";

export type ReplaySensor = { deviceId: number; code: string; channels: Channel[] };
export type ReplaySeries = { code: string; channel: Channel; ts: number[]; values: number[] };

/** The sensors (and channels) a replay of one kind within a scope needs, and the topology trimmed to them. */
export function scopeTopologyForReplay(
  topology: Topology,
  kind: RuleKind,
  scope: { pointId: number | null; lineId: number | null; areaId: number | null },
  flatChannel: Channel | null,
): Topology {
  const lineOfPoint = new Map<number, number>();
  for (const l of topology.lines) for (const p of l.pointIds) lineOfPoint.set(p, l.lineId);
  const areaOfLine = new Map(topology.lines.map((l) => [l.lineId, l.areaId]));
  const pointIn = (pointId: number) => {
    const lineId = lineOfPoint.get(pointId);
    const areaId = lineId !== undefined ? areaOfLine.get(lineId) : undefined;
    return (scope.pointId === null || scope.pointId === pointId) && (scope.lineId === null || scope.lineId === lineId) && (scope.areaId === null || scope.areaId === areaId);
  };
  const lineIn = (lineId: number) => scope.pointId === null && (scope.lineId === null || scope.lineId === lineId) && (scope.areaId === null || scope.areaId === areaOfLine.get(lineId));
  const areaIn = (areaId: number) => scope.pointId === null && scope.lineId === null && (scope.areaId === null || scope.areaId === areaId);

  const usesCharge = kind === "charge_high" || kind === "charge_rate" || kind === "effect_loss" || (kind === "sensor_flat" && flatChannel === "charge_kv") || kind === "sensor_silent";
  const usesClimate = kind === "rh_low" || kind === "rh_forecast" || (kind === "sensor_flat" && (flatChannel === "rh_pct" || flatChannel === "temp_c")) || kind === "sensor_silent";
  const pointsKept = new Set<number>();
  if (usesCharge) {
    for (const p of topology.points) if (pointIn(p.pointId)) pointsKept.add(p.pointId);
    if (kind === "effect_loss") for (const n of topology.neutralizers) if (pointsKept.has(n.afterPointId)) pointsKept.add(n.beforePointId);
  }
  const linesWithPoints = new Set([...pointsKept].map((p) => lineOfPoint.get(p)));
  const keepGateway = (lineId: number) =>
    (usesCharge && linesWithPoints.has(lineId)) || (kind === "sensor_silent" && lineIn(lineId)) || (kind === "sensor_flat" && flatChannel === "speed_mpm" && lineIn(lineId));
  return {
    areas: topology.areas.map((a) => ({ ...a, climateSensorKey: usesClimate && areaIn(a.areaId) ? a.climateSensorKey : null })),
    lines: topology.lines.map((l) => ({ ...l, runningSensorKey: keepGateway(l.lineId) ? l.runningSensorKey : null, speedSensorKey: keepGateway(l.lineId) ? l.speedSensorKey : null })),
    points: topology.points.map((p) => ({ ...p, fieldMeterSensorKey: pointsKept.has(p.pointId) ? p.fieldMeterSensorKey : null })),
    neutralizers: topology.neutralizers,
  };
}

export function replaySensors(topology: Topology, deviceIdByCode: ReadonlyMap<string, number>, kind: RuleKind, flatChannel: Channel | null): ReplaySensor[] {
  const out = new Map<string, Set<Channel>>();
  const add = (code: string | null, ch: Channel) => {
    if (code === null) return;
    const set = out.get(code) ?? new Set<Channel>();
    set.add(ch);
    out.set(code, set);
  };
  for (const p of topology.points) add(p.fieldMeterSensorKey, "charge_kv");
  for (const l of topology.lines) {
    add(l.runningSensorKey, "running");
    if (kind === "sensor_flat" && flatChannel === "speed_mpm") add(l.speedSensorKey, "speed_mpm");
  }
  for (const a of topology.areas) {
    add(a.climateSensorKey, "rh_pct");
    if (kind === "sensor_flat" && flatChannel === "temp_c") add(a.climateSensorKey, "temp_c");
  }
  const sensors: ReplaySensor[] = [];
  for (const [code, channels] of out) {
    const deviceId = deviceIdByCode.get(code);
    if (deviceId !== undefined) sensors.push({ deviceId, code, channels: [...channels] });
  }
  return sensors;
}

/** k-way merge of per-series arrays into time order (ties: series order, stable). */
export function mergeSeries(series: readonly ReplaySeries[]): Reading[] {
  const total = series.reduce((n, s) => n + s.ts.length, 0);
  const out = new Array<Reading>(total);
  const idx = new Array<number>(series.length).fill(0);
  for (let k = 0; k < total; k++) {
    let best = -1;
    let bestTs = Infinity;
    for (let j = 0; j < series.length; j++) {
      const i = idx[j];
      if (i < series[j].ts.length && series[j].ts[i] < bestTs) {
        bestTs = series[j].ts[i];
        best = j;
      }
    }
    const s = series[best];
    out[k] = { sensorKey: s.code, channel: s.channel, ts: s.ts[idx[best]], value: s.values[idx[best]] };
    idx[best]++;
  }
  return out;
}
