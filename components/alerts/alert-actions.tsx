"use client";
// The three things a shift lead does with an alert — acknowledge, comment, shelve (and
// unshelve) — as forms with large touch targets, shared by the phone cards on the Alerts page
// and the alert page (/alerts/[id]). Each posts to the server actions the page hands in; the
// actions check the role again on the server.
import { useState } from "react";
import clsx from "clsx";
import { ActionForm, Field, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import type { AlertState } from "@/lib/vocabulary";

export type FormAction = (prev: FormResult, fd: FormData) => Promise<FormResult>;
export type AlertFormActions = { ack: FormAction; comment: FormAction; shelve: FormAction; unshelve: FormAction; /** every alert of a storm group at once */ ackGroup?: FormAction };

export const SHELVE_CHOICES: Array<{ min: number; label: string }> = [
  { min: 30, label: "30 minutes" },
  { min: 60, label: "1 hour" },
  { min: 120, label: "2 hours" },
  { min: 240, label: "4 hours" },
  { min: 480, label: "8 hours (a shift)" },
  { min: 1440, label: "24 hours" },
  { min: 4320, label: "3 days" },
  { min: 10080, label: "7 days (longest)" },
];

/** The fields of a shelving (how long, why) with the words that say what it does; the board's panel and the phone cards both use it. */
export function ShelveFields({ alertId }: { alertId: number }) {
  return (
    <>
      <p className="text-xs text-ink-soft">Shelving holds this alert&apos;s messages for a stated time; it ends on its own.</p>
      <input type="hidden" name="alertId" value={alertId} />
      <Field label="For" name="durationMin">
        <select name="durationMin" className={inputClass} defaultValue="120">
          {SHELVE_CHOICES.map((c) => (
            <option key={c.min} value={c.min}>
              {c.label}
            </option>
          ))}
        </select>
      </Field>
      <Field label="Reason" name="reason">
        <input name="reason" className={inputClass} placeholder="e.g. bar cleaned, waiting for new roll" maxLength={300} />
      </Field>
    </>
  );
}

const bigButton = "inline-flex min-h-11 flex-1 items-center justify-center rounded px-3 text-sm font-medium";

/**
 * A row of thumb-sized buttons: Acknowledge (when it can be), Comment, Shelve (or Unshelve);
 * Comment and Shelve open their form above the row so the buttons stay where the thumb is.
 */
export function AlertActionBar({
  alertId,
  state,
  shelved,
  shelvedReason,
  actions,
  onDone,
}: {
  alertId: number;
  state: AlertState;
  shelved: boolean;
  shelvedReason?: string | null;
  actions: AlertFormActions;
  onDone: () => void;
}) {
  const [open, setOpen] = useState<"comment" | "shelve" | null>(null);
  const ackable = state === "active_unacked" || state === "cleared_unacked";
  const closed = state === "closed";
  const toggle = (which: "comment" | "shelve") => setOpen((o) => (o === which ? null : which));
  return (
    <div className="space-y-2" data-testid="alert-action-bar">
      {open === "comment" ? (
        <ActionForm
          action={actions.comment}
          onSuccess={() => {
            setOpen(null);
            onDone();
          }}
          resetOnSuccess
          className="space-y-2 rounded border border-paper-line bg-paper p-3"
        >
          <input type="hidden" name="alertId" value={alertId} />
          <Field label="Comment" name="comment">
            <textarea name="comment" rows={3} className={inputClass} placeholder="What was done, what was seen" maxLength={1000} required />
          </Field>
          <SubmitButton>Add comment</SubmitButton>
        </ActionForm>
      ) : null}
      {open === "shelve" && !shelved ? (
        <ActionForm
          action={actions.shelve}
          onSuccess={() => {
            setOpen(null);
            onDone();
          }}
          className="space-y-2 rounded border border-paper-line bg-paper p-3"
        >
          <ShelveFields alertId={alertId} />
          <SubmitButton>Shelve alert</SubmitButton>
        </ActionForm>
      ) : null}
      <div className="flex gap-2">
        {ackable ? (
          <ActionForm action={actions.ack} onSuccess={onDone} className="flex flex-1">
            <input type="hidden" name="alertId" value={alertId} />
            <button type="submit" className={clsx(bigButton, "w-full bg-brand text-white hover:bg-brand-deep")} data-testid="alert-ack">
              {state === "cleared_unacked" ? "Acknowledge & close" : "Acknowledge"}
            </button>
          </ActionForm>
        ) : null}
        <button
          type="button"
          className={clsx(bigButton, "border border-paper-line bg-paper-raised text-ink hover:bg-paper-sunk")}
          aria-expanded={open === "comment"}
          onClick={() => toggle("comment")}
        >
          Comment
        </button>
        {shelved ? (
          <ActionForm action={actions.unshelve} onSuccess={onDone} className="flex flex-1">
            <input type="hidden" name="alertId" value={alertId} />
            <button type="submit" className={clsx(bigButton, "w-full border border-paper-line bg-paper-raised text-ink hover:bg-paper-sunk")} title={shelvedReason ?? undefined}>
              Unshelve
            </button>
          </ActionForm>
        ) : !closed ? (
          <button
            type="button"
            className={clsx(bigButton, "border border-paper-line bg-paper-raised text-ink hover:bg-paper-sunk")}
            aria-expanded={open === "shelve"}
            onClick={() => toggle("shelve")}
          >
            Shelve
          </button>
        ) : null}
      </div>
    </div>
  );
}
