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
  /** it got worse since on call was last told (alerts.worsened_ts): the message says "Worse" */
  worsened?: boolean;
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

/** "Press Hall: RH 23 % and 3 points over on Gravure Press 1"; "Worse: …" when every item got worse since it was told. */
export function groupTitle(areaName: string | null, items: readonly NotifyItem[]): string {
  const worse = items.length > 0 && items.every((i) => i.worsened === true);
  return `${worse ? "Worse: " : ""}${areaName ?? "Plant"}: ${summarizeItems(items)}`;
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
      // the first alert's id as well: a follow-up group may start at the same reading time
      g = { key: `${place}:${item.ts}:${item.alertId}`, areaName: item.areaName, firstTs: item.ts, lastTs: item.ts, severity: item.severity, items: [], title: "" };
      open.set(place, g);
      groups.push(g);
    }
    g.items.push(item);
    g.lastTs = item.ts;
    if (SEVERITY_RANK[item.severity] > SEVERITY_RANK[g.severity]) g.severity = item.severity;
  }
  for (const g of groups) g.title = groupTitle(g.areaName, g.items);
  return groups;
}

/** Whether a group is complete: no later alert of its hall can still join it at nowMs. */
export function isGroupClosed(group: NotificationGroup, nowMs: number, windowMs = STORM_WINDOW_MS): boolean {
  return nowMs - group.firstTs > windowMs;
}

// ---------------------------------------------------------------------------------------------
// Who goes together, and when (ingest/alerts-escalation.ts runs these every few seconds).
//
// The rule: an alert not yet told (notified level 0) is due notifyAfterS after its raise, or at
// once from when it got worse. The hall's untold alerts are grouped by STORM_WINDOW_MS from the
// first; when any alert of a group is due, the whole group goes out, with the alerts in it that
// are not due yet. An alert raised after its hall's group went out is untold, so it starts (or
// joins) a follow-up group. Once told, a group escalates as one: its steps count from the
// earliest due time of its members, each escalateAfterS after the previous.

export type PendingNotifyItem = NotifyItem & {
  /** the highest escalation order told (0: nobody yet, or reset because it got worse) */
  notifiedLevel: number;
  /** the group it was last told in (alerts.notify_group), null before the first message */
  notifyGroup: string | null;
  /** when its first message is due: worsenedTs, else the raise plus notifyAfterS */
  dueTs: number;
};

export type PlannedGroupMessage = { key: string; order: number; dueTs: number; items: PendingNotifyItem[]; group: NotificationGroup };

/**
 * When an alert's first message is due: notifyAfterS after the raise, or after it was shown
 * when it was written later than its raise (`shownTs`: a silence held back for its siblings, an
 * owner catching up), so people always get the time to acknowledge it; at once from when it got
 * worse. `toldBefore` false (it got worse before anybody was told of it): whichever is earlier.
 */
export function firstDueTs(a: { startTs: number; shownTs?: number | null; worsenedTs?: number | null; toldBefore?: boolean }, notifyAfterS: number): number {
  const normal = Math.max(a.startTs, a.shownTs ?? a.startTs) + notifyAfterS * 1000;
  if (a.worsenedTs == null) return normal;
  return a.toldBefore === false ? Math.min(normal, a.worsenedTs) : a.worsenedTs;
}

/**
 * Which escalation order (if any) is due, given the first due time, the highest order already
 * told and the orders on call now; each later step escalateAfterS after the previous, counting
 * the steps already taken among the orders on call.
 */
export function nextStep(firstDue: number, notifiedLevel: number, orders: readonly number[], escalateAfterS: number, nowMs: number): { order: number; dueTs: number } | null {
  const sorted = [...new Set(orders)].sort((a, b) => a - b);
  const next = sorted.find((o) => o > notifiedLevel);
  if (next === undefined) return null;
  const stepsDone = sorted.filter((o) => o <= notifiedLevel).length;
  const dueTs = notifiedLevel === 0 ? firstDue : firstDue + Math.max(1, stepsDone) * escalateAfterS * 1000;
  return nowMs >= dueTs ? { order: next, dueTs } : null;
}

/**
 * The messages due now: untold alerts grouped by hall and window (sent when any member is due),
 * and told groups escalated as one. `items` are the active, unacknowledged, unshelved candidates
 * (those not due yet included, so they can go with their hall's group). Each message names its
 * group key: a new group's is made from its hall, first time and first alert; a told group keeps
 * the key it was sent under, so dedupe keys built on it stay the same across rounds.
 */
export function planGroupMessages(
  items: readonly PendingNotifyItem[],
  orders: readonly number[],
  escalateAfterS: number,
  nowMs: number,
  windowMs = STORM_WINDOW_MS,
): PlannedGroupMessage[] {
  const out: PlannedGroupMessage[] = [];
  const untold = items.filter((i) => i.notifiedLevel === 0);
  for (const g of groupNotifications(untold, windowMs)) {
    const members = g.items as PendingNotifyItem[];
    const firstDue = Math.min(...members.map((m) => m.dueTs));
    const step = nextStep(firstDue, 0, orders, escalateAfterS, nowMs);
    if (step) out.push({ key: g.key, order: step.order, dueTs: step.dueTs, items: members, group: g });
  }
  // told: one bucket per group and level (members of a group share their level; an alert told
  // before groups existed is its own group)
  const told = new Map<string, PendingNotifyItem[]>();
  for (const i of items) {
    if (i.notifiedLevel === 0) continue;
    const k = `${i.notifyGroup ?? `alert:${i.alertId}`}|${i.notifiedLevel}`;
    told.set(k, [...(told.get(k) ?? []), i]);
  }
  for (const [k, members] of told) {
    const key = k.slice(0, k.lastIndexOf("|"));
    const firstDue = Math.min(...members.map((m) => m.dueTs));
    const step = nextStep(firstDue, members[0].notifiedLevel, orders, escalateAfterS, nowMs);
    if (!step) continue;
    const sorted = [...members].sort((a, b) => a.ts - b.ts || a.alertId - b.alertId);
    const severity = sorted.reduce<Severity>((s, m) => (SEVERITY_RANK[m.severity] > SEVERITY_RANK[s] ? m.severity : s), sorted[0].severity);
    const group: NotificationGroup = { key, areaName: sorted[0].areaName, firstTs: sorted[0].ts, lastTs: sorted[sorted.length - 1].ts, severity, items: sorted, title: groupTitle(sorted[0].areaName, sorted) };
    out.push({ key, order: step.order, dueTs: step.dueTs, items: sorted, group });
  }
  return out.sort((a, b) => a.dueTs - b.dueTs || a.key.localeCompare(b.key));
}
