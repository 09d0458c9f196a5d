// The Alerts board's storm groups: alerts told to on call in one message (alerts.notify_group,
// set by ingest/alerts-notify-send.ts) are drawn as one group with a header (the message's title,
// how many, the time span) and the alerts inside. Pure; the board and its phone cards use it.
import type { AlertListItem } from "../views/alerts";
import { groupTitle, type NotifyItem } from "./notification-groups";
import { formatPlantTime } from "../plant-time";
import { formatDuration } from "../vocabulary";

export type AlertListGroup = { key: string; title: string; alerts: AlertListItem[]; firstTs: number; lastTs: number; unacked: number };
export type AlertListEntry = { type: "alert"; alert: AlertListItem } | { type: "group"; group: AlertListGroup };

/** The time a group key was made at: "area:3:<ts>:<id>" → ts (the raise, or when it got worse). */
export function groupKeyTs(key: string): number | null {
  const parts = key.split(":");
  const ts = Number(parts[parts.length - 2]);
  return parts.length >= 4 && Number.isFinite(ts) ? ts : null;
}

function asNotifyItem(a: AlertListItem, keyTs: number | null): NotifyItem {
  return {
    alertId: a.id,
    ts: a.worsenedTs ?? a.startTs,
    kind: a.kind,
    severity: a.severity,
    areaId: a.areaId,
    areaName: a.areaName,
    lineId: a.lineId,
    lineName: a.lineName,
    pointName: a.pointName,
    value: a.peakValue,
    message: a.message,
    // told in this group because it got worse: the group was made at its worsened time
    worsened: a.worsenedTs != null && a.worsenedTs === keyTs,
  };
}

/**
 * The list in its order, with every set of two or more listed alerts that share a notify group
 * folded into one entry where its first member stands. Alerts told alone stay single.
 */
export function groupAlertList(alerts: readonly AlertListItem[]): AlertListEntry[] {
  const byKey = new Map<string, AlertListItem[]>();
  for (const a of alerts) if (a.notifyGroup) byKey.set(a.notifyGroup, [...(byKey.get(a.notifyGroup) ?? []), a]);
  const out: AlertListEntry[] = [];
  const placed = new Set<string>();
  for (const a of alerts) {
    const members = a.notifyGroup ? byKey.get(a.notifyGroup) : undefined;
    if (!a.notifyGroup || !members || members.length < 2) {
      out.push({ type: "alert", alert: a });
      continue;
    }
    if (placed.has(a.notifyGroup)) continue;
    placed.add(a.notifyGroup);
    const keyTs = groupKeyTs(a.notifyGroup);
    const items = members.map((m) => asNotifyItem(m, keyTs));
    const times = items.map((i) => i.ts);
    const areaName = members.find((m) => m.areaName)?.areaName ?? null;
    out.push({
      type: "group",
      group: {
        key: a.notifyGroup,
        title: groupTitle(areaName, [...items].sort((x, y) => x.ts - y.ts || x.alertId - y.alertId)),
        alerts: members,
        firstTs: Math.min(...times),
        lastTs: Math.max(...times),
        unacked: members.filter((m) => m.state === "active_unacked" || m.state === "cleared_unacked").length,
      },
    });
  }
  return out;
}

/** "2 Dec 08:00–08:03, within 3 min" (plant time). */
export function groupSpanText(g: Pick<AlertListGroup, "firstTs" | "lastTs">, timeZone: string): string {
  const from = formatPlantTime(g.firstTs, timeZone, "d MMM HH:mm");
  if (g.lastTs - g.firstTs < 60_000) return `${from}, together`;
  return `${from}–${formatPlantTime(g.lastTs, timeZone, "HH:mm")}, within ${formatDuration(g.lastTs - g.firstTs)}`;
}
