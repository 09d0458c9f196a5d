"use client";
// The Planned work forms: open a window (target, owner, reason, start, end; longer than 12 h
// needs a reason), extend one with a reason, end one now. The server checks everything again.
import { useEffect, useRef, useState } from "react";
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
  // controlled, so a refused form keeps what was typed (a form action resets uncontrolled fields)
  const initial = { target: defaultTarget, ownerId: String(defaultOwnerId), reason: defaultReason, startTs: defaultStart, endTs: defaultEnd, extendReason: "" };
  const [v, setV] = useState(initial);
  const [long, setLong] = useState(false);
  const bind = (name: keyof typeof initial) => ({ name, value: v[name], onChange: (e: { target: { value: string } }) => setV((old) => ({ ...old, [name]: e.target.value })) });
  return (
    <ActionForm
      action={openMaintenanceWindow}
      className="space-y-3"
      onSuccess={() => {
        setV({ ...initial, reason: "" });
        setLong(false);
      }}
    >
      <KeepValuesOnReset values={v} />
      <Field label="Work on" name="targetKind" hint="A hall covers its lines; a line its points and bars; a bar the point it serves.">
        <select {...bind("target")} className={inputClass} required data-testid="maint-target">
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
        <select {...bind("ownerId")} className={inputClass}>
          {people.map((p) => (
            <option key={p.id} value={p.id}>
              {p.name}
            </option>
          ))}
        </select>
      </Field>
      <Field label="What is being done" name="reason">
        <input {...bind("reason")} className={inputClass} maxLength={300} required minLength={3} placeholder="e.g. cleaning the bars at the unwind" />
      </Field>
      <div className="grid grid-cols-1 gap-3">
        <Field label="Start (plant time)" name="startTs" hint="Now or later.">
          <input {...bind("startTs")} type="datetime-local" className={inputClass} required />
        </Field>
        <Field label="End (plant time)" name="endTs" hint={`At most ${maxHours} h unless you say why below.`}>
          <input {...bind("endTs")} type="datetime-local" className={inputClass} required />
        </Field>
      </div>
      <label className="flex items-center gap-2 text-sm text-ink-soft">
        <input type="checkbox" className="accent-brand" checked={long} onChange={(e) => setLong(e.target.checked)} /> It needs longer than {maxHours} h
      </label>
      {long ? (
        <Field label={`Why longer than ${maxHours} h`} name="extendReason">
          <input {...bind("extendReason")} className={inputClass} maxLength={300} placeholder="e.g. rebuild over two shifts, parts arrive tomorrow" />
        </Field>
      ) : null}
      <SubmitButton>Plan the work</SubmitButton>
    </ActionForm>
  );
}

/**
 * A form action resets the form when it finishes, and a reset puts a controlled <select> on its
 * first option while React still holds the chosen value, so the next send would carry the wrong
 * target. After a reset, this puts every named field back to the value React holds.
 */
function KeepValuesOnReset({ values }: { values: Record<string, string> }) {
  const ref = useRef<HTMLSpanElement>(null);
  const latest = useRef(values);
  useEffect(() => {
    latest.current = values;
  });
  useEffect(() => {
    const form = ref.current?.closest("form");
    if (!form) return;
    const restore = () =>
      window.setTimeout(() => {
        for (const [name, value] of Object.entries(latest.current)) {
          const el = form.elements.namedItem(name);
          if (el instanceof HTMLInputElement || el instanceof HTMLSelectElement) el.value = value;
        }
      }, 0);
    form.addEventListener("reset", restore);
    return () => form.removeEventListener("reset", restore);
  }, []);
  return <span ref={ref} hidden />;
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
