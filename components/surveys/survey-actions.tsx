"use client";
// Actions from survey findings: the list (owner, due date, overdue), closing one with a note
// or by a re-survey of the points involved, and turning a finding into an action.
import { useState } from "react";
import Link from "next/link";
import { ActionForm, Field, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import { StateBadge } from "@/components/ui/state-badge";
import { ACTION_KIND_LABELS, ACTION_KINDS, type SurveyActionKind } from "@/lib/surveys/vocabulary";
import type { SurveyActionView } from "@/lib/surveys/types";

type ServerAction = (prev: FormResult, fd: FormData) => Promise<FormResult>;

export function SurveyActionList({ actions, canClose, closeAction, today }: { actions: SurveyActionView[]; canClose: boolean; closeAction?: ServerAction; today: string }) {
  if (!actions.length) return <p className="text-sm text-ink-faint">No actions.</p>;
  return (
    <ul className="divide-y divide-paper-line" data-testid="survey-actions">
      {actions.map((a) => (
        <li key={a.id} className="py-2" data-testid="survey-action" data-state={a.state}>
          <div className="flex flex-wrap items-start gap-x-3 gap-y-1">
            <div className="min-w-0 flex-1">
              <p className="text-sm text-ink">
                <b className="font-medium">{ACTION_KIND_LABELS[a.kind]}</b> — {a.text}
              </p>
              <p className="text-xs text-ink-faint">
                {a.lineName} · owner {a.ownerName} · due {a.dueDate} ·{" "}
                <Link href={`/surveys/${a.surveyId}`} className="text-brand hover:underline">
                  survey #{a.surveyId}
                </Link>
                {a.state === "closed" ? ` · closed${a.resurveyId ? ` by re-survey #${a.resurveyId}` : ""}${a.closeNote ? `: ${a.closeNote}` : ""}` : ""}
              </p>
            </div>
            {a.state === "open" ? (
              a.dueDate < today ? <StateBadge state="over" label="Overdue" /> : <StateBadge state="near" label="Open" />
            ) : (
              <StateBadge state="normal" label="Closed" />
            )}
          </div>
          {a.state === "open" && canClose && closeAction ? <CloseForm action={a} closeAction={closeAction} /> : null}
        </li>
      ))}
    </ul>
  );
}

function CloseForm({ action, closeAction }: { action: SurveyActionView; closeAction: ServerAction }) {
  const [open, setOpen] = useState(false);
  return (
    <div className="mt-1.5 flex flex-wrap gap-2">
      <Link href={`/surveys/plans/${action.planId}/round?resurvey=${action.id}`} className="rounded border border-paper-line px-2.5 py-1 text-xs text-ink hover:bg-paper-sunk">
        Re-survey to close
      </Link>
      {open ? (
        <ActionForm action={closeAction} className="flex w-full flex-wrap items-end gap-2">
          <input type="hidden" name="actionId" value={action.id} />
          <Field label="What was done" name="note" className="min-w-0 flex-1">
            <input name="note" className={inputClass} maxLength={500} required />
          </Field>
          <SubmitButton variant="quiet">Close the action</SubmitButton>
        </ActionForm>
      ) : (
        <button type="button" onClick={() => setOpen(true)} className="rounded border border-paper-line px-2.5 py-1 text-xs text-ink hover:bg-paper-sunk">
          Close with a note
        </button>
      )}
    </div>
  );
}

const SUGGESTED: Record<string, SurveyActionKind> = { over_limit: "add_bar", low_reduction: "clean_bar", charge_build: "check_earthing" };

export function NewActionForm({
  surveyId,
  finding,
  owners,
  defaultDue,
  createAction,
}: {
  surveyId: number;
  finding: { id: number; kind: string; text: string };
  owners: { id: number; name: string }[];
  defaultDue: string;
  createAction: ServerAction;
}) {
  const [open, setOpen] = useState(false);
  if (!open) {
    return (
      <button type="button" onClick={() => setOpen(true)} className="mt-1 rounded border border-paper-line px-2.5 py-1 text-xs text-ink hover:bg-paper-sunk">
        Make an action
      </button>
    );
  }
  return (
    <ActionForm action={createAction} className="mt-2 grid gap-2 rounded border border-paper-line bg-paper p-2 sm:grid-cols-2" onSuccess={() => setOpen(false)}>
      <input type="hidden" name="surveyId" value={surveyId} />
      <input type="hidden" name="findingId" value={finding.id} />
      <Field label="Action" name="kind">
        <select name="kind" className={inputClass} defaultValue={SUGGESTED[finding.kind] ?? "other"}>
          {ACTION_KINDS.map((k) => (
            <option key={k} value={k}>
              {ACTION_KIND_LABELS[k]}
            </option>
          ))}
        </select>
      </Field>
      <Field label="Owner" name="ownerId">
        <select name="ownerId" className={inputClass} defaultValue="">
          <option value="" disabled>
            Pick an owner
          </option>
          {owners.map((o) => (
            <option key={o.id} value={o.id}>
              {o.name}
            </option>
          ))}
        </select>
      </Field>
      <Field label="What is to be done" name="text" className="sm:col-span-2">
        <input name="text" className={inputClass} maxLength={500} defaultValue={finding.text} />
      </Field>
      <Field label="Due" name="dueDate">
        <input type="date" name="dueDate" className={inputClass} defaultValue={defaultDue} />
      </Field>
      <div className="flex items-end">
        <SubmitButton>Add to the due list</SubmitButton>
      </div>
    </ActionForm>
  );
}
