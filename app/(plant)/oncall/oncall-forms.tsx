"use client";
// The admin's forms on the on-call page: add a shift, remove one, change the e-mail settings.
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import { SEVERITY_WORDS } from "@/lib/vocabulary";
import { addShift, removeShift, saveAlertingSettings } from "./actions";

export function AddShiftForm({ people, defaultStart, defaultEnd }: { people: Array<{ id: number; name: string }>; defaultStart: string; defaultEnd: string }) {
  return (
    <ActionForm action={addShift} className="space-y-3" successMessage="Added to the roster." resetOnSuccess>
      <Field label="Person" name="personId">
        <select name="personId" className={inputClass} defaultValue="">
          <option value="" disabled>
            Choose…
          </option>
          {people.map((p) => (
            <option key={p.id} value={p.id}>
              {p.name}
            </option>
          ))}
        </select>
      </Field>
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        <Field label="From (plant time)" name="start">
          <input name="start" type="datetime-local" className={inputClass} defaultValue={defaultStart} />
        </Field>
        <Field label="Until (plant time)" name="end">
          <input name="end" type="datetime-local" className={inputClass} defaultValue={defaultEnd} />
        </Field>
      </div>
      <Field label="Escalation order" name="escalationOrder" hint="1 is called first; 2 when 1 does not acknowledge; and so on.">
        <input name="escalationOrder" type="number" min={1} max={9} className={inputClass} defaultValue={1} />
      </Field>
      <Field label="Note" name="note">
        <input name="note" className={inputClass} maxLength={200} placeholder="optional, e.g. covering for holiday" />
      </Field>
      <SubmitButton>Add to roster</SubmitButton>
    </ActionForm>
  );
}

export function RemoveShiftButton({ id, label }: { id: number; label: string }) {
  return (
    <ActionForm action={removeShift} className="inline">
      <input type="hidden" name="id" value={id} />
      <button type="submit" className="text-xs text-ink-faint hover:text-over hover:underline" aria-label={`Remove ${label}`}>
        Remove
      </button>
    </ActionForm>
  );
}

export function AlertingSettingsForm({ notifyMinSeverity, notifyAfterMin, escalateAfterMin, digestHourLocal }: { notifyMinSeverity: "low" | "medium" | "high"; notifyAfterMin: number; escalateAfterMin: number; digestHourLocal: number }) {
  return (
    <ActionForm action={saveAlertingSettings} className="space-y-3" successMessage="Saved. The alerts engine uses it on its next round.">
      <Field label="E-mail alerts of severity" name="notifyMinSeverity">
        <select name="notifyMinSeverity" className={inputClass} defaultValue={notifyMinSeverity}>
          {(["low", "medium", "high"] as const).map((s) => (
            <option key={s} value={s}>
              {SEVERITY_WORDS[s]} and above
            </option>
          ))}
        </select>
      </Field>
      <div className="grid grid-cols-2 gap-3">
        <Field label="Unacknowledged for (min)" name="notifyAfterMin">
          <input name="notifyAfterMin" type="number" min={0} step="any" className={inputClass} defaultValue={notifyAfterMin} />
        </Field>
        <Field label="Then escalate after (min)" name="escalateAfterMin">
          <input name="escalateAfterMin" type="number" min={1} step="any" className={inputClass} defaultValue={escalateAfterMin} />
        </Field>
      </div>
      <Field label="Daily digest at (plant hour, 0–23)" name="digestHourLocal">
        <input name="digestHourLocal" type="number" min={0} max={23} className={inputClass} defaultValue={digestHourLocal} />
      </Field>
      <SubmitButton variant="quiet">Save settings</SubmitButton>
    </ActionForm>
  );
}
