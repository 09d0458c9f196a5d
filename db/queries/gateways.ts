// Read model and changes of the Gateways page: edge nodes with their devices, metrics (mapped or
// not) and recent refusals; the devices a metric may feed; registering an edge node; saving a
// mapping; each device's time source (the Devices page's clock part).
import { desc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { areas, deviceClocks, devices, edgeNodes, gatewayDevices, gatewayMetrics, gatewayRejections, lines, points } from "../schema";
import { CHANNELS_BY_KIND, type Channel } from "../../lib/contract/readings-payload";
import type { TimeSource } from "../../lib/clock-skew";
import type { MappingInput } from "../../lib/sparkplug/metrics";
import { isNumericDatatype, type Conversion } from "../../lib/sparkplug/metrics";
import type { EdgeNodeView, GatewayMetricView, MappingTarget } from "../../lib/sparkplug/view";
import { writeAudit } from "./audit";

const REJECTIONS_SHOWN = 50;

export async function listGateways(db: Db): Promise<EdgeNodeView[]> {
  const nodes = await db
    .select({
      id: edgeNodes.id,
      code: edgeNodes.code,
      groupId: edgeNodes.groupId,
      nodeId: edgeNodes.nodeId,
      label: edgeNodes.label,
      enabled: edgeNodes.enabled,
      online: edgeNodes.online,
      bdSeq: edgeNodes.bdSeq,
      lastBirthTs: edgeNodes.lastBirthTs,
      lastDeathTs: edgeNodes.lastDeathTs,
      lastSeenTs: edgeNodes.lastSeenTs,
      clockSkewMs: edgeNodes.clockSkewMs,
      rebirthRequests: edgeNodes.rebirthRequests,
      seqGaps: edgeNodes.seqGaps,
      rejectedCount: edgeNodes.rejectedCount,
    })
    .from(edgeNodes)
    .orderBy(edgeNodes.groupId, edgeNodes.nodeId);
  if (nodes.length === 0) return [];
  const ids = nodes.map((n) => n.id);
  const [devs, mets, rejCounts] = await Promise.all([
    db
      .select({ edgeNodeId: gatewayDevices.edgeNodeId, deviceName: gatewayDevices.deviceName, online: gatewayDevices.online, lastBirthTs: gatewayDevices.lastBirthTs, lastDeathTs: gatewayDevices.lastDeathTs })
      .from(gatewayDevices)
      .where(inArray(gatewayDevices.edgeNodeId, ids))
      .orderBy(gatewayDevices.deviceName),
    db
      .select({
        id: gatewayMetrics.id,
        edgeNodeId: gatewayMetrics.edgeNodeId,
        deviceName: gatewayMetrics.deviceName,
        name: gatewayMetrics.name,
        alias: gatewayMetrics.alias,
        datatype: gatewayMetrics.datatype,
        unit: gatewayMetrics.unit,
        lastValue: gatewayMetrics.lastValue,
        lastText: gatewayMetrics.lastText,
        lastTs: gatewayMetrics.lastTs,
        targetDeviceId: gatewayMetrics.targetDeviceId,
        targetChannel: gatewayMetrics.targetChannel,
        conversion: gatewayMetrics.conversion,
      })
      .from(gatewayMetrics)
      .where(inArray(gatewayMetrics.edgeNodeId, ids))
      .orderBy(gatewayMetrics.deviceName, gatewayMetrics.name),
    db
      .select({ edgeNodeId: gatewayRejections.edgeNodeId, reason: gatewayRejections.reason, n: sql<number>`COUNT(*)` })
      .from(gatewayRejections)
      .where(inArray(gatewayRejections.edgeNodeId, ids))
      .groupBy(gatewayRejections.edgeNodeId, gatewayRejections.reason),
  ]);
  const out: EdgeNodeView[] = [];
  for (const n of nodes) {
    const rejections = await db
      .select({ id: gatewayRejections.id, ts: gatewayRejections.ts, topic: gatewayRejections.topic, reason: gatewayRejections.reason, detail: gatewayRejections.detail })
      .from(gatewayRejections)
      .where(eq(gatewayRejections.edgeNodeId, n.id))
      .orderBy(desc(gatewayRejections.id))
      .limit(REJECTIONS_SHOWN);
    const byReason: Record<string, number> = {};
    for (const r of rejCounts) if (r.edgeNodeId === n.id) byReason[r.reason] = Number(r.n);
    out.push({
      ...n,
      rejectedByReason: byReason,
      devices: devs.filter((d) => d.edgeNodeId === n.id).map(({ edgeNodeId: _e, ...d }) => d),
      metrics: mets
        .filter((m) => m.edgeNodeId === n.id)
        .map(({ edgeNodeId: _e, ...m }): GatewayMetricView => ({ ...m, targetChannel: (m.targetChannel as Channel | null) ?? null, conversion: m.conversion as Conversion })),
      rejections,
    });
  }
  return out;
}

/** Every Stillfield device with the place it measures (point on a line, or hall). */
export async function listMappingTargets(db: Db): Promise<MappingTarget[]> {
  const rows = await db
    .select({
      deviceId: devices.id,
      code: devices.code,
      label: devices.label,
      kind: devices.kind,
      pointName: points.name,
      lineName: lines.name,
      areaName: areas.name,
    })
    .from(devices)
    .leftJoin(points, eq(points.id, devices.pointId))
    .leftJoin(lines, eq(lines.id, sql`COALESCE(${devices.lineId}, ${points.lineId})`))
    .leftJoin(areas, eq(areas.id, devices.areaId))
    .orderBy(devices.code);
  return rows.map((r) => ({
    deviceId: r.deviceId,
    code: r.code,
    label: r.label,
    place: r.pointName ? `${r.lineName ?? "?"} · ${r.pointName}` : r.lineName ? r.lineName : (r.areaName ?? "—"),
    channels: [...CHANNELS_BY_KIND[r.kind]],
  }));
}

export class MappingError extends Error {
  constructor(
    message: string,
    readonly field: string,
    readonly status: 404 | 422,
  ) {
    super(message);
  }
}

/** Saves (or clears) a metric's mapping; checks the target can carry the channel and the datatype is numeric. */
export async function saveMapping(db: Db, input: MappingInput, personId: number | null, nowMs = Date.now()): Promise<void> {
  const [metric] = await db
    .select({ id: gatewayMetrics.id, name: gatewayMetrics.name, datatype: gatewayMetrics.datatype, edgeNodeId: gatewayMetrics.edgeNodeId, deviceName: gatewayMetrics.deviceName })
    .from(gatewayMetrics)
    .where(eq(gatewayMetrics.id, input.metricId))
    .limit(1);
  if (!metric) throw new MappingError("No such metric", "metricId", 404);
  if (input.targetDeviceId !== null && input.channel !== null) {
    if (!isNumericDatatype(metric.datatype)) throw new MappingError(`A ${metric.datatype} metric cannot feed a channel`, "metricId", 422);
    const [target] = await db.select({ kind: devices.kind }).from(devices).where(eq(devices.id, input.targetDeviceId)).limit(1);
    if (!target) throw new MappingError("No such device", "targetDeviceId", 404);
    if (!CHANNELS_BY_KIND[target.kind].includes(input.channel)) throw new MappingError(`That device does not carry ${input.channel}`, "channel", 422);
  }
  await db.transaction(async (tx) => {
    await tx
      .update(gatewayMetrics)
      .set({ targetDeviceId: input.targetDeviceId, targetChannel: input.channel, conversion: input.conversion, mappedBy: personId, mappedAt: nowMs })
      .where(eq(gatewayMetrics.id, metric.id));
    await writeAudit(
      tx,
      {
        personId,
        action: input.targetDeviceId === null ? "gateway.unmap" : "gateway.map",
        subjectType: "gateway_metric",
        subjectId: metric.id,
        summary:
          input.targetDeviceId === null
            ? `Unmapped metric "${metric.name}"`
            : `Mapped metric "${metric.name}" to device ${input.targetDeviceId} ${input.channel} (${input.conversion})`,
        detail: input,
      },
      nowMs,
    );
  });
}

export async function edgeNodeCodeTaken(db: Db, code: string): Promise<boolean> {
  const [d] = await db.select({ id: devices.id }).from(devices).where(eq(devices.code, code)).limit(1);
  const [e] = await db.select({ id: edgeNodes.id }).from(edgeNodes).where(eq(edgeNodes.code, code)).limit(1);
  return Boolean(d || e);
}

export async function createEdgeNode(
  db: Db,
  input: { code: string; groupId: string; nodeId: string; label: string; secretHash: string },
  personId: number | null,
  nowMs = Date.now(),
): Promise<number> {
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(edgeNodes).values({ ...input, createdAt: nowMs });
    await writeAudit(tx, { personId, action: "gateway.create", subjectType: "edge_node", subjectId: res.insertId, summary: `Registered edge node ${input.groupId}/${input.nodeId} (${input.code})` }, nowMs);
    return res.insertId;
  });
}

export async function setDeviceTimeSource(db: Db, deviceId: number, source: TimeSource, personId: number | null, nowMs = Date.now()): Promise<void> {
  await db.transaction(async (tx) => {
    await tx
      .insert(deviceClocks)
      .values({ deviceId, timeSource: source, changedBy: personId, changedAt: nowMs })
      .onDuplicateKeyUpdate({ set: { timeSource: source, changedBy: personId, changedAt: nowMs } });
    await writeAudit(tx, { personId, action: "device.time_source", subjectType: "device", subjectId: deviceId, summary: `Readings keep ${source === "device" ? "device time" : "arrival time"}` }, nowMs);
  });
}

export type DeviceClockView = { deviceId: number; skewMs: number | null; measuredTs: number | null; timeSource: TimeSource };

export async function getDeviceClocks(db: Db, deviceIds?: number[]): Promise<Map<number, DeviceClockView>> {
  const q = db.select({ deviceId: deviceClocks.deviceId, skewMs: deviceClocks.skewMs, measuredTs: deviceClocks.measuredTs, timeSource: deviceClocks.timeSource }).from(deviceClocks);
  const rows = deviceIds ? (deviceIds.length ? await q.where(inArray(deviceClocks.deviceId, deviceIds)) : []) : await q;
  return new Map(rows.map((r) => [r.deviceId, r]));
}
