"use client";
// The Alerts list on a phone (below 768 px): one card per alert, what and where first, the
// state code and severity beside it, and Acknowledge / Comment / Shelve along the bottom of the
// card where a thumb reaches them. The card's title opens the alert page (/alerts/[id]).
import { useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useSyncExternalStore } from "react";
import clsx from "clsx";
import { formatPlantTime } from "@/lib/plant-time";
import type { AlertListItem } from "@/lib/views/alerts";
import { ALERT_STATE_SHORT, RULE_KIND_WORDS, formatAlertValue, formatDuration } from "@/lib/vocabulary";
import { AlertCode, SeverityTag } from "./alert-bits";
import { AlertActionBar, type AlertFormActions } from "./alert-actions";
import { FoundLateMark } from "./found-late-mark";
import { groupAlertList } from "@/lib/alerts/alert-list-groups";
import { AlertGroupCard } from "./alert-groups";

const PHONE_QUERY = "(max-width: 767.98px)";

function subscribeWidth(cb: () => void) {
  const mq = window.matchMedia(PHONE_QUERY);
  mq.addEventListener("change", cb);
  return () => mq.removeEventListener("change", cb);
}

/** True below 768 px (false while rendering on the server). */
export function usePhoneWidth(): boolean {
  return useSyncExternalStore(subscribeWidth, () => window.matchMedia(PHONE_QUERY).matches, () => false);
}

export function alertWhere(a: AlertListItem): string {
  return [a.lineName, a.pointName].filter(Boolean).join(" › ") || a.areaName || a.subjectKey.replace(/^(\w+):/, "$1 ");
}

export function AlertCards({ alerts, now, timeZone, canRespond, actions }: { alerts: AlertListItem[]; now: number; timeZone: string; canRespond: boolean; actions: AlertFormActions }) {
  const queryClient = useQueryClient();
  const refresh = () => void queryClient.invalidateQueries({ queryKey: ["alerts"] });
  const card = (a: AlertListItem) => <AlertCard key={a.id} a={a} now={now} timeZone={timeZone} canRespond={canRespond} actions={actions} refresh={refresh} />;
  // alerts told to on call in one message are one card, opening to theirs
  return (
    <ul className="space-y-3" data-testid="alert-cards">
      {groupAlertList(alerts).map((e) =>
        e.type === "alert" ? (
          card(e.alert)
        ) : (
          <AlertGroupCard key={e.group.key} group={e.group} timeZone={timeZone} ackGroup={canRespond ? actions.ackGroup : undefined}>
            {e.group.alerts.map(card)}
          </AlertGroupCard>
        ),
      )}
    </ul>
  );
}

function AlertCard({ a, now, timeZone, canRespond, actions, refresh }: { a: AlertListItem; now: number; timeZone: string; canRespond: boolean; actions: AlertFormActions; refresh: () => void }) {
  const shelved = a.shelvedUntilTs !== null && a.shelvedUntilTs > now;
  const closed = a.state === "closed";
  const endTs = a.endTs ?? (closed ? a.closedTs : null);
  return (
    <li
      className={clsx("rounded-card border bg-paper-raised p-3", a.state === "active_unacked" ? "border-ink-soft" : "border-paper-line")}
      data-testid="alert-card"
      data-alert-id={a.id}
      data-state={a.state}
    >
      <div className="flex flex-wrap items-center justify-between gap-2">
        <AlertCode kind={a.kind} state={a.state} shelved={shelved} />
        <SeverityTag severity={a.severity} />
        <FoundLateMark a={a} timeZone={timeZone} />
      </div>
      <Link href={`/alerts/${a.id}`} className="mt-2 block" data-testid="alert-card-link">
        <span className={clsx("block font-medium", closed ? "text-ink-soft" : "text-ink")}>
          {RULE_KIND_WORDS[a.kind]} — {alertWhere(a)}
        </span>
        <span className="mt-0.5 block break-words text-sm text-ink-soft">{a.message}</span>
      </Link>
      <dl className="num mt-2 grid grid-cols-[1fr_auto] gap-x-3 gap-y-0.5 text-xs text-ink-soft">
        <dt className="sr-only">Since</dt>
        <dd>
          {formatPlantTime(a.startTs, timeZone, "d MMM HH:mm")} · {endTs !== null ? `lasted ${formatDuration(endTs - a.startTs)}` : `for ${formatDuration(now - a.startTs)}`}
        </dd>
        <dt className="sr-only">Peak</dt>
        <dd className="whitespace-nowrap text-right">Peak {formatAlertValue(a.kind, a.peakValue)}</dd>
        <dt className="sr-only">Status</dt>
        <dd className="col-span-2">
          {ALERT_STATE_SHORT[a.state]}
          {a.ackedTs !== null ? ` · acked${a.ackedByName ? ` by ${a.ackedByName}` : ""} ${formatPlantTime(a.ackedTs, timeZone, "HH:mm")}` : ""}
          {shelved && a.shelvedUntilTs !== null ? ` · shelved until ${formatPlantTime(a.shelvedUntilTs, timeZone, "d MMM HH:mm")}` : ""}
        </dd>
      </dl>
      {canRespond ? (
        <div className="mt-3">
          <AlertActionBar alertId={a.id} state={a.state} shelved={shelved} shelvedReason={a.shelvedReason} actions={actions} onDone={refresh} />
        </div>
      ) : null}
    </li>
  );
}
