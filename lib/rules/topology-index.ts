/**
 * Look-up tables derived once from a (validated) Topology: where each point, sensor and
 * neutralizer sits, which sensor feeds which subject, and plain-English labels for messages.
 */
import type { SubjectLocation } from "./scope";
import type { Channel, Topology } from "./types";

export type PointInfo = {
  pointId: number;
  name: string;
  lineId: number;
  lineName: string;
  areaId: number;
  fieldMeterSensorKey: string | null;
  location: SubjectLocation;
  /** "Unwind on Gravure press" */
  label: string;
};

export type AreaInfo = {
  areaId: number;
  name: string;
  climateSensorKey: string | null;
  location: SubjectLocation;
};

export type LineInfo = {
  lineId: number;
  name: string;
  areaId: number;
  runningSensorKey: string | null;
};

export type NeutralizerInfo = {
  neutralizerId: number;
  name: string;
  lineId: number;
  before: PointInfo;
  after: PointInfo;
  location: SubjectLocation;
  label: string;
};

export type SensorInfo = {
  sensorKey: string;
  location: SubjectLocation;
  /** The line whose running state gates line-dependent rules on this sensor, if any. */
  lineId: number | null;
  /** Channels this sensor is expected to send, from its roles. */
  channels: ReadonlySet<Channel>;
  /** "fm-gp-unwind (Unwind on Gravure press)" */
  label: string;
};

export type TopologyIndex = {
  points: PointInfo[];
  areas: AreaInfo[];
  lines: LineInfo[];
  neutralizers: NeutralizerInfo[];
  sensors: SensorInfo[];
  lineById: ReadonlyMap<number, LineInfo>;
  sensorByKey: ReadonlyMap<string, SensorInfo>;
  /** running sensor key -> line ids it reports for */
  linesByRunningSensor: ReadonlyMap<string, number[]>;
};

type SensorDraft = {
  sensorKey: string;
  point?: PointInfo;
  line?: LineInfo;
  area?: AreaInfo;
  channels: Set<Channel>;
  roles: string[];
};

export function buildTopologyIndex(topology: Topology): TopologyIndex {
  const areaById = new Map<number, AreaInfo>();
  for (const area of topology.areas) {
    areaById.set(area.areaId, {
      areaId: area.areaId,
      name: area.name,
      climateSensorKey: area.climateSensorKey,
      location: { areaId: area.areaId },
    });
  }
  const lineById = new Map<number, LineInfo>();
  const pointPlace = new Map<number, { line: LineInfo }>();
  for (const line of topology.lines) {
    const info: LineInfo = {
      lineId: line.lineId,
      name: line.name,
      areaId: line.areaId,
      runningSensorKey: line.runningSensorKey,
    };
    lineById.set(line.lineId, info);
    for (const pointId of line.pointIds) pointPlace.set(pointId, { line: info });
  }
  const pointById = new Map<number, PointInfo>();
  for (const point of topology.points) {
    const place = pointPlace.get(point.pointId);
    if (place === undefined) continue; // rejected by topologySchema; skipped defensively
    pointById.set(point.pointId, {
      pointId: point.pointId,
      name: point.name,
      lineId: place.line.lineId,
      lineName: place.line.name,
      areaId: place.line.areaId,
      fieldMeterSensorKey: point.fieldMeterSensorKey,
      location: { pointId: point.pointId, lineId: place.line.lineId, areaId: place.line.areaId },
      label: `${point.name} on ${place.line.name}`,
    });
  }
  const neutralizers: NeutralizerInfo[] = [];
  for (const n of topology.neutralizers) {
    const before = pointById.get(n.beforePointId);
    const after = pointById.get(n.afterPointId);
    if (before === undefined || after === undefined) continue;
    neutralizers.push({
      neutralizerId: n.neutralizerId,
      name: n.name,
      lineId: after.lineId,
      before,
      after,
      location: after.location,
      label: `${n.name} (between ${before.name} and ${after.name} on ${after.lineName})`,
    });
  }

  const drafts = new Map<string, SensorDraft>();
  const draftFor = (sensorKey: string): SensorDraft => {
    let draft = drafts.get(sensorKey);
    if (draft === undefined) {
      draft = { sensorKey, channels: new Set(), roles: [] };
      drafts.set(sensorKey, draft);
    }
    return draft;
  };
  const linesByRunningSensor = new Map<string, number[]>();
  for (const point of pointById.values()) {
    if (point.fieldMeterSensorKey === null) continue;
    const d = draftFor(point.fieldMeterSensorKey);
    d.point ??= point;
    d.channels.add("charge_kv");
    d.roles.push(point.label);
  }
  for (const line of topology.lines) {
    const info = lineById.get(line.lineId);
    if (info === undefined) continue;
    if (line.runningSensorKey !== null) {
      const d = draftFor(line.runningSensorKey);
      d.line ??= info;
      d.channels.add("running");
      d.roles.push(`${info.name} running`);
      const list = linesByRunningSensor.get(line.runningSensorKey) ?? [];
      list.push(line.lineId);
      linesByRunningSensor.set(line.runningSensorKey, list);
    }
    if (line.speedSensorKey !== null) {
      const d = draftFor(line.speedSensorKey);
      d.line ??= info;
      d.channels.add("speed_mpm");
      d.roles.push(`${info.name} speed`);
    }
  }
  for (const area of areaById.values()) {
    if (area.climateSensorKey === null) continue;
    const d = draftFor(area.climateSensorKey);
    d.area ??= area;
    d.channels.add("rh_pct");
    d.channels.add("temp_c");
    d.roles.push(area.name);
  }

  const sensors: SensorInfo[] = [];
  for (const d of drafts.values()) {
    // The most specific role gives the location (field meter > line gateway > climate logger).
    const location: SubjectLocation =
      d.point?.location ??
      (d.line !== undefined ? { lineId: d.line.lineId, areaId: d.line.areaId } : undefined) ??
      d.area?.location ??
      {};
    const lineId = d.point?.lineId ?? d.line?.lineId ?? null;
    sensors.push({
      sensorKey: d.sensorKey,
      location,
      lineId,
      channels: d.channels,
      label: `${d.sensorKey} (${[...new Set(d.roles)].join(", ")})`,
    });
  }

  const byNumber = <T>(get: (x: T) => number) => (a: T, b: T) => get(a) - get(b);
  return {
    points: [...pointById.values()].sort(byNumber((p) => p.pointId)),
    areas: [...areaById.values()].sort(byNumber((a) => a.areaId)),
    lines: [...lineById.values()].sort(byNumber((l) => l.lineId)),
    neutralizers: neutralizers.sort(byNumber((n) => n.neutralizerId)),
    sensors: sensors.sort((a, b) => (a.sensorKey < b.sensorKey ? -1 : a.sensorKey > b.sensorKey ? 1 : 0)),
    lineById,
    sensorByKey: new Map(sensors.map((s) => [s.sensorKey, s])),
    linesByRunningSensor,
  };
}
