"use client";
// Add or edit a neutralizer. Warnings about settings that will not work (lib/equipment-warnings)
// update as the engineer types; they advise, they do not block saving.
import { useState } from "react";
import { ActionForm, Field, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import { neutralizerWarnings, type EquipmentWarning, type NeutralizerSettings } from "@/lib/equipment-warnings";
import type { NeutralizerWrite } from "@/lib/views/neutralizers";
import { NEUTRALIZER_KIND_LABELS, NEUTRALIZER_KIND_SPECS, NEUTRALIZER_KINDS, type NeutralizerKind } from "@/lib/physics/neutralizer-kinds";
import { NEUTRALIZER_STATES, NEUTRALIZER_STATE_WORDS } from "@/lib/vocabulary";

type Place = { points: { id: number; lineId: number; label: string }[]; lines: { id: number; solvent: boolean }[] };

export type NeutralizerFormValues = NeutralizerWrite & { id?: number };

const KINDS: Array<[NeutralizerSettings["kind"], string]> = NEUTRALIZER_KINDS.map((k) => [k, NEUTRALIZER_KIND_LABELS[k]]);

function kindHint(kind: NeutralizerKind): string {
  const spec = NEUTRALIZER_KIND_SPECS[kind];
  const range = spec.mountingMinMm !== null && spec.mountingMaxMm !== null ? `usually ${spec.mountingMinMm}–${spec.mountingMaxMm} mm from the web` : "no usual range assumed";
  return `${spec.description} ${range}; decay limit ${spec.defaultMaxDecayS} s by default.`;
}
const STATES: Array<[NeutralizerSettings["state"], string]> = NEUTRALIZER_STATES.map((s) => [s, NEUTRALIZER_STATE_WORDS[s]]);

const num = (v: FormDataEntryValue | null) => {
  if (typeof v !== "string" || v.trim() === "") return null;
  const n = Number(v.replace(",", "."));
  return Number.isFinite(n) ? n : null;
};

function readSettings(form: HTMLFormElement, places: Place): NeutralizerSettings {
  const fd = new FormData(form);
  const pointId = num(fd.get("pointId"));
  const lineId = places.points.find((p) => p.id === pointId)?.lineId;
  const kind = KINDS.find(([k]) => k === fd.get("kind"))?.[0] ?? "ac_bar";
  const state = STATES.find(([s]) => s === fd.get("state"))?.[0] ?? "in_service";
  return {
    kind,
    airAssisted: fd.get("airAssisted") === "on",
    mountingDistanceMm: num(fd.get("mountingDistanceMm")),
    lengthMm: num(fd.get("lengthMm")),
    outputKv: num(fd.get("outputKv")),
    pointId,
    state,
    cleaningIntervalDays: num(fd.get("cleaningIntervalDays")) ?? 14,
    checkIntervalDays: num(fd.get("checkIntervalDays")) ?? 90,
    solventLine: places.lines.find((l) => l.id === lineId)?.solvent ?? false,
  };
}

export function NeutralizerForm({
  action,
  places,
  initial,
  submitLabel,
  wide = false,
}: {
  action: (prev: FormResult, fd: FormData) => Promise<FormResult>;
  places: Place;
  initial?: NeutralizerFormValues;
  submitLabel: string;
  /** lay the fields out in more columns (the wide column of a page) */
  wide?: boolean;
}) {
  const v = initial;
  const [kind, setKind] = useState<NeutralizerKind>(v?.kind ?? "ac_bar");
  const [warnings, setWarnings] = useState<EquipmentWarning[]>(() =>
    v
      ? neutralizerWarnings({ ...v, solventLine: places.lines.find((l) => l.id === places.points.find((p) => p.id === v.pointId)?.lineId)?.solvent ?? false })
      : [],
  );
  return (
    <div onChange={(e) => {
      const form = (e.target as HTMLElement).closest("form");
      if (!form) return;
      const settings = readSettings(form, places);
      setKind(settings.kind);
      setWarnings(neutralizerWarnings(settings));
    }}>
      <ActionForm action={action} className={wide ? "grid gap-3 md:grid-cols-2" : "space-y-3"} successMessage={v ? "Saved." : "Added."} resetOnSuccess={!v}>
        {v?.id ? <input type="hidden" name="id" value={v.id} /> : null}
        <div className="grid grid-cols-2 gap-3">
          <Field label="Tag" name="tag">
            <input name="tag" className={inputClass} defaultValue={v?.tag ?? ""} required maxLength={60} />
          </Field>
          <Field label="Kind" name="kind" hint={kindHint(kind)}>
            <select name="kind" className={inputClass} defaultValue={v?.kind ?? "ac_bar"}>
              {KINDS.map(([k, label]) => (
                <option key={k} value={k}>
                  {label}
                </option>
              ))}
            </select>
          </Field>
        </div>
        <Field label="Measuring point it serves" name="pointId" hint="It sits just upstream of this point on the web path">
          <select name="pointId" className={inputClass} defaultValue={v?.pointId ?? ""}>
            <option value="">Not placed</option>
            {places.points.map((p) => (
              <option key={p.id} value={p.id}>
                {p.label}
              </option>
            ))}
          </select>
        </Field>
        <div className="grid grid-cols-2 gap-3">
          <Field label="Distance to the web, mm" name="mountingDistanceMm">
            <input name="mountingDistanceMm" inputMode="decimal" className={inputClass} defaultValue={v?.mountingDistanceMm ?? ""} />
          </Field>
          <Field label="Length, mm" name="lengthMm">
            <input name="lengthMm" inputMode="decimal" className={inputClass} defaultValue={v?.lengthMm ?? ""} />
          </Field>
        </div>
        <label className="flex items-center gap-2 self-end pb-2 text-sm text-ink-soft">
          <input type="checkbox" name="airAssisted" defaultChecked={v?.airAssisted ?? false} className="h-4 w-4 accent-brand" />
          Air-assisted (compressed air carries the ions)
        </label>
        <div className="grid grid-cols-2 gap-3">
          <Field label="Power unit" name="powerUnit">
            <input name="powerUnit" className={inputClass} defaultValue={v?.powerUnit ?? ""} maxLength={120} />
          </Field>
          <Field label="Output, kV" name="outputKv">
            <input name="outputKv" inputMode="decimal" className={inputClass} defaultValue={v?.outputKv ?? ""} />
          </Field>
        </div>
        <div className="grid grid-cols-2 gap-3 sm:grid-cols-3">
          <Field label="Installed on" name="installedOn" className="col-span-2 sm:col-span-1">
            <input name="installedOn" type="date" className={inputClass} defaultValue={v?.installedOn ?? ""} />
          </Field>
          <Field label="Clean every, days" name="cleaningIntervalDays">
            <input name="cleaningIntervalDays" inputMode="numeric" className={inputClass} defaultValue={v?.cleaningIntervalDays ?? 14} required />
          </Field>
          <Field label="Check every, days" name="checkIntervalDays">
            <input name="checkIntervalDays" inputMode="numeric" className={inputClass} defaultValue={v?.checkIntervalDays ?? 90} required />
          </Field>
        </div>
        <Field label="State" name="state">
          <select name="state" className={inputClass} defaultValue={v?.state ?? "in_service"}>
            {STATES.map(([s, label]) => (
              <option key={s} value={s}>
                {label}
              </option>
            ))}
          </select>
        </Field>
        <Field label="Notes" name="notes" className={wide ? "md:col-span-2" : undefined}>
          <textarea name="notes" rows={2} className={inputClass} defaultValue={v?.notes ?? ""} maxLength={2000} />
        </Field>
        {warnings.length > 0 ? (
          <ul className="space-y-1.5 md:col-span-2 rounded border border-near/40 bg-near-soft/60 px-3 py-2 text-xs text-ink" data-testid="equipment-warnings">
            {warnings.map((w) => (
              <li key={w.code} className="flex gap-1.5">
                <svg viewBox="0 0 12 12" className="mt-0.5 h-3 w-3 shrink-0 text-near" aria-hidden="true">
                  <path d="M6 1 L11 11 L1 11 Z" fill="currentColor" />
                </svg>
                <span>
                  {w.message} <span className="text-ink-faint">({w.source})</span>
                </span>
              </li>
            ))}
          </ul>
        ) : null}
        <div className={wide ? "md:col-span-2" : undefined}>
          <SubmitButton>{submitLabel}</SubmitButton>
        </div>
      </ActionForm>
    </div>
  );
}
