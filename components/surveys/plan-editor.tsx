"use client";
// The survey plan editor: pick a line (one without fixed meters is surveyed only), then its
// spots in web-path order — the line's measuring points plus survey-only spots (unwind, idler
// groups, before and after each neutralizer, rewind). Saving a change makes a new version.
import { useState } from "react";
import { useRouter } from "next/navigation";
import clsx from "clsx";
import { ActionForm, Field, FieldError, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import type { PlanSpot } from "@/lib/surveys/schemas";
import type { SurveyLineOption } from "@/lib/surveys/types";

type ServerAction = (prev: FormResult, fd: FormData) => Promise<FormResult>;

function keyFor(name: string, taken: string[]): string {
  const base = name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 30) || "spot";
  let k = base;
  for (let i = 2; taken.includes(k); i++) k = `${base}-${i}`;
  return k;
}

export function PlanEditor({ lines, plan, saveAction }: { lines: SurveyLineOption[]; plan: { id: number; lineId: number; name: string; spots: PlanSpot[] } | null; saveAction: ServerAction }) {
  const router = useRouter();
  const [lineId, setLineId] = useState<number>(plan?.lineId ?? lines[0]?.id ?? 0);
  const [spots, setSpots] = useState<PlanSpot[]>(plan?.spots ?? []);
  const [extra, setExtra] = useState("");
  const line = lines.find((l) => l.id === lineId);
  const unused = (line?.points ?? []).filter((p) => !spots.some((s) => s.pointId === p.id));

  const move = (i: number, d: -1 | 1) => setSpots((s) => {
    const j = i + d;
    if (j < 0 || j >= s.length) return s;
    const c = [...s];
    [c[i], c[j]] = [c[j], c[i]];
    return c;
  });
  const change = (i: number, patch: Partial<PlanSpot>) => setSpots((s) => s.map((x, k) => (k === i ? { ...x, ...patch } : x)));

  return (
    <ActionForm
      action={saveAction}
      className="space-y-4"
      onSuccess={(r) => {
        const id = r?.ok && r.data && typeof r.data === "object" && "planId" in r.data ? Number(r.data.planId) : null;
        if (!plan && id) router.push(`/surveys/plans/${id}`);
      }}
    >
      {plan ? <input type="hidden" name="planId" value={plan.id} /> : null}
      <input type="hidden" name="spots" value={JSON.stringify(spots)} />
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Line" name="lineId">
          <select
            name="lineId"
            className={inputClass}
            value={lineId}
            disabled={!!plan}
            onChange={(e) => {
              setLineId(Number(e.target.value));
              setSpots([]);
            }}
          >
            {lines.map((l) => (
              <option key={l.id} value={l.id}>
                {l.areaName} — {l.name}
                {l.surveyOnly ? " (no fixed meters: survey only)" : ""}
              </option>
            ))}
          </select>
          {plan ? <input type="hidden" name="lineId" value={lineId} /> : null}
        </Field>
        <Field label="Plan name" name="name">
          <input name="name" className={inputClass} defaultValue={plan?.name ?? ""} placeholder="e.g. Full survey, Quick round" maxLength={120} />
        </Field>
      </div>

      <div>
        <p className="text-xs font-medium text-ink-soft">Spots in web-path order (unwind first)</p>
        <FieldError name="spots" />
        {spots.length === 0 ? <p className="mt-1 rounded border border-dashed border-paper-line px-3 py-4 text-center text-sm text-ink-faint">No spots yet: add the line&apos;s points or survey-only spots below.</p> : null}
        <ol className="mt-1 space-y-1.5" data-testid="plan-spots">
          {spots.map((s, i) => (
            <li key={s.key} className="rounded border border-paper-line bg-paper-raised p-2">
              <div className="flex items-center gap-2">
                <span className="num w-5 text-sm text-ink-faint">{i + 1}</span>
                <input aria-label={`Spot ${i + 1} name`} className={clsx(inputClass.replace("w-full", "w-0"), "min-w-0 flex-1")} value={s.name} maxLength={120} onChange={(e) => change(i, { name: e.target.value })} />
                <button type="button" aria-label="Move up" onClick={() => move(i, -1)} className="rounded border border-paper-line px-2 py-1 text-sm">↑</button>
                <button type="button" aria-label="Move down" onClick={() => move(i, 1)} className="rounded border border-paper-line px-2 py-1 text-sm">↓</button>
                <button type="button" aria-label="Remove" onClick={() => setSpots((x) => x.filter((_, k) => k !== i))} className="rounded border border-paper-line px-2 py-1 text-sm text-over">✕</button>
              </div>
              <div className="mt-1 flex flex-wrap items-center gap-2 pl-7 text-xs text-ink-soft">
                <span>{s.pointId !== null ? "measuring point of the line" : "survey-only spot"}</span>
                <label className="flex items-center gap-1">
                  after neutralizer
                  <input aria-label={`Spot ${i + 1} after neutralizer`} className={clsx(inputClass.replace("w-full", "w-36"), "py-0.5 text-xs")} value={s.afterNeutralizer ?? ""} maxLength={80} placeholder="none" onChange={(e) => change(i, { afterNeutralizer: e.target.value.trim() ? e.target.value : null })} />
                </label>
              </div>
            </li>
          ))}
        </ol>
      </div>

      <div className="flex flex-wrap gap-2">
        {unused.map((p) => (
          <button
            key={p.id}
            type="button"
            onClick={() => setSpots((s) => [...s, { key: `p${p.id}`, name: p.name, pointId: p.id, afterNeutralizer: p.neutralizerTag }])}
            className="rounded border border-paper-line bg-paper-raised px-2.5 py-1 text-sm hover:bg-paper-sunk"
          >
            + {p.name}
            {p.fixedMeterCode ? " (fixed meter)" : ""}
          </button>
        ))}
      </div>
      <div className="flex flex-wrap items-end gap-2">
        <label className="block min-w-0 flex-1">
          <span className="text-xs font-medium text-ink-soft">Survey-only spot</span>
          <input className={clsx(inputClass, "mt-1")} value={extra} maxLength={120} onChange={(e) => setExtra(e.target.value)} placeholder="e.g. Idlers after the knife" aria-label="Survey-only spot name" />
        </label>
        <button
          type="button"
          disabled={!extra.trim()}
          onClick={() => {
            setSpots((s) => [...s, { key: keyFor(extra, s.map((x) => x.key)), name: extra.trim(), pointId: null, afterNeutralizer: null }]);
            setExtra("");
          }}
          className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm disabled:opacity-50"
        >
          Add spot
        </button>
      </div>
      <Field label="What changed (kept with the version)" name="comment">
        <input name="comment" className={inputClass} maxLength={300} />
      </Field>
      <SubmitButton>{plan ? "Save as a new version" : "Create the plan"}</SubmitButton>
    </ActionForm>
  );
}
