"use client";
// Add a note to a line at a moment ("new roll", "bar cleaned"). The moment is typed in plant
// time or picked by clicking a chart; it is sent as epoch ms. Posts to a server action that
// checks the role on the server (viewers get 403 there, whatever this form shows).
import { useEffect, useState } from "react";
import { ActionForm, Field, FieldError, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import { fromPlantLocalInput, toPlantLocalInput } from "@/lib/plant-time";

export type NoteAction = (prev: FormResult, fd: FormData) => Promise<FormResult>;

export function NoteForm({
  lineId,
  points,
  pickedTs,
  nowTs,
  timeZone,
  action,
  onAdded,
}: {
  lineId: number;
  points: Array<{ id: number; name: string; position: number }>;
  pickedTs: number | null;
  nowTs: number;
  timeZone: string;
  action: NoteAction;
  onAdded: () => void;
}) {
  const [local, setLocal] = useState(() => toPlantLocalInput(pickedTs ?? nowTs, timeZone));
  const [touched, setTouched] = useState(false);
  useEffect(() => {
    if (pickedTs !== null) {
      // eslint-disable-next-line react-hooks/set-state-in-effect -- a time picked on the chart overwrites the field once, and the person can still edit it
      setLocal(toPlantLocalInput(pickedTs, timeZone));
      setTouched(true);
    }
  }, [pickedTs, timeZone]);
  // until someone sets a time, the note is "now"
  useEffect(() => {
    // eslint-disable-next-line react-hooks/set-state-in-effect -- the field follows the ticking clock until someone edits it
    if (!touched) setLocal(toPlantLocalInput(nowTs, timeZone));
  }, [nowTs, touched, timeZone]);
  const ts = touched ? fromPlantLocalInput(local, timeZone) : pickedTs ?? nowTs;

  return (
    <ActionForm
      action={action}
      className="space-y-2.5"
      successMessage="Note added."
      resetOnSuccess
      onSuccess={() => {
        setTouched(false);
        onAdded();
      }}
    >
      <input type="hidden" name="lineId" value={lineId} />
      <input type="hidden" name="ts" value={ts ?? ""} />
      <Field label="Time (plant time)" name="ts" hint="Or click a moment on any chart.">
        <input
          type="datetime-local"
          value={local}
          onChange={(e) => {
            setLocal(e.target.value);
            setTouched(true);
          }}
          className={inputClass}
          aria-label="Time of the note"
        />
      </Field>
      <Field label="About" name="pointId">
        <select name="pointId" className={inputClass} defaultValue="">
          <option value="">The whole line</option>
          {points.map((p) => (
            <option key={p.id} value={p.id}>
              {p.position} · {p.name}
            </option>
          ))}
        </select>
      </Field>
      <label className="block">
        <span className="text-xs font-medium text-ink-soft">Note</span>
        <textarea name="text" rows={2} maxLength={500} required placeholder="e.g. new roll of film; cleaned the bar at the unwind" className={`${inputClass} mt-1`} aria-label="Note text" />
        <FieldError name="text" />
      </label>
      <FieldError name="lineId" />
      <SubmitButton>Add note</SubmitButton>
    </ActionForm>
  );
}
