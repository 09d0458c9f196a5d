// The Sparkplug host's writes: births (devices and metric definitions), online and offline,
// last values, refusals with their reasons, counters, clock skew; and what it reads back on its
// own schedule: metric mappings and each device's time source and skew.
import { and, eq, inArray, isNotNull, sql } from "drizzle-orm";
import type { Db } from "../client";
import { deviceClocks, edgeNodes, gatewayDevices, gatewayMetrics, gatewayRejections } from "../schema";
import type { MetricDef, MetricMapping } from "../../lib/sparkplug/host-state";
import { CHANNELS, type Channel } from "../../lib/contract/readings-payload";
import type { Conversion } from "../../lib/sparkplug/metrics";
import type { TimeSource } from "../../lib/clock-skew";

export const GATEWAY_REJECTIONS_KEPT = 1000;

export async function recordBirth(db: Db, edgeNodeId: number, deviceName: string, metrics: readonly MetricDef[], ts: number, bdSeq: number | null): Promise<void> {
  await db.transaction(async (tx) => {
    if (deviceName === "") {
      await tx.update(edgeNodes).set({ online: true, bdSeq, lastBirthTs: ts, lastSeenTs: ts }).where(eq(edgeNodes.id, edgeNodeId));
    }
    await tx
      .insert(gatewayDevices)
      .values({ edgeNodeId, deviceName, online: true, lastBirthTs: ts })
      .onDuplicateKeyUpdate({ set: { online: true, lastBirthTs: ts } });
    for (const m of metrics) {
      await tx
        .insert(gatewayMetrics)
        .values({ edgeNodeId, deviceName, name: m.name.slice(0, 200), alias: m.alias, datatype: m.datatype.slice(0, 16), unit: m.unit?.slice(0, 24) ?? null, lastBirthTs: ts })
        .onDuplicateKeyUpdate({ set: { alias: m.alias, datatype: m.datatype.slice(0, 16), unit: m.unit?.slice(0, 24) ?? null, lastBirthTs: ts } });
    }
  });
}

/** Device "" is the node itself: its death also takes every device of the node offline. */
export async function recordOffline(db: Db, edgeNodeId: number, deviceName: string, ts: number): Promise<void> {
  if (deviceName === "") {
    await db.update(edgeNodes).set({ online: false, lastDeathTs: ts }).where(eq(edgeNodes.id, edgeNodeId));
    await db.update(gatewayDevices).set({ online: false, lastDeathTs: ts }).where(eq(gatewayDevices.edgeNodeId, edgeNodeId));
    return;
  }
  await db
    .update(gatewayDevices)
    .set({ online: false, lastDeathTs: ts })
    .where(and(eq(gatewayDevices.edgeNodeId, edgeNodeId), eq(gatewayDevices.deviceName, deviceName)));
}

export type LastValue = { edgeNodeId: number; deviceName: string; name: string; value: number | string | null; ts: number };

/** Last values, newest kept (one statement per metric; called about once a second with the latest only). */
export async function recordLastValues(db: Db, values: readonly LastValue[]): Promise<void> {
  for (const v of values) {
    const numeric = typeof v.value === "number" ? v.value : null;
    const text = typeof v.value === "string" ? v.value : null;
    await db
      .update(gatewayMetrics)
      .set({ lastValue: numeric, lastText: text, lastTs: v.ts })
      .where(
        and(
          eq(gatewayMetrics.edgeNodeId, v.edgeNodeId),
          eq(gatewayMetrics.deviceName, v.deviceName),
          eq(gatewayMetrics.name, v.name),
          sql`COALESCE(${gatewayMetrics.lastTs}, 0) <= ${v.ts}`,
        ),
      );
  }
}

export type NewGatewayRejection = { ts: number; edgeNodeId: number | null; topic: string; reason: string; detail: string };

/** Stores refusals, counts them on their node, and keeps only the newest GATEWAY_REJECTIONS_KEPT. */
export async function insertGatewayRejections(db: Db, rows: readonly NewGatewayRejection[]): Promise<void> {
  if (rows.length === 0) return;
  await db.insert(gatewayRejections).values(rows.map((r) => ({ ...r, topic: r.topic.slice(0, 200), detail: r.detail.slice(0, 300) })));
  const perNode = new Map<number, number>();
  for (const r of rows) if (r.edgeNodeId !== null) perNode.set(r.edgeNodeId, (perNode.get(r.edgeNodeId) ?? 0) + 1);
  for (const [id, n] of perNode) {
    await db.update(edgeNodes).set({ rejectedCount: sql`${edgeNodes.rejectedCount} + ${n}` }).where(eq(edgeNodes.id, id));
  }
  await db.execute(
    sql`DELETE FROM gateway_rejections WHERE id < (SELECT id FROM (SELECT id FROM gateway_rejections ORDER BY id DESC LIMIT 1 OFFSET ${GATEWAY_REJECTIONS_KEPT - 1}) AS keep)`,
  );
}

export async function countNodeEvents(db: Db, edgeNodeId: number, ev: { rebirths: number; gaps: number; lastSeenTs: number }): Promise<void> {
  await db
    .update(edgeNodes)
    .set({
      rebirthRequests: sql`${edgeNodes.rebirthRequests} + ${ev.rebirths}`,
      seqGaps: sql`${edgeNodes.seqGaps} + ${ev.gaps}`,
      lastSeenTs: sql`GREATEST(COALESCE(${edgeNodes.lastSeenTs}, 0), ${ev.lastSeenTs})`,
    })
    .where(eq(edgeNodes.id, edgeNodeId));
}

export async function recordNodeSkew(db: Db, edgeNodeId: number, skewMs: number, ts: number): Promise<void> {
  await db.update(edgeNodes).set({ clockSkewMs: skewMs, clockSkewTs: ts }).where(eq(edgeNodes.id, edgeNodeId));
}

export async function recordDeviceSkews(db: Db, skews: ReadonlyMap<number, number>, ts: number): Promise<void> {
  for (const [deviceId, skewMs] of skews) {
    await db.insert(deviceClocks).values({ deviceId, skewMs, measuredTs: ts }).onDuplicateKeyUpdate({ set: { skewMs, measuredTs: ts } });
  }
}

export type MappedMetric = { edgeNodeId: number; deviceName: string; name: string; mapping: MetricMapping };

export async function listMappedMetrics(db: Db): Promise<MappedMetric[]> {
  const rows = await db
    .select({
      edgeNodeId: gatewayMetrics.edgeNodeId,
      deviceName: gatewayMetrics.deviceName,
      name: gatewayMetrics.name,
      targetDeviceId: gatewayMetrics.targetDeviceId,
      targetChannel: gatewayMetrics.targetChannel,
      conversion: gatewayMetrics.conversion,
    })
    .from(gatewayMetrics)
    .where(and(isNotNull(gatewayMetrics.targetDeviceId), isNotNull(gatewayMetrics.targetChannel)));
  const out: MappedMetric[] = [];
  for (const r of rows) {
    if (r.targetDeviceId === null || !(CHANNELS as readonly string[]).includes(r.targetChannel ?? "")) continue;
    out.push({
      edgeNodeId: r.edgeNodeId,
      deviceName: r.deviceName,
      name: r.name,
      mapping: { targetDeviceId: r.targetDeviceId, channel: r.targetChannel as Channel, conversion: r.conversion as Conversion },
    });
  }
  return out;
}

export type DeviceClockRow = { deviceId: number; skewMs: number | null; timeSource: TimeSource };

export async function listDeviceClocks(db: Db, deviceIds?: readonly number[]): Promise<DeviceClockRow[]> {
  const q = db.select({ deviceId: deviceClocks.deviceId, skewMs: deviceClocks.skewMs, timeSource: deviceClocks.timeSource }).from(deviceClocks);
  if (deviceIds && deviceIds.length > 0) return q.where(inArray(deviceClocks.deviceId, [...deviceIds]));
  return q;
}
