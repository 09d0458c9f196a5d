"use client";
// The "cleaned" action and the note / fault report on an equipment page.
import { useState } from "react";
import Link from "next/link";
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import { addEquipmentNote, markCleaned } from "../actions";

export function CleanedForm({ id, nowLocal }: { id: number; nowLocal: string }) {
  const [cleaned, setCleaned] = useState(false);
  return (
    <>
      <ActionForm action={markCleaned} className="space-y-2" successMessage="Cleaning recorded; the cleaning clock starts again." resetOnSuccess onSuccess={() => setCleaned(true)}>
        <input type="hidden" name="id" value={id} />
        <div className="flex flex-wrap items-end gap-2">
          <div className="min-w-[11rem] flex-1">
            <Field label="Cleaned at" name="cleanedAt">
              <input type="datetime-local" name="cleanedAt" defaultValue={nowLocal} className={inputClass} />
            </Field>
          </div>
          <span className="whitespace-nowrap">
            <SubmitButton>Record cleaning</SubmitButton>
          </span>
        </div>
        <Field label="What was done (optional)" name="note">
          <input name="note" className={inputClass} maxLength={500} placeholder="e.g. wiped emitter pins with isopropanol" />
        </Field>
      </ActionForm>
      {cleaned ? (
        // a cleaned bar takes a while to settle: offer to keep its alerts from on call meanwhile
        <p className="mt-2 text-sm text-ink-soft" data-testid="cleaned-plan-offer">
          Still working on it, or want it to settle first?{" "}
          <Link href={`/maintenance?target=neutralizer:${id}&reason=${encodeURIComponent("Bar cleaned; settling")}#plan`} className="font-medium text-brand hover:underline">
            Plan work on this bar
          </Link>
        </p>
      ) : null}
    </>
  );
}

export function NoteForm({ subjectType, subjectId }: { subjectType: "neutralizer" | "device"; subjectId: number }) {
  return (
    <ActionForm action={addEquipmentNote} className="space-y-2" successMessage="Added to the history." resetOnSuccess>
      <input type="hidden" name="subjectType" value={subjectType} />
      <input type="hidden" name="subjectId" value={subjectId} />
      <Field label="Note" name="text">
        <textarea name="text" rows={2} className={inputClass} maxLength={1000} required />
      </Field>
      <div className="flex items-center gap-3">
        <label className="flex items-center gap-1.5 text-sm text-ink-soft">
          <input type="radio" name="kind" value="note" defaultChecked className="accent-brand" /> Note
        </label>
        <label className="flex items-center gap-1.5 text-sm text-ink-soft">
          <input type="radio" name="kind" value="fault" className="accent-brand" /> Fault report
        </label>
        <span className="ml-auto">
          <SubmitButton variant="quiet">Add</SubmitButton>
        </span>
      </div>
    </ActionForm>
  );
}
