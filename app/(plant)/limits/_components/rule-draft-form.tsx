"use client";
// The form for one rule being edited: its settings, delays, severity and gating, the reason for
// the change, the replay span, and the replay result beside it. Save is offered only once the
// values on screen have been replayed.
import clsx from "clsx";
import type { Dispatch, SetStateAction } from "react";
import { inputClass } from "@/components/forms/action-form";
import { EmptyState } from "@/components/ui/page";
import { RULE_KIND_WORDS, SEVERITY_WORDS } from "@/lib/vocabulary";
import type { ReplayResult } from "@/lib/views/replay";
import { NOT_LINE_GATED, PARAM_FIELDS, summarizeParams } from "./rule-fields";
import type { Draft } from "./rule-draft";
import { LEVEL_WORDS, levelOf } from "./rules-in-force";
import { ReplayView } from "./replay-view";

export type EditorMessage = { tone: "ok" | "error"; text: string };

export function RuleDraftForm({
  draft,
  setDraft,
  fieldErrors,
  fromText,
  setFromText,
  toText,
  setToText,
  busy,
  replay,
  replayed,
  runReplay,
  save,
  message,
  timeZone,
}: {
  draft: Draft;
  setDraft: Dispatch<SetStateAction<Draft | null>>;
  fieldErrors: Record<string, string[]>;
  fromText: string;
  setFromText: (v: string) => void;
  toText: string;
  setToText: (v: string) => void;
  busy: "replay" | "save" | null;
  replay: { key: string; result: ReplayResult } | null;
  replayed: boolean;
  runReplay: () => void;
  save: () => void;
  message: EditorMessage | null;
  timeZone: string;
}) {
  return (
  <section className="rounded-card border border-brand/40 bg-paper-raised" data-testid="rule-editor">
    <header className="flex flex-wrap items-baseline justify-between gap-2 border-b border-paper-line px-4 py-2.5">
      <h2 className="text-sm font-semibold text-ink">
        {draft.ruleId !== undefined ? `Edit ${RULE_KIND_WORDS[draft.kind].toLowerCase()} (version ${draft.baseVersion} → ${(draft.baseVersion ?? 0) + 1})` : `New ${RULE_KIND_WORDS[draft.kind].toLowerCase()} rule`}{" "}
        <span className="font-normal text-ink-soft">at {draft.place.label}</span>
      </h2>
      <button type="button" className="text-xs text-ink-soft hover:text-ink" onClick={() => setDraft(null)}>
        Cancel
      </button>
    </header>
    <div className="grid gap-5 p-4 xl:grid-cols-[minmax(0,22rem)_1fr]">
      <div className="space-y-3">
        {draft.from && draft.ruleId === undefined ? (
          <p className="rounded bg-paper-sunk px-2.5 py-1.5 text-xs text-ink-soft">
            Starts from the {LEVEL_WORDS[levelOf(draft.from)]} rule ({summarizeParams(draft.kind, draft.from.params)}). Saving adds a rule here that takes precedence.
          </p>
        ) : null}
        <div className="grid grid-cols-2 gap-3">
          {PARAM_FIELDS[draft.kind].map((f) => (
            <NumberField
              key={f.key}
              name={`params.${f.key}`}
              label={f.label}
              unit={f.unit}
              hint={f.hint}
              step={f.step}
              choices={f.choices}
              value={draft.fields[f.key] ?? ""}
              placeholder={f.optional ? "optional" : undefined}
              errors={fieldErrors[`params.${f.key}`]}
              onChange={(v) => setDraft({ ...draft, fields: { ...draft.fields, [f.key]: v } })}
            />
          ))}
          <NumberField name="onDelayS" label="On-delay" unit="s" hint="Must hold this long before it is raised." value={draft.onDelayS} errors={fieldErrors.onDelayS} onChange={(v) => setDraft({ ...draft, onDelayS: v })} />
          <NumberField name="offDelayS" label="Off-delay" unit="s" hint="Must be clear this long before it clears." value={draft.offDelayS} errors={fieldErrors.offDelayS} onChange={(v) => setDraft({ ...draft, offDelayS: v })} />
          <label className="block">
            <span className="text-xs font-medium text-ink-soft">Severity</span>
            <select className={`${inputClass} mt-1`} value={draft.severity} onChange={(e) => setDraft({ ...draft, severity: e.target.value === "high" ? "high" : e.target.value === "low" ? "low" : "medium" })} aria-label="Severity">
              {(["low", "medium", "high"] as const).map((s) => (
                <option key={s} value={s}>
                  {SEVERITY_WORDS[s]}
                </option>
              ))}
            </select>
          </label>
          <div className="space-y-1.5 pt-5 text-sm">
            <label className={clsx("flex items-center gap-2", NOT_LINE_GATED.has(draft.kind) && "text-ink-faint")}>
              <input type="checkbox" checked={draft.onlyWhileRunning} disabled={NOT_LINE_GATED.has(draft.kind)} onChange={(e) => setDraft({ ...draft, onlyWhileRunning: e.target.checked })} />
              Only while the line runs
            </label>
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={draft.enabled} onChange={(e) => setDraft({ ...draft, enabled: e.target.checked })} />
              On (untick to exempt this place)
            </label>
          </div>
        </div>
        {fieldErrors.scope || fieldErrors.kind ? <p className="text-xs text-over">{(fieldErrors.scope ?? fieldErrors.kind ?? [])[0]}</p> : null}
        <label className="block">
          <span className="text-xs font-medium text-ink-soft">Why (kept in the audit log)</span>
          <input className={`${inputClass} mt-1`} value={draft.comment} maxLength={300} onChange={(e) => setDraft({ ...draft, comment: e.target.value })} placeholder="e.g. fewer nuisance alerts at the unwind after new film" aria-label="Why" />
        </label>
        <div className="rounded border border-paper-line bg-paper p-3">
          <p className="mb-2 text-xs font-medium text-ink-soft">Replay over recorded data (plant time)</p>
          <div className="grid grid-cols-2 gap-2">
            <input type="datetime-local" className={inputClass} value={fromText} onChange={(e) => setFromText(e.target.value)} aria-label="Replay from" />
            <input type="datetime-local" className={inputClass} value={toText} onChange={(e) => setToText(e.target.value)} aria-label="Replay to" />
          </div>
          {fieldErrors.fromTs ? <p className="mt-1 text-xs text-over">{fieldErrors.fromTs[0]}</p> : null}
          <div className="mt-3 flex flex-wrap items-center gap-2">
            <button type="button" onClick={runReplay} disabled={busy !== null} className="rounded bg-brand px-3 py-1.5 text-sm font-medium text-white hover:bg-brand-deep disabled:opacity-50" data-testid="replay-button">
              {busy === "replay" ? "Replaying…" : replayed ? "Replay again" : "Replay"}
            </button>
            <button
              type="button"
              onClick={save}
              disabled={!replayed || busy !== null}
              title={replayed ? undefined : "Replay these values first"}
              className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm font-medium text-ink hover:bg-paper-sunk disabled:opacity-50"
              data-testid="save-button"
            >
              {busy === "save" ? "Saving…" : draft.ruleId !== undefined ? `Save as version ${(draft.baseVersion ?? 0) + 1}` : "Save rule here"}
            </button>
            {!replayed ? <span className="text-xs text-ink-faint">Replay these values before saving.</span> : null}
          </div>
        </div>
        {message ? (
          <p role={message.tone === "error" ? "alert" : "status"} className={clsx("rounded px-3 py-2 text-sm", message.tone === "ok" ? "bg-brand-soft text-brand-deep" : "bg-over-soft text-over")} data-testid="limits-message">
            {message.text}
          </p>
        ) : null}
      </div>
      <div className="min-w-0">
        {replay ? (
          <ReplayView result={replay.result} timeZone={timeZone} kind={draft.kind} stale={!replayed} />
        ) : (
          <EmptyState title="No replay yet">
            Replay the values on the left over the recorded data (by default the last 7 days) to see how many alerts they would have raised, when and for how
            long, beside the current rules.
          </EmptyState>
        )}
      </div>
    </div>
  </section>
  );
}

function NumberField({
  name,
  label,
  unit,
  hint,
  step,
  value,
  onChange,
  errors,
  choices,
  placeholder,
}: {
  name: string;
  label: string;
  unit: string;
  hint?: string;
  step?: string;
  value: string;
  onChange: (v: string) => void;
  errors?: string[];
  choices?: Array<{ value: string; label: string }>;
  placeholder?: string;
}) {
  return (
    <label className="block" title={hint}>
      <span className="text-xs font-medium text-ink-soft">
        {label}
        {unit ? <span className="font-normal text-ink-faint"> ({unit})</span> : null}
      </span>
      {choices ? (
        <select className={`${inputClass} mt-1`} value={value} onChange={(e) => onChange(e.target.value)} name={name} aria-label={label}>
          {choices.map((c) => (
            <option key={c.value} value={c.value}>
              {c.label}
            </option>
          ))}
        </select>
      ) : (
        <input
          className={clsx(inputClass, "num mt-1", errors?.length && "border-over")}
          inputMode="decimal"
          type="number"
          step={step ?? "any"}
          value={value}
          placeholder={placeholder}
          onChange={(e) => onChange(e.target.value)}
          name={name}
          aria-label={label}
          aria-invalid={errors?.length ? true : undefined}
        />
      )}
      {errors?.length ? <span className="mt-0.5 block text-xs text-over">{errors[0]}</span> : null}
    </label>
  );
}
