// An alert's chart and who was told (the alert page, the on-call e-mail's chart): the rule
// version that raised it, the sensor and channel to draw, the hour's readings, and every
// e-mail, text and push queued for it with its delivery state.
import { and, asc, eq, like, or } from "drizzle-orm";
import type { Db } from "../client";
import { alerts, devices, outbox, people, phoneOutbox, ruleVersions } from "../schema";
import { getHistory } from "./history";
import { CHANNEL_UNITS, alertChartWindow, channelOfAlert, describeRule, limitLinesOf, type AlertChartSpec } from "../../lib/charts/alert-chart";
import type { SvgChartPoint } from "../../lib/charts/svg-chart";
import { RULE_KIND_WORDS, type RuleKind } from "../../lib/vocabulary";

export type AlertRuleInfo = { spec: AlertChartSpec | null; ruleText: string };

function paramsOf(v: unknown): Record<string, unknown> {
  return v && typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
}

/** The chart spec of an alert (null when no sensor can be found for it) and its rule in words. */
export async function getAlertChartSpec(db: Db, alertId: number, nowMs: number): Promise<AlertRuleInfo | null> {
  const [a] = await db
    .select({
      id: alerts.id,
      kind: alerts.kind,
      startTs: alerts.startTs,
      endTs: alerts.endTs,
      pointId: alerts.pointId,
      areaId: alerts.areaId,
      lineId: alerts.lineId,
      deviceId: alerts.deviceId,
      params: ruleVersions.params,
      onDelayS: ruleVersions.onDelayS,
      offDelayS: ruleVersions.offDelayS,
    })
    .from(alerts)
    .leftJoin(ruleVersions, and(eq(ruleVersions.ruleId, alerts.ruleId), eq(ruleVersions.version, alerts.ruleVersion)))
    .where(eq(alerts.id, alertId));
  if (!a) return null;
  const params = paramsOf(a.params);
  const kind: RuleKind = a.kind;
  const ruleText = describeRule(kind, params, a.onDelayS ?? 0, a.offDelayS ?? 0);
  let device: { id: number; kind: string; lineId: number | null } | undefined;
  if (a.deviceId !== null) {
    [device] = await db.select({ id: devices.id, kind: devices.kind, lineId: devices.lineId }).from(devices).where(eq(devices.id, a.deviceId));
  }
  const wantsClimate = kind === "rh_low" || kind === "rh_forecast";
  if (!device && a.pointId !== null && !wantsClimate) {
    [device] = await db.select({ id: devices.id, kind: devices.kind, lineId: devices.lineId }).from(devices).where(and(eq(devices.pointId, a.pointId), eq(devices.kind, "field_meter"))).limit(1);
  }
  if (!device && a.areaId !== null) {
    [device] = await db.select({ id: devices.id, kind: devices.kind, lineId: devices.lineId }).from(devices).where(and(eq(devices.areaId, a.areaId), eq(devices.kind, "th_logger"))).limit(1);
  }
  if (!device) return { spec: null, ruleText };
  const channel = channelOfAlert(kind, params, device.kind);
  const win = alertChartWindow(a, nowMs);
  return {
    ruleText,
    spec: {
      alertId: a.id,
      deviceId: device.id,
      channel,
      unit: CHANNEL_UNITS[channel],
      fromTs: win.fromTs,
      toTs: win.toTs,
      markTs: a.startTs,
      limits: channel === "charge_kv" || channel === "rh_pct" ? limitLinesOf(kind, params) : [],
      title: RULE_KIND_WORDS[kind],
      lineId: a.lineId ?? device.lineId,
    },
  };
}

/** The readings of a chart spec's span as at most `maxPoints` buckets. */
export async function loadChartPoints(db: Db, spec: Pick<AlertChartSpec, "deviceId" | "channel" | "fromTs" | "toTs">, maxPoints = 120): Promise<SvgChartPoint[]> {
  const h = await getHistory(db, { deviceId: spec.deviceId, channel: spec.channel, fromTs: spec.fromTs, toTs: spec.toTs, maxPoints });
  return h.points.map(([ts, min, mean, max]) => ({ ts, min, mean, max }));
}

export type AlertDelivery = {
  channel: "email" | "sms" | "push";
  personName: string | null;
  to: string;
  state: string;
  deliveryStatus: string | null;
  createdTs: number;
  sentTs: number | null;
  lastError: string | null;
  attempts: number;
};

/** Every e-mail, text and push queued for an alert, oldest first. */
export async function listAlertDeliveries(db: Db, alertId: number, notifyGroup: string | null = null): Promise<AlertDelivery[]> {
  // a storm group's messages are keyed by the group (ingest/alerts-notify-send.ts)
  const groupKey = notifyGroup ? `group:${notifyGroup}:%` : null;
  const mails = await db
    .select({ to: outbox.toAddress, state: outbox.state, createdTs: outbox.createdTs, sentTs: outbox.sentTs, lastError: outbox.lastError, attempts: outbox.attempts, personName: people.name })
    .from(outbox)
    .leftJoin(people, eq(people.email, outbox.toAddress))
    .where(groupKey ? or(like(outbox.dedupeKey, `alert:${alertId}:%`), like(outbox.dedupeKey, groupKey)) : like(outbox.dedupeKey, `alert:${alertId}:%`))
    .orderBy(asc(outbox.createdTs));
  const phones = await db
    .select({
      channel: phoneOutbox.channel,
      to: phoneOutbox.toAddress,
      state: phoneOutbox.state,
      deliveryStatus: phoneOutbox.deliveryStatus,
      createdTs: phoneOutbox.createdTs,
      sentTs: phoneOutbox.sentTs,
      lastError: phoneOutbox.lastError,
      attempts: phoneOutbox.attempts,
      personName: people.name,
    })
    .from(phoneOutbox)
    .leftJoin(people, eq(people.id, phoneOutbox.personId))
    .where(groupKey ? or(eq(phoneOutbox.alertId, alertId), like(phoneOutbox.dedupeKey, groupKey)) : eq(phoneOutbox.alertId, alertId))
    .orderBy(asc(phoneOutbox.createdTs));
  const out: AlertDelivery[] = [
    ...mails.map((m) => ({ channel: "email" as const, personName: m.personName, to: m.to, state: m.state, deliveryStatus: null, createdTs: m.createdTs, sentTs: m.sentTs, lastError: m.lastError, attempts: m.attempts })),
    ...phones.map((p) => ({ channel: p.channel, personName: p.personName, to: p.channel === "push" ? "phone (push)" : p.to, state: p.state, deliveryStatus: p.deliveryStatus, createdTs: p.createdTs, sentTs: p.sentTs, lastError: p.lastError, attempts: p.attempts })),
  ];
  return out.sort((x, y) => x.createdTs - y.createdTs);
}
