"use client";
// The Alerts page's live list: filters (hall, line, state, time), open alerts first (high
// severity first, then the longest waiting), each row linking to the line page at the alert's
// time, with acknowledge / comment / shelve / unshelve for shift leads and up. Forms post to the
// server actions the page hands in; the list refreshes when the live stream reports a change.
import { useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { Fragment, useEffect, useMemo, useState } from "react";
import clsx from "clsx";
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import { useNow } from "@/components/live/use-now";
import { EmptyState } from "@/components/ui/page";
import { formatPlantTime } from "@/lib/plant-time";
import type { AlertListItem } from "@/lib/views/alerts";
import { AlertCode, SeverityTag } from "./alert-bits";
import { formatAlertValue, formatDuration } from "@/lib/vocabulary";
import { ALERT_EVENT_WORDS, ALERT_STATE_WORDS, ALERT_STATE_SHORT, RULE_KIND_WORDS, type AlertState } from "@/lib/vocabulary";
import { isStateChoice, type AlertFilterState } from "./filters";
import { useAlertDetail, useAlerts, type AlertsResponse } from "./use-alerts";
import { FoundLateMark } from "./found-late-mark";
import { ShelveFields, type AlertFormActions } from "./alert-actions";
import { AlertCards, usePhoneWidth } from "./alert-cards";
import { AlertGroupRows } from "./alert-groups";
import { groupAlertList } from "@/lib/alerts/alert-list-groups";

export type { FormAction, AlertFormActions } from "./alert-actions";
export type FilterArea = { id: number; name: string; lines: Array<{ id: number; name: string }> };

const STATE_CHOICES: Array<{ value: AlertFilterState["state"]; label: string }> = [
  { value: "open", label: "Open (not closed)" },
  { value: "active_unacked", label: ALERT_STATE_WORDS.active_unacked },
  { value: "active_acked", label: ALERT_STATE_WORDS.active_acked },
  { value: "cleared_unacked", label: ALERT_STATE_WORDS.cleared_unacked },
  { value: "closed", label: ALERT_STATE_WORDS.closed },
  { value: "all", label: "All states" },
];

const TIME_CHOICES: Array<{ value: string; label: string }> = [
  { value: "8", label: "Last 8 hours" },
  { value: "24", label: "Last 24 hours" },
  { value: "168", label: "Last 7 days" },
  { value: "720", label: "Last 30 days" },
  { value: "", label: "Any time" },
];

export { SHELVE_CHOICES } from "./alert-actions";

function filtersToUrl(f: AlertFilterState): string {
  const p = new URLSearchParams();
  if (f.area !== null) p.set("area", String(f.area));
  if (f.line !== null) p.set("line", String(f.line));
  if (f.state !== "open") p.set("state", f.state);
  if (f.hours !== 168) p.set("hours", f.hours === null ? "any" : String(f.hours));
  const s = p.toString();
  return s ? `?${s}` : window.location.pathname;
}

export function AlertsBoard({
  initial,
  initialFilters,
  areas,
  canRespond,
  timeZone,
  actions,
}: {
  initial: AlertsResponse;
  initialFilters: AlertFilterState;
  areas: FilterArea[];
  canRespond: boolean;
  timeZone: string;
  actions: AlertFormActions;
}) {
  const [filters, setFilters] = useState<AlertFilterState>(initialFilters);
  const [openId, setOpenId] = useState<number | null>(null);
  const { query, live } = useAlerts(filters, initial);
  const now = useNow(15_000, 0, initial.serverTs);
  const phone = usePhoneWidth();

  useEffect(() => {
    window.history.replaceState(null, "", filtersToUrl(filters));
  }, [filters]);

  const lines = useMemo(() => areas.filter((a) => filters.area === null || a.id === filters.area).flatMap((a) => a.lines), [areas, filters.area]);
  const data = query.data;
  const counts = data?.counts ?? initial.counts;
  const alerts = useMemo(() => data?.alerts ?? [], [data]);
  const entries = useMemo(() => groupAlertList(alerts), [alerts]);
  const renderAlert = (a: AlertListItem, nested = false) => (
    <Fragment key={a.id}>
      <AlertRow
        a={a}
        now={now}
        timeZone={timeZone}
        canRespond={canRespond}
        open={openId === a.id}
        onToggle={() => setOpenId((id) => (id === a.id ? null : a.id))}
        actions={actions}
        nested={nested}
      />
      {openId === a.id ? (
        <tr className="border-b border-paper-line bg-paper">
          <td colSpan={8} className="px-3 py-3">
            <AlertDetailPanel id={a.id} a={a} timeZone={timeZone} canRespond={canRespond} actions={actions} />
          </td>
        </tr>
      ) : null}
    </Fragment>
  );

  return (
    <div>
      <div className="mb-3 flex flex-wrap items-center gap-x-5 gap-y-1 text-sm" data-testid="alert-counts">
        <CountChip n={counts.active_unacked} label="active, not acknowledged" strong />
        <CountChip n={counts.active_acked} label="active, acknowledged" />
        <CountChip n={counts.cleared_unacked} label="cleared, not acknowledged" />
        <span className="ml-auto inline-flex items-center gap-1.5 text-xs text-ink-faint" data-testid="live-status">
          <span className={clsx("inline-block h-2 w-2 rounded-full", live ? "bg-neg" : "border border-ink-faint")} aria-hidden="true" />
          {live ? "Live" : "Live stream not connected; refreshing every 5 s"}
        </span>
      </div>

      <div className="mb-3 flex flex-wrap items-end gap-3 rounded-card border border-paper-line bg-paper-raised px-3 py-2.5" role="search">
        <FilterSelect
          label="Hall"
          value={filters.area === null ? "" : String(filters.area)}
          onChange={(v) => setFilters((f) => ({ ...f, area: v ? Number(v) : null, line: null }))}
          options={[{ value: "", label: "All halls" }, ...areas.map((a) => ({ value: String(a.id), label: a.name }))]}
        />
        <FilterSelect
          label="Line"
          value={filters.line === null ? "" : String(filters.line)}
          onChange={(v) => setFilters((f) => ({ ...f, line: v ? Number(v) : null }))}
          options={[{ value: "", label: "All lines" }, ...lines.map((l) => ({ value: String(l.id), label: l.name }))]}
        />
        <FilterSelect label="State" value={filters.state} onChange={(v) => setFilters((f) => ({ ...f, state: isStateChoice(v) ? v : "open" }))} options={STATE_CHOICES} />
        <FilterSelect
          label="Time"
          value={filters.hours === null ? "" : String(filters.hours)}
          onChange={(v) => setFilters((f) => ({ ...f, hours: v ? Number(v) : null }))}
          options={TIME_CHOICES}
        />
        <span className="ml-auto pb-1.5 text-xs text-ink-faint">
          {query.isFetching ? "Updating…" : `${alerts.length} shown`}
        </span>
      </div>

      {query.error ? (
        <p role="alert" className="mb-3 rounded bg-over-soft px-3 py-2 text-sm text-over">
          {query.error.message} The list below may be out of date.
        </p>
      ) : null}

      {alerts.length === 0 ? (
        <EmptyState title={filters.state === "open" ? "No open alerts" : "No alerts match these filters"}>
          {filters.state === "open" ? "Every alert is closed. New ones appear here as they are raised." : "Try another hall, line, state or time span."}
        </EmptyState>
      ) : phone ? (
        <AlertCards alerts={alerts} now={now} timeZone={timeZone} canRespond={canRespond} actions={actions} />
      ) : (
        <div className="overflow-x-auto rounded-card border border-paper-line bg-paper-raised">
          <table className="w-full min-w-[1000px] text-sm" data-testid="alerts-table">
            <thead className="border-b border-paper-line text-left text-xs text-ink-faint">
              <tr>
                <th className="px-3 py-2 font-medium">State</th>
                <th className="px-2 py-2 font-medium">Severity</th>
                <th className="px-2 py-2 font-medium">What</th>
                <th className="px-2 py-2 font-medium">Where</th>
                <th className="px-2 py-2 font-medium">Since</th>
                <th className="px-2 py-2 font-medium">Peak</th>
                <th className="px-2 py-2 font-medium">Status</th>
                <th className="px-3 py-2 text-right font-medium">{canRespond ? "Respond" : ""}</th>
              </tr>
            </thead>
            <tbody>
              {/* alerts told to on call in one message show as one group */}
              {entries.map((e) =>
                e.type === "alert" ? (
                  renderAlert(e.alert)
                ) : (
                  <AlertGroupRows key={e.group.key} group={e.group} timeZone={timeZone} colSpan={8} renderAlert={(a) => renderAlert(a, true)} ackGroup={canRespond ? actions.ackGroup : undefined} />
                ),
              )}
            </tbody>
          </table>
        </div>
      )}
      <p className="mt-3 text-xs text-ink-faint">
        Open alerts are listed first: high severity first, then the one waiting longest. Times are plant time ({timeZone}). Stillfield is a monitoring aid, not a
        safety system.
      </p>
    </div>
  );
}

function CountChip({ n, label, strong }: { n: number; label: string; strong?: boolean }) {
  return (
    <span className={clsx("num", strong && n > 0 ? "font-semibold text-ink" : "text-ink-soft")}>
      <span className="text-base">{n}</span> {label}
    </span>
  );
}

function FilterSelect({ label, value, onChange, options }: { label: string; value: string; onChange: (v: string) => void; options: Array<{ value: string; label: string }> }) {
  return (
    <label className="block min-w-[9rem] flex-1 sm:flex-none">
      <span className="text-xs font-medium text-ink-soft">{label}</span>
      <select className={`${inputClass} mt-1 w-full sm:w-48`} value={value} onChange={(e) => onChange(e.target.value)} aria-label={label}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}

function lineHref(a: AlertListItem): string | null {
  const lineId = a.lineId ?? a.linkLineId;
  return lineId !== null ? `/lines/${lineId}?at=${a.startTs}` : null;
}

function AlertRow({
  a,
  now,
  timeZone,
  canRespond,
  open,
  onToggle,
  actions,
  nested,
}: {
  a: AlertListItem;
  now: number;
  timeZone: string;
  canRespond: boolean;
  open: boolean;
  onToggle: () => void;
  actions: AlertFormActions;
  /** one of a storm group's alerts, drawn under its header */
  nested?: boolean;
}) {
  const queryClient = useQueryClient();
  const refresh = () => void queryClient.invalidateQueries({ queryKey: ["alerts"] });
  const shelved = a.shelvedUntilTs !== null && a.shelvedUntilTs > now;
  const closed = a.state === "closed";
  const endTs = a.endTs ?? (closed ? a.closedTs : null);
  const href = lineHref(a);
  const where = [a.lineName, a.pointName].filter(Boolean).join(" › ") || a.areaName || a.subjectKey.replace(/^(\w+):/, "$1 ");
  const ackable = a.state === "active_unacked" || a.state === "cleared_unacked";
  return (
    <tr
      className={clsx("border-b border-paper-line align-top", closed ? "text-ink-faint" : "", open && "bg-paper")}
      data-testid="alert-row"
      data-alert-id={a.id}
      data-state={a.state}
      data-shelved={shelved ? "true" : "false"}
    >
      <td className={clsx("py-2", nested ? "border-l-4 border-l-paper-line pl-5 pr-3" : "px-3")}>
        <AlertCode kind={a.kind} state={a.state} shelved={shelved} />
      </td>
      <td className="px-2 py-2">
        <SeverityTag severity={a.severity} />
      </td>
      <td className="max-w-[26rem] px-2 py-2">
        <div className={clsx("font-medium", closed ? "text-ink-soft" : "text-ink")}>
          {RULE_KIND_WORDS[a.kind]}
          {a.chattering ? <span className="ml-1.5 rounded bg-paper-sunk px-1 py-0.5 text-[11px] font-normal text-ink-soft">chattering</span> : null}
          <FoundLateMark a={a} timeZone={timeZone} />
        </div>
        <div className="text-xs text-ink-soft">{a.message}</div>
      </td>
      <td className="px-2 py-2">
        {href ? (
          <Link href={href} className="text-brand underline-offset-2 hover:underline" data-testid="alert-line-link">
            {where}
          </Link>
        ) : (
          <span>{where}</span>
        )}
        {a.areaName && a.lineName ? <div className="text-xs text-ink-faint">{a.areaName}</div> : null}
      </td>
      <td className="num whitespace-nowrap px-2 py-2">
        <div>{formatPlantTime(a.startTs, timeZone, "d MMM HH:mm")}</div>
        <div className="text-xs text-ink-faint">{endTs !== null ? `lasted ${formatDuration(endTs - a.startTs)}` : `for ${formatDuration(now - a.startTs)}`}</div>
      </td>
      <td className="num whitespace-nowrap px-2 py-2">{formatAlertValue(a.kind, a.peakValue)}</td>
      <td className="px-2 py-2 text-xs">
        <div className={clsx(a.state === "active_unacked" && "font-semibold text-ink")}>{ALERT_STATE_SHORT[a.state]}</div>
        {a.ackedTs !== null ? (
          <div className="text-ink-faint">
            Acked {a.ackedByName ? `by ${a.ackedByName} ` : ""}
            {formatPlantTime(a.ackedTs, timeZone, "HH:mm")}
          </div>
        ) : null}
        {shelved && a.shelvedUntilTs !== null ? (
          <div className="text-shelved" title={a.shelvedReason ?? undefined}>
            Shelved until {formatPlantTime(a.shelvedUntilTs, timeZone, "d MMM HH:mm")}
          </div>
        ) : null}
        {a.notifiedLevel > 0 ? <div className="text-ink-faint">On-call told (order {a.notifiedLevel})</div> : null}
      </td>
      <td className="whitespace-nowrap px-3 py-2 text-right">
        <div className="flex items-start justify-end gap-1.5">
          {canRespond && ackable ? (
            <ActionForm action={actions.ack} onSuccess={refresh}>
              <input type="hidden" name="alertId" value={a.id} />
              <SubmitButton variant="quiet">{a.state === "cleared_unacked" ? "Acknowledge & close" : "Acknowledge"}</SubmitButton>
            </ActionForm>
          ) : null}
          <button
            type="button"
            onClick={onToggle}
            aria-expanded={open}
            className="rounded border border-paper-line bg-paper-raised px-2.5 py-1.5 text-sm text-ink hover:bg-paper-sunk"
            data-testid="alert-details-toggle"
          >
            {open ? "Close" : canRespond && !closed ? "Shelve · comment" : "History"}
          </button>
        </div>
      </td>
    </tr>
  );
}

function AlertDetailPanel({ id, a, timeZone, canRespond, actions }: { id: number; a: AlertListItem; timeZone: string; canRespond: boolean; actions: AlertFormActions }) {
  const queryClient = useQueryClient();
  const detail = useAlertDetail(id);
  const refresh = () => void queryClient.invalidateQueries({ queryKey: ["alerts"] });
  // eslint-disable-next-line react-hooks/purity -- whether a shelve has run out is judged when the panel renders; the list refetches every minute
  const shelved = a.shelvedUntilTs !== null && a.shelvedUntilTs > Date.now();
  const closed = a.state === "closed";
  return (
    <div className="grid gap-5 lg:grid-cols-[1fr_22rem]" data-testid="alert-detail">
      <div>
        <h3 className="mb-1.5 text-xs font-semibold uppercase tracking-wide text-ink-faint">History</h3>
        <p className="mb-2 text-xs text-ink-soft">
          Rule {a.ruleName ? `“${a.ruleName}”` : a.ruleId}, version {a.ruleVersion} · {ALERT_STATE_WORDS[a.state]}
          {a.expectedCrossingTs !== null && a.kind === "rh_forecast" ? ` · expected to cross the limit at ${formatPlantTime(a.expectedCrossingTs, timeZone, "d MMM HH:mm")}` : ""}
        </p>
        {detail.isLoading ? <p className="text-sm text-ink-faint">Loading the history…</p> : null}
        {detail.error ? <p className="text-sm text-over">Could not load the history.</p> : null}
        <ol className="space-y-1 text-sm" data-testid="alert-events">
          {detail.data?.events.map((e) => (
            <li key={e.id} className="flex gap-3">
              <span className="num w-24 shrink-0 text-xs text-ink-faint">{formatPlantTime(e.ts, timeZone, "d MMM HH:mm:ss")}</span>
              <span>
                <span className="font-medium">{ALERT_EVENT_WORDS[e.kind] ?? e.kind}</span>
                {e.personName ? <span className="text-ink-soft"> by {e.personName}</span> : null}
                {e.kind === "shelved" && e.value ? <span className="text-ink-soft"> until {formatPlantTime(Number(e.value), timeZone, "d MMM HH:mm")}</span> : null}
                {e.comment ? <span className="text-ink-soft"> — {e.comment}</span> : null}
              </span>
            </li>
          ))}
        </ol>
      </div>
      {canRespond ? (
        <div className="space-y-4">
          {!closed && !shelved ? (
            <ActionForm action={actions.shelve} onSuccess={refresh} className="space-y-2 rounded border border-paper-line bg-paper-raised p-3">
              <h3 className="text-sm font-semibold text-ink">Shelve</h3>
              <ShelveFields alertId={a.id} />
              <SubmitButton variant="quiet">Shelve alert</SubmitButton>
            </ActionForm>
          ) : null}
          {shelved ? (
            <ActionForm action={actions.unshelve} onSuccess={refresh} className="rounded border border-paper-line bg-paper-raised p-3">
              <input type="hidden" name="alertId" value={a.id} />
              <p className="mb-2 text-xs text-ink-soft">Shelved: {a.shelvedReason}</p>
              <SubmitButton variant="quiet">Unshelve now</SubmitButton>
            </ActionForm>
          ) : null}
          <ActionForm action={actions.comment} onSuccess={() => { refresh(); void detail.refetch(); }} resetOnSuccess className="space-y-2 rounded border border-paper-line bg-paper-raised p-3">
            <input type="hidden" name="alertId" value={a.id} />
            <Field label="Comment" name="comment">
              <textarea name="comment" rows={2} className={inputClass} placeholder="What was done, what was seen" maxLength={1000} />
            </Field>
            <SubmitButton variant="quiet">Add comment</SubmitButton>
          </ActionForm>
        </div>
      ) : null}
    </div>
  );
}


export type { AlertState };
