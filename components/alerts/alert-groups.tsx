"use client";
// Storm groups on the Alerts board: alerts told to on call in one message show as one group, a
// header with the message's title, how many, the time span and how many still want an
// acknowledgement, opening to the alerts inside. A table row group at the desk, a card on a phone.
import { Fragment, useState, type ReactNode } from "react";
import { useQueryClient } from "@tanstack/react-query";
import clsx from "clsx";
import { ActionForm, SubmitButton } from "@/components/forms/action-form";
import type { FormAction } from "./alert-actions";
import { SEVERITY_RANK, type Severity } from "@/lib/vocabulary";
import { groupSpanText, type AlertListGroup } from "@/lib/alerts/alert-list-groups";
import { SeverityTag } from "./alert-bits";

function worstSeverity(g: AlertListGroup): Severity {
  return g.alerts.reduce<Severity>((s, a) => (SEVERITY_RANK[a.severity] > SEVERITY_RANK[s] ? a.severity : s), "low");
}

function Chevron({ open }: { open: boolean }) {
  return (
    <svg viewBox="0 0 12 12" className={clsx("h-3 w-3 shrink-0 transition-transform", open && "rotate-90")} aria-hidden="true">
      <path d="M4 2l4 4-4 4" fill="none" stroke="currentColor" strokeWidth="1.6" />
    </svg>
  );
}

/** `stacked`: on a phone the severity and the count go under the title, which then keeps the card's width. */
function GroupSummary({ g, open, timeZone, stacked = false }: { g: AlertListGroup; open: boolean; timeZone: string; stacked?: boolean }) {
  return (
    <>
      <span className="flex min-w-0 items-start gap-2">
        <span className="mt-1 text-ink-soft">
          <Chevron open={open} />
        </span>
        <span className="min-w-0">
          <span className="block text-[11px] font-semibold uppercase tracking-wide text-ink-faint">Sent together · {g.alerts.length} alerts</span>
          <span className="block break-words font-medium text-ink" data-testid="alert-group-title">
            {g.title}
          </span>
          <span className="num block text-xs text-ink-soft">{groupSpanText(g, timeZone)}</span>
        </span>
      </span>
      <span className={clsx("flex shrink-0 text-xs", stacked ? "flex-row items-center gap-3 pl-5" : "flex-col items-end gap-1")}>
        <SeverityTag severity={worstSeverity(g)} />
        <span className={clsx("num", g.unacked > 0 ? "font-semibold text-ink" : "text-ink-faint")}>{g.unacked > 0 ? `${g.unacked} not acknowledged` : "all acknowledged"}</span>
      </span>
    </>
  );
}

/** "Acknowledge all 4": every alert of the group still waiting, for shift leads and up. */
function AckGroupForm({ group, ackGroup, className }: { group: AlertListGroup; ackGroup?: FormAction; className?: string }) {
  const queryClient = useQueryClient();
  if (!ackGroup || group.unacked === 0) return null;
  return (
    <ActionForm action={ackGroup} onSuccess={() => void queryClient.invalidateQueries({ queryKey: ["alerts"] })} className={className}>
      <input type="hidden" name="group" value={group.key} />
      <SubmitButton variant="quiet">{group.unacked === 1 ? "Acknowledge the 1 left" : `Acknowledge all ${group.unacked}`}</SubmitButton>
    </ActionForm>
  );
}

/** The desk: a header row across the table, then (opened) the group's alert rows drawn by `renderAlert`. */
export function AlertGroupRows({
  group,
  timeZone,
  colSpan,
  renderAlert,
  ackGroup,
}: {
  group: AlertListGroup;
  timeZone: string;
  colSpan: number;
  renderAlert: (a: AlertListGroup["alerts"][number]) => ReactNode;
  ackGroup?: FormAction;
}) {
  const [open, setOpen] = useState(false);
  return (
    <>
      <tr className="border-b border-paper-line bg-paper-sunk" data-testid="alert-group" data-group-key={group.key} data-count={group.alerts.length}>
        <td colSpan={colSpan} className="px-3 py-2">
          <div className="flex items-center gap-4">
            <button type="button" onClick={() => setOpen((o) => !o)} aria-expanded={open} className="flex min-w-0 flex-1 items-start justify-between gap-4 text-left" data-testid="alert-group-toggle">
              <GroupSummary g={group} open={open} timeZone={timeZone} />
            </button>
            <AckGroupForm group={group} ackGroup={ackGroup} className="shrink-0" />
          </div>
        </td>
      </tr>
      {open ? group.alerts.map((a) => <Fragment key={a.id}>{renderAlert(a)}</Fragment>) : null}
    </>
  );
}

/** A phone: one card for the group; opened, the alerts' own cards inside it. */
export function AlertGroupCard({ group, timeZone, children, ackGroup }: { group: AlertListGroup; timeZone: string; children: ReactNode; ackGroup?: FormAction }) {
  const [open, setOpen] = useState(false);
  return (
    <li className={clsx("rounded-card border bg-paper-sunk p-3", group.unacked > 0 ? "border-ink-soft" : "border-paper-line")} data-testid="alert-group" data-group-key={group.key} data-count={group.alerts.length}>
      <button type="button" onClick={() => setOpen((o) => !o)} aria-expanded={open} className="flex w-full flex-col gap-1.5 text-left" data-testid="alert-group-toggle">
        <GroupSummary g={group} open={open} timeZone={timeZone} stacked />
      </button>
      <AckGroupForm group={group} ackGroup={ackGroup} className="mt-2.5 [&_button]:min-h-11 [&_button]:w-full" />
      {open ? <ul className="-mx-1.5 mt-3 space-y-2">{children}</ul> : null}
    </li>
  );
}
