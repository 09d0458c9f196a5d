/**
 * Storms go out as one message. Alerts of one hall (and its lines) raised within
 * STORM_WINDOW_MS of the group's first one are sent as one notification listing them all
 * ("Press Hall: RH 23 % and 3 points over on Gravure Press 1"). Every channel (e-mail now;
 * texts and push later) sends groups, never single alerts, so a storm is one message on each.
 *
 * Pure. An alert with no hall is grouped on its own.
 */
import { formatAlertValue, type RuleKind, type Severity, SEVERITY_RANK } from "../vocabulary";

/** Alerts of one hall within this long of the first go out together (plant setting, from memory: a few minutes). */
export const STORM_WINDOW_MS = 3 * 60_000;

export type NotifyItem = {
  alertId: number;
  ts: number;
  kind: RuleKind;
  severity: Severity;
  areaId: number | null;
  areaName: string | null;
  lineId: number | null;
  lineName: string | null;
  pointName: string | null;
  value: number | null;
  message: string;
};

export type NotificationGroup = {
  key: string;
  areaName: string | null;
  firstTs: number;
  lastTs: number;
  severity: Severity;
  items: NotifyItem[];
  title: string;
};

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** "RH 23 % and 3 points over on Gravure Press 1" */
export function summarizeItems(items: readonly NotifyItem[]): string {
  const parts: string[] = [];
  const humidity = items.filter((i) => i.kind === "rh_low" || i.kind === "rh_forecast");
  if (humidity.length) {
    const lowest = humidity.reduce((a, b) => ((b.value ?? Infinity) < (a.value ?? Infinity) ? b : a));
    parts.push(lowest.kind === "rh_forecast" ? `RH falling toward its limit` : `RH ${lowest.value === null ? "low" : `${Math.round(lowest.value)} %`}`);
  }
  const byLine = new Map<string, NotifyItem[]>();
  for (const i of items) {
    if (i.kind === "rh_low" || i.kind === "rh_forecast") continue;
    const key = i.lineName ?? i.areaName ?? "the plant";
    byLine.set(key, [...(byLine.get(key) ?? []), i]);
  }
  for (const [line, list] of byLine) {
    const over = list.filter((i) => i.kind === "charge_high" || i.kind === "charge_rate").length;
    const bars = list.filter((i) => i.kind === "effect_loss").length;
    const silent = list.filter((i) => i.kind === "sensor_silent" || i.kind === "sensor_flat").length;
    const bits = [
      over ? `${plural(over, "point", "points")} over` : null,
      bars ? `${plural(bars, "bar", "bars")} losing effect` : null,
      silent ? `${plural(silent, "sensor", "sensors")} silent` : null,
    ].filter((b): b is string => b !== null);
    if (bits.length) parts.push(`${bits.join(", ")} on ${line}`);
  }
  if (parts.length === 0) return items.length === 1 ? formatAlertValue(items[0].kind, items[0].value) : `${items.length} alerts`;
  return parts.length === 1 ? parts[0] : `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}`;
}

/** Groups items (any order) by hall and time: a group takes every item of its hall within STORM_WINDOW_MS of its first. */
export function groupNotifications(items: readonly NotifyItem[], windowMs = STORM_WINDOW_MS): NotificationGroup[] {
  const sorted = [...items].sort((a, b) => a.ts - b.ts || a.alertId - b.alertId);
  const open = new Map<string, NotificationGroup>();
  const groups: NotificationGroup[] = [];
  for (const item of sorted) {
    const place = item.areaId !== null ? `area:${item.areaId}` : `alert:${item.alertId}`;
    let g = open.get(place);
    if (g === undefined || item.ts - g.firstTs > windowMs) {
      g = { key: `${place}:${item.ts}`, areaName: item.areaName, firstTs: item.ts, lastTs: item.ts, severity: item.severity, items: [], title: "" };
      open.set(place, g);
      groups.push(g);
    }
    g.items.push(item);
    g.lastTs = item.ts;
    if (SEVERITY_RANK[item.severity] > SEVERITY_RANK[g.severity]) g.severity = item.severity;
  }
  for (const g of groups) g.title = `${g.areaName ?? "Plant"}: ${summarizeItems(g.items)}`;
  return groups;
}

/** Whether a group is complete: no later alert of its hall can still join it at nowMs. */
export function isGroupClosed(group: NotificationGroup, nowMs: number, windowMs = STORM_WINDOW_MS): boolean {
  return nowMs - group.firstTs > windowMs;
}
