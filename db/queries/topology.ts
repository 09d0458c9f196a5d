// The plant as the rules engine sees it (lib/rules Topology), built from the database, plus a
// directory of every alert subject (what a subjectKey means: hall, line, point, device,
// neutralizer, and a plain label) so stored alerts carry their place and e-mails can say where.
//
// Mapping (db → engine):
//   area  → climateSensorKey: the hall's temperature/humidity logger (first enabled th_logger)
//   line  → runningSensorKey = speedSensorKey: the line's speed gateway (sends running + speed)
//   point → fieldMeterSensorKey: the enabled field meter aimed at that point
//   neutralizer (serves point P, sitting just upstream of it) → afterPointId P, beforePointId the
//           point before P on the same line; a neutralizer at the first point has no point
//           before it, so its effect cannot be judged from charge and it is left out.
// Disabled devices are left out: a sensor that is switched off is neither judged nor silent.
//
// Parents (lib/alerts/dependency-hold.ts): each enabled Sparkplug edge node, with the devices its
// mapped metrics feed, and the whole data feed (every enabled device: a broker or worker outage
// silences them all). Their alerts' subjects are "gateway:<key>".
import { and, asc, eq, isNotNull } from "drizzle-orm";
import type { Db } from "../client";
import { areas, devices, edgeNodes, gatewayMetrics, lines, neutralizers, points } from "../schema";
import { subjectKeyOfParent, type DependencyParent } from "../../lib/alerts/dependency-hold";
import {
  subjectKeyOfArea,
  subjectKeyOfNeutralizer,
  subjectKeyOfPoint,
  subjectKeyOfSensor,
  type Topology,
} from "../../lib/rules";

export type AlertSubject = {
  subjectKey: string;
  areaId: number | null;
  lineId: number | null;
  pointId: number | null;
  deviceId: number | null;
  neutralizerId: number | null;
  /** "Press Hall › Gravure Press 1 › Unwind" */
  where: string;
  /** first line of the hall for hall-wide subjects: the chart to link to */
  linkLineId: number | null;
};

export type PlantTopology = {
  topology: Topology;
  subjects: Map<string, AlertSubject>;
  /** device code → id */
  deviceIdByCode: Map<string, number>;
  areaNames: Map<number, string>;
  lineNames: Map<number, { name: string; areaId: number }>;
  pointNames: Map<number, { name: string; lineId: number }>;
  /** What sensors sit behind (edge nodes, the data feed), for holding their silences. */
  parents: DependencyParent[];
};

/** The parent key of the whole data feed. */
export const FEED_PARENT_KEY = "feed";

export async function loadPlantTopology(db: Db): Promise<PlantTopology> {
  const [areaRows, lineRows, pointRows, deviceRows, neutralizerRows, edgeRows] = await Promise.all([
    db.select({ id: areas.id, name: areas.name }).from(areas).orderBy(asc(areas.displayOrder), asc(areas.id)),
    db.select({ id: lines.id, areaId: lines.areaId, name: lines.name }).from(lines).orderBy(asc(lines.displayOrder), asc(lines.id)),
    db.select({ id: points.id, lineId: points.lineId, name: points.name, position: points.position }).from(points).orderBy(asc(points.lineId), asc(points.position)),
    db
      .select({ id: devices.id, code: devices.code, kind: devices.kind, pointId: devices.pointId, lineId: devices.lineId, areaId: devices.areaId, enabled: devices.enabled })
      .from(devices)
      .orderBy(asc(devices.id)),
    db.select({ id: neutralizers.id, tag: neutralizers.tag, pointId: neutralizers.pointId, state: neutralizers.state }).from(neutralizers).orderBy(asc(neutralizers.id)),
    db
      .selectDistinct({ code: edgeNodes.code, label: edgeNodes.label, deviceId: gatewayMetrics.targetDeviceId })
      .from(edgeNodes)
      .innerJoin(gatewayMetrics, eq(gatewayMetrics.edgeNodeId, edgeNodes.id))
      .where(and(eq(edgeNodes.enabled, true), isNotNull(gatewayMetrics.targetDeviceId))),
  ]);

  const areaNames = new Map(areaRows.map((a) => [a.id, a.name]));
  const lineNames = new Map(lineRows.filter((l) => areaNames.has(l.areaId)).map((l) => [l.id, { name: l.name, areaId: l.areaId }]));
  const pointNames = new Map(pointRows.filter((p) => lineNames.has(p.lineId)).map((p) => [p.id, { name: p.name, lineId: p.lineId }]));
  const deviceIdByCode = new Map(deviceRows.map((d) => [d.code, d.id]));
  const enabled = deviceRows.filter((d) => d.enabled);

  const loggerOf = new Map<number, (typeof deviceRows)[number]>();
  for (const d of enabled) if (d.kind === "th_logger" && d.areaId !== null && !loggerOf.has(d.areaId)) loggerOf.set(d.areaId, d);
  const gatewayOf = new Map<number, (typeof deviceRows)[number]>();
  for (const d of enabled) if (d.kind === "speed_gateway" && d.lineId !== null && !gatewayOf.has(d.lineId)) gatewayOf.set(d.lineId, d);
  const meterOf = new Map<number, (typeof deviceRows)[number]>();
  for (const d of enabled) if (d.kind === "field_meter" && d.pointId !== null && pointNames.has(d.pointId) && !meterOf.has(d.pointId)) meterOf.set(d.pointId, d);

  const firstLineOfArea = new Map<number, number>();
  for (const l of lineRows) if (!firstLineOfArea.has(l.areaId)) firstLineOfArea.set(l.areaId, l.id);

  const topology: Topology = {
    areas: areaRows.map((a) => ({ areaId: a.id, name: a.name, climateSensorKey: loggerOf.get(a.id)?.code ?? null })),
    lines: [...lineNames.entries()].map(([lineId, l]) => ({
      lineId,
      areaId: l.areaId,
      name: l.name,
      pointIds: pointRows.filter((p) => p.lineId === lineId).map((p) => p.id),
      runningSensorKey: gatewayOf.get(lineId)?.code ?? null,
      speedSensorKey: gatewayOf.get(lineId)?.code ?? null,
    })),
    points: [...pointNames.entries()].map(([pointId, p]) => ({ pointId, name: p.name, fieldMeterSensorKey: meterOf.get(pointId)?.code ?? null })),
    neutralizers: [],
  };

  const subjects = new Map<string, AlertSubject>();
  const whereOf = (areaId: number | null, lineId: number | null, pointId: number | null) =>
    [areaId !== null ? areaNames.get(areaId) : null, lineId !== null ? lineNames.get(lineId)?.name : null, pointId !== null ? pointNames.get(pointId)?.name : null]
      .filter((x): x is string => typeof x === "string")
      .join(" › ");

  for (const a of areaRows) {
    subjects.set(subjectKeyOfArea(a.id), {
      subjectKey: subjectKeyOfArea(a.id),
      areaId: a.id,
      lineId: null,
      pointId: null,
      deviceId: loggerOf.get(a.id)?.id ?? null,
      neutralizerId: null,
      where: a.name,
      linkLineId: firstLineOfArea.get(a.id) ?? null,
    });
  }
  for (const [pointId, p] of pointNames) {
    const areaId = lineNames.get(p.lineId)!.areaId;
    subjects.set(subjectKeyOfPoint(pointId), {
      subjectKey: subjectKeyOfPoint(pointId),
      areaId,
      lineId: p.lineId,
      pointId,
      deviceId: meterOf.get(pointId)?.id ?? null,
      neutralizerId: null,
      where: whereOf(areaId, p.lineId, pointId),
      linkLineId: p.lineId,
    });
  }
  for (const d of deviceRows) {
    const pointId = d.pointId !== null && pointNames.has(d.pointId) ? d.pointId : null;
    const lineId = pointId !== null ? pointNames.get(pointId)!.lineId : d.lineId !== null && lineNames.has(d.lineId) ? d.lineId : null;
    const areaId = lineId !== null ? lineNames.get(lineId)!.areaId : d.areaId !== null && areaNames.has(d.areaId) ? d.areaId : null;
    const place = whereOf(areaId, lineId, pointId);
    subjects.set(subjectKeyOfSensor(d.code), {
      subjectKey: subjectKeyOfSensor(d.code),
      areaId,
      lineId,
      pointId,
      deviceId: d.id,
      neutralizerId: null,
      where: place ? `${place} (sensor ${d.code})` : `sensor ${d.code}`,
      linkLineId: lineId ?? (areaId !== null ? firstLineOfArea.get(areaId) ?? null : null),
    });
  }
  for (const n of neutralizerRows) {
    if (n.pointId === null || n.state === "removed") continue;
    const after = pointNames.get(n.pointId);
    if (!after) continue;
    const onLine = pointRows.filter((p) => p.lineId === after.lineId);
    const idx = onLine.findIndex((p) => p.id === n.pointId);
    const areaId = lineNames.get(after.lineId)!.areaId;
    subjects.set(subjectKeyOfNeutralizer(n.id), {
      subjectKey: subjectKeyOfNeutralizer(n.id),
      areaId,
      lineId: after.lineId,
      pointId: n.pointId,
      deviceId: null,
      neutralizerId: n.id,
      where: `${whereOf(areaId, after.lineId, n.pointId)} (neutralizer ${n.tag})`,
      linkLineId: after.lineId,
    });
    if (idx <= 0) continue;
    topology.neutralizers.push({ neutralizerId: n.id, name: n.tag, beforePointId: onLine[idx - 1].id, afterPointId: n.pointId });
  }

  // parents: edge nodes (their mapped devices) and the whole feed
  const codeOfId = new Map(enabled.map((d) => [d.id, d.code]));
  const byNode = new Map<string, { label: string; codes: Set<string> }>();
  for (const r of edgeRows) {
    const code = r.deviceId !== null ? codeOfId.get(r.deviceId) : undefined;
    if (code === undefined) continue;
    const n = byNode.get(r.code) ?? { label: r.label, codes: new Set<string>() };
    n.codes.add(code);
    byNode.set(r.code, n);
  }
  const parents: DependencyParent[] = [];
  const placeOfCodes = (codes: readonly string[]) => {
    const places = codes.map((c) => subjects.get(subjectKeyOfSensor(c))).filter((x): x is AlertSubject => x !== undefined);
    const lineIds = new Set(places.map((p) => p.lineId));
    const areaIds = new Set(places.map((p) => p.areaId));
    const lineId = lineIds.size === 1 ? [...lineIds][0] : null;
    const areaId = areaIds.size === 1 ? [...areaIds][0] : null;
    return { lineId, areaId };
  };
  for (const [code, n] of byNode) {
    const sensorKeys = [...n.codes].sort();
    const place = placeOfCodes(sensorKeys);
    parents.push({ key: `edge:${code}`, name: `Edge node ${n.label}`, kind: "edge_node", sensorKeys, ...place });
  }
  const feedCodes = enabled.map((d) => d.code).sort();
  parents.push({ key: FEED_PARENT_KEY, name: "The data feed (broker or worker)", kind: "feed", sensorKeys: feedCodes, areaId: null, lineId: null });
  for (const p of parents) {
    const where = p.lineId != null ? `${whereOf(p.areaId ?? null, p.lineId, null)} (${p.name.toLowerCase()})` : p.areaId != null ? `${whereOf(p.areaId, null, null)} (${p.name.toLowerCase()})` : p.name;
    subjects.set(subjectKeyOfParent(p.key), {
      subjectKey: subjectKeyOfParent(p.key),
      areaId: p.areaId ?? null,
      lineId: p.lineId ?? null,
      pointId: null,
      deviceId: null,
      neutralizerId: null,
      where,
      linkLineId: p.lineId ?? (p.areaId != null ? firstLineOfArea.get(p.areaId) ?? null : null),
    });
  }

  return { topology, subjects, deviceIdByCode, areaNames, lineNames, pointNames, parents };
}

/**
 * A signature of what the topology is built from; the alerts runner reloads when it changes.
 * Cheap aggregate reads (a few hundred rows at most).
 */
export async function readTopologySignature(db: Db): Promise<string> {
  const [d, p, n, l, g] = await Promise.all([
    db.select({ id: devices.id, code: devices.code, pointId: devices.pointId, lineId: devices.lineId, areaId: devices.areaId, enabled: devices.enabled }).from(devices),
    db.select({ id: points.id, lineId: points.lineId, position: points.position }).from(points),
    db.select({ id: neutralizers.id, pointId: neutralizers.pointId, state: neutralizers.state }).from(neutralizers),
    db.select({ id: lines.id, areaId: lines.areaId }).from(lines),
    db.selectDistinct({ node: gatewayMetrics.edgeNodeId, target: gatewayMetrics.targetDeviceId }).from(gatewayMetrics).where(isNotNull(gatewayMetrics.targetDeviceId)),
  ]);
  // a small rolling hash over the rows (order-independent within each table)
  const h = (rows: unknown[]) => rows.map((r) => JSON.stringify(r)).sort().join("|");
  const text = [h(d), h(p), h(n), h(l), h(g)].join("#");
  let x = 2166136261;
  for (let i = 0; i < text.length; i++) {
    x ^= text.charCodeAt(i);
    x = Math.imul(x, 16777619) >>> 0;
  }
  return `${text.length}:${x.toString(16)}`;
}
