"use client";
// The Planned work forms: open a window (target, owner, reason, start, end; longer than 12 h
// needs a reason), extend one with a reason, end one now. The server checks everything again.
import { useState } from "react";
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import type { MaintenanceTargetGroup } from "@/lib/views/maintenance";
import { endMaintenanceWindow, extendMaintenanceWindow, openMaintenanceWindow } from "../actions";

export function OpenWindowForm({
  targets,
  people,
  defaultTarget,
  defaultOwnerId,
  defaultStart,
  defaultEnd,
  defaultReason,
  maxHours,
}: {
  targets: MaintenanceTargetGroup[];
  people: Array<{ id: number; name: string }>;
  defaultTarget: string;
  defaultOwnerId: number;
  defaultStart: string;
  defaultEnd: string;
  defaultReason: string;
  maxHours: number;
}) {
  const [long, setLong] = useState(false);
  return (
    <ActionForm action={openMaintenanceWindow} className="space-y-3" resetOnSuccess>
      <Field label="Work on" name="targetKind" hint="A hall covers its lines; a line its points and bars; a bar the point it serves.">
        <select name="target" className={inputClass} defaultValue={defaultTarget} required data-testid="maint-target">
          <option value="" disabled>
            Choose a hall, line, point or bar…
          </option>
          {targets.map((g) => (
            <optgroup key={g.kind} label={g.label}>
              {g.options.map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
            </optgroup>
          ))}
        </select>
      </Field>
      <Field label="Owner" name="ownerId" hint="Who is doing the work and answers for it.">
        <select name="ownerId" className={inputClass} defaultValue={String(defaultOwnerId)}>
          {people.map((p) => (
            <option key={p.id} value={p.id}>
              {p.name}
            </option>
          ))}
        </select>
      </Field>
      <Field label="What is being done" name="reason">
        <input name="reason" className={inputClass} maxLength={300} required minLength={3} defaultValue={defaultReason} placeholder="e.g. cleaning the bars at the unwind" />
      </Field>
      <div className="grid grid-cols-1 gap-3">
        <Field label="Start (plant time)" name="startTs" hint="Now or later.">
          <input name="startTs" type="datetime-local" className={inputClass} defaultValue={defaultStart} required />
        </Field>
        <Field label="End (plant time)" name="endTs" hint={`At most ${maxHours} h unless you say why below.`}>
          <input name="endTs" type="datetime-local" className={inputClass} defaultValue={defaultEnd} required />
        </Field>
      </div>
      <label className="flex items-center gap-2 text-sm text-ink-soft">
        <input type="checkbox" className="accent-brand" checked={long} onChange={(e) => setLong(e.target.checked)} /> It needs longer than {maxHours} h
      </label>
      {long ? (
        <Field label={`Why longer than ${maxHours} h`} name="extendReason">
          <input name="extendReason" className={inputClass} maxLength={300} placeholder="e.g. rebuild over two shifts, parts arrive tomorrow" />
        </Field>
      ) : null}
      <SubmitButton>Plan the work</SubmitButton>
    </ActionForm>
  );
}

export function ExtendWindowForm({ id, defaultEnd }: { id: number; defaultEnd: string }) {
  return (
    <details className="group">
      <summary className="cursor-pointer list-none rounded border border-paper-line bg-paper-raised px-2.5 py-1 text-xs font-medium text-ink hover:bg-paper-sunk">Extend…</summary>
      <ActionForm action={extendMaintenanceWindow} className="mt-2 space-y-2" successMessage="Extended.">
        <input type="hidden" name="id" value={id} />
        <Field label="New end (plant time)" name="endTs">
          <input name="endTs" type="datetime-local" className={inputClass} defaultValue={defaultEnd} required />
        </Field>
        <Field label="Why it needs longer" name="reason">
          <input name="reason" className={inputClass} maxLength={300} required minLength={3} placeholder="e.g. waiting for a spare power unit" />
        </Field>
        <SubmitButton variant="quiet">Extend</SubmitButton>
      </ActionForm>
    </details>
  );
}

export function EndWindowButton({ id, planned }: { id: number; planned: boolean }) {
  return (
    <ActionForm action={endMaintenanceWindow} className="inline">
      <input type="hidden" name="id" value={id} />
      <SubmitButton variant="danger">{planned ? "Call off" : "End now"}</SubmitButton>
    </ActionForm>
  );
}
