"use client";
// The limits editor: pick a place (plant, hall, line, point), see the rules in force there and
// where each comes from, edit one (or override an inherited one here), replay the proposal over
// recorded data beside what the current rules raise, then save it as a new version. Saving is
// only offered once the values on screen have been replayed.
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import clsx from "clsx";
import { inputClass } from "@/components/forms/action-form";
import { SeverityTag } from "@/components/alerts/alert-bits";
import { RULE_KIND_WORDS, SEVERITY_WORDS, type RuleKind, type Severity } from "@/lib/vocabulary";
import { EmptyState } from "@/components/ui/page";
import { fromPlantLocalInput, toPlantLocalInput } from "@/lib/plant-time";
import type { ReplayResult } from "@/db/queries/rules";
import { HALL_KINDS, NOT_LINE_GATED, PARAM_FIELDS, summarizeParams } from "./rule-fields";
import { ReplayView } from "./replay-view";

export type RuleInfo = {
  id: number;
  kind: RuleKind;
  name: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  scopedElsewhere: boolean;
  enabled: boolean;
  currentVersion: number;
  severity: Severity;
  onDelayS: number;
  offDelayS: number;
  onlyWhileRunning: boolean;
  params: Record<string, unknown>;
  versionCreatedAt: number;
};

export type PlantTree = Array<{ id: number; name: string; lines: Array<{ id: number; name: string; points: Array<{ id: number; name: string }> }> }>;

type Level = "plant" | "area" | "line" | "point";
type Place = { level: Level; areaId: number | null; lineId: number | null; pointId: number | null; label: string };

const LEVEL_RANK: Record<Level, number> = { plant: 0, area: 1, line: 2, point: 3 };
const LEVEL_WORDS: Record<Level, string> = { plant: "plant-wide", area: "hall", line: "line", point: "point" };
const KINDS = Object.keys(RULE_KIND_WORDS).filter((k): k is RuleKind => k in RULE_KIND_WORDS);

function levelOf(r: Pick<RuleInfo, "pointId" | "lineId" | "areaId">): Level {
  return r.pointId !== null ? "point" : r.lineId !== null ? "line" : r.areaId !== null ? "area" : "plant";
}

function matches(r: RuleInfo, p: Place): boolean {
  if (r.scopedElsewhere) return false;
  if (r.pointId !== null && r.pointId !== p.pointId) return false;
  if (r.lineId !== null && r.lineId !== p.lineId) return false;
  if (r.areaId !== null && r.areaId !== p.areaId) return false;
  return true;
}

/** Per kind and severity, the rules at the most specific level matching the place (as the engine resolves them). */
function rulesInForce(rules: RuleInfo[], p: Place, kind: RuleKind): RuleInfo[] {
  const candidates = rules.filter((r) => r.kind === kind && matches(r, p));
  const best = new Map<Severity, number>();
  for (const r of candidates) best.set(r.severity, Math.max(best.get(r.severity) ?? -1, LEVEL_RANK[levelOf(r)]));
  return candidates
    .filter((r) => LEVEL_RANK[levelOf(r)] === best.get(r.severity))
    .sort((a, b) => ["high", "medium", "low"].indexOf(a.severity) - ["high", "medium", "low"].indexOf(b.severity) || a.id - b.id);
}

type Draft = {
  ruleId?: number;
  baseVersion?: number;
  kind: RuleKind;
  severity: Severity;
  place: Place;
  fields: Record<string, string>;
  onDelayS: string;
  offDelayS: string;
  onlyWhileRunning: boolean;
  enabled: boolean;
  comment: string;
  /** what it was based on, for "was → now" */
  from: RuleInfo | null;
};

function draftFrom(rule: RuleInfo | null, kind: RuleKind, severity: Severity, place: Place, own: boolean): Draft {
  const fields: Record<string, string> = {};
  for (const f of PARAM_FIELDS[kind]) {
    const v = rule?.params[f.key];
    fields[f.key] = typeof v === "number" ? String(f.percentOfFraction ? Math.round(v * 1000) / 10 : v) : typeof v === "string" ? v : f.choices ? f.choices[0].value : "";
  }
  return {
    ruleId: own && rule ? rule.id : undefined,
    baseVersion: own && rule ? rule.currentVersion : undefined,
    kind,
    severity: rule?.severity ?? severity,
    place,
    fields,
    onDelayS: String(rule?.onDelayS ?? 0),
    offDelayS: String(rule?.offDelayS ?? 0),
    onlyWhileRunning: NOT_LINE_GATED.has(kind) ? false : (rule?.onlyWhileRunning ?? true),
    enabled: own && rule ? rule.enabled : true,
    comment: "",
    from: rule,
  };
}

function bodyOf(d: Draft): Record<string, unknown> {
  const params: Record<string, unknown> = {};
  for (const f of PARAM_FIELDS[d.kind]) {
    const raw = (d.fields[f.key] ?? "").trim();
    if (raw === "" && f.optional) continue;
    if (f.choices) params[f.key] = raw;
    else params[f.key] = raw === "" ? Number.NaN : f.percentOfFraction ? Number(raw) / 100 : Number(raw);
  }
  return {
    ...(d.ruleId !== undefined ? { ruleId: d.ruleId, baseVersion: d.baseVersion } : {}),
    kind: d.kind,
    scope: { pointId: d.place.pointId, lineId: d.place.lineId, areaId: d.place.areaId },
    severity: d.severity,
    onDelayS: d.onDelayS.trim() === "" ? Number.NaN : Number(d.onDelayS),
    offDelayS: d.offDelayS.trim() === "" ? Number.NaN : Number(d.offDelayS),
    onlyWhileRunning: d.onlyWhileRunning,
    enabled: d.enabled,
    params,
  };
}

type ApiError = { error?: string; fieldErrors?: Record<string, string[]> };

async function postJson<T>(url: string, body: unknown): Promise<{ ok: true; data: T } | { ok: false; status: number; error: ApiError }> {
  const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body, (_k, v) => (typeof v === "number" && Number.isNaN(v) ? null : v)) });
  const json: unknown = await res.json().catch(() => ({}));
  if (res.ok) return { ok: true, data: json as T }; // our own route's answer
  return { ok: false, status: res.status, error: (json ?? {}) as ApiError };
}

export function LimitsEditor({
  tree,
  rules,
  canEdit,
  timeZone,
  nowTs,
}: {
  tree: PlantTree;
  rules: RuleInfo[];
  canEdit: boolean;
  timeZone: string;
  nowTs: number;
}) {
  const router = useRouter();
  const plantPlace: Place = { level: "plant", areaId: null, lineId: null, pointId: null, label: "Plant-wide defaults" };
  const [place, setPlace] = useState<Place>(plantPlace);
  const [draft, setDraft] = useState<Draft | null>(null);
  const [fromText, setFromText] = useState(() => toPlantLocalInput(nowTs - 7 * 86_400_000, timeZone));
  const [toText, setToText] = useState(() => toPlantLocalInput(nowTs, timeZone));
  const [replay, setReplay] = useState<{ key: string; result: ReplayResult } | null>(null);
  const [busy, setBusy] = useState<"replay" | "save" | null>(null);
  const [message, setMessage] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});

  const body = draft ? bodyOf(draft) : null;
  const spanFrom = fromPlantLocalInput(fromText, timeZone);
  const spanTo = fromPlantLocalInput(toText, timeZone);
  const replayKey = body ? JSON.stringify([body, spanFrom, spanTo]) : "";
  const replayed = replay !== null && replay.key === replayKey;

  const hallOfPlace = place.areaId !== null ? { level: "area" as const, areaId: place.areaId, lineId: null, pointId: null, label: tree.find((a) => a.id === place.areaId)?.name ?? "" } : null;

  function choose(p: Place) {
    setPlace(p);
    setDraft(null);
    setReplay(null);
    setMessage(null);
    setFieldErrors({});
  }

  function edit(rule: RuleInfo | null, kind: RuleKind, severity: Severity) {
    const own = rule !== null && levelOf(rule) === place.level && matches(rule, place);
    setDraft(draftFrom(rule, kind, severity, place, own));
    setReplay(null);
    setMessage(null);
    setFieldErrors({});
  }

  async function runReplay() {
    if (!body) return;
    if (spanFrom === null || spanTo === null) {
      setMessage({ tone: "error", text: "Enter the replay span as dates and times." });
      return;
    }
    setBusy("replay");
    setMessage(null);
    const key = replayKey;
    const r = await postJson<ReplayResult>("/api/rules/replay", { ...body, fromTs: spanFrom, toTs: spanTo });
    setBusy(null);
    if (r.ok) {
      setFieldErrors({});
      setReplay({ key, result: r.data });
    } else {
      setFieldErrors(r.error.fieldErrors ?? {});
      setMessage({ tone: "error", text: r.error.fieldErrors && Object.keys(r.error.fieldErrors).length ? "Please correct the marked fields." : (r.error.error ?? `The replay failed (HTTP ${r.status}).`) });
    }
  }

  async function save() {
    if (!draft || !body) return;
    setBusy("save");
    setMessage(null);
    const r = await postJson<{ ruleId: number; version: number; created: boolean }>("/api/rules", { ...body, comment: draft.comment.trim() || undefined });
    setBusy(null);
    if (r.ok) {
      setMessage({
        tone: "ok",
        text: `${r.data.created ? "Added a rule here" : `Saved version ${r.data.version}`}. The alerts engine uses it within a few seconds; the change is in the audit log below.`,
      });
      setDraft(null);
      setReplay(null);
      router.refresh();
    } else {
      setFieldErrors(r.error.fieldErrors ?? {});
      setMessage({ tone: "error", text: r.error.fieldErrors && Object.keys(r.error.fieldErrors).length ? "Please correct the marked fields." : (r.error.error ?? `Saving failed (HTTP ${r.status}).`) });
    }
  }

  const kindsHere = KINDS.filter((k) => !(HALL_KINDS.has(k) && (place.level === "line" || place.level === "point")));

  return (
    <div className="grid gap-5 lg:grid-cols-[16rem_1fr]">
      <nav aria-label="Where" className="rounded-card border border-paper-line bg-paper-raised p-2 text-sm lg:max-h-[calc(100vh-9rem)] lg:overflow-y-auto">
        <PlaceButton active={place.level === "plant"} onClick={() => choose(plantPlace)} label="Plant-wide defaults" depth={0} />
        {tree.map((a) => (
          <div key={a.id}>
            <PlaceButton
              active={place.level === "area" && place.areaId === a.id}
              onClick={() => choose({ level: "area", areaId: a.id, lineId: null, pointId: null, label: a.name })}
              label={a.name}
              depth={0}
              strong
            />
            {a.lines.map((l) => (
              <div key={l.id}>
                <PlaceButton
                  active={place.level === "line" && place.lineId === l.id}
                  onClick={() => choose({ level: "line", areaId: a.id, lineId: l.id, pointId: null, label: `${a.name} › ${l.name}` })}
                  label={l.name}
                  depth={1}
                />
                {l.points.map((p) => (
                  <PlaceButton
                    key={p.id}
                    active={place.level === "point" && place.pointId === p.id}
                    onClick={() => choose({ level: "point", areaId: a.id, lineId: l.id, pointId: p.id, label: `${a.name} › ${l.name} › ${p.name}` })}
                    label={p.name}
                    depth={2}
                  />
                ))}
              </div>
            ))}
          </div>
        ))}
      </nav>

      <div className="min-w-0 space-y-5">
        <section className="rounded-card border border-paper-line bg-paper-raised">
          <header className="flex flex-wrap items-baseline justify-between gap-2 border-b border-paper-line px-4 py-2.5">
            <h2 className="text-sm font-semibold text-ink" data-testid="limits-place">
              Rules in force: {place.label}
            </h2>
            <span className="text-xs text-ink-faint">The most specific rule wins, per kind and severity: point › line › hall › plant.</span>
          </header>
          <table className="w-full text-sm" data-testid="rules-table">
            <thead className="text-left text-xs text-ink-faint">
              <tr>
                <th className="px-4 py-2 font-medium">Kind</th>
                <th className="px-2 py-2 font-medium">Severity</th>
                <th className="px-2 py-2 font-medium">Setting</th>
                <th className="px-2 py-2 font-medium">Delays on / off</th>
                <th className="px-2 py-2 font-medium">Set at</th>
                <th className="px-4 py-2" />
              </tr>
            </thead>
            <tbody>
              {kindsHere.flatMap((kind) => {
                const here = rulesInForce(rules, place, kind);
                if (here.length === 0) {
                  return [
                    <tr key={kind} className="border-t border-paper-line">
                      <td className="px-4 py-2 font-medium">{RULE_KIND_WORDS[kind]}</td>
                      <td className="px-2 py-2 text-ink-faint" colSpan={4}>
                        No rule of this kind applies here.
                      </td>
                      <td className="px-4 py-2 text-right">
                        {canEdit ? (
                          <button type="button" className={smallButton} onClick={() => edit(null, kind, "medium")}>
                            Add here
                          </button>
                        ) : null}
                      </td>
                    </tr>,
                  ];
                }
                return here.map((r) => {
                  const own = levelOf(r) === place.level;
                  const editing = draft !== null && draft.kind === kind && draft.severity === r.severity && (draft.ruleId === r.id || (draft.ruleId === undefined && draft.from?.id === r.id));
                  return (
                    <tr key={r.id} className={clsx("border-t border-paper-line", editing && "bg-brand-soft/50", !r.enabled && "text-ink-faint")} data-testid="rule-row" data-rule-id={r.id} data-kind={kind}>
                      <td className="px-4 py-2 font-medium">{RULE_KIND_WORDS[kind]}</td>
                      <td className="px-2 py-2">
                        <SeverityTag severity={r.severity} />
                      </td>
                      <td className="px-2 py-2">
                        {r.enabled ? summarizeParams(kind, r.params) : <span>Off here (exempted){" — "}{summarizeParams(kind, r.params)}</span>}
                      </td>
                      <td className="num whitespace-nowrap px-2 py-2 text-ink-soft">
                        {r.onDelayS} s / {r.offDelayS} s{r.onlyWhileRunning ? " · while running" : ""}
                      </td>
                      <td className="whitespace-nowrap px-2 py-2 text-xs">
                        <span className={clsx("rounded px-1.5 py-0.5", own ? "bg-brand-soft text-brand-deep" : "bg-paper-sunk text-ink-soft")}>
                          {own ? "here" : `from ${LEVEL_WORDS[levelOf(r)]}`}
                        </span>
                        <span className="ml-1.5 text-ink-faint">v{r.currentVersion}</span>
                      </td>
                      <td className="whitespace-nowrap px-4 py-2 text-right">
                        {canEdit ? (
                          <button type="button" className={smallButton} onClick={() => edit(r, kind, r.severity)} data-testid="rule-edit">
                            {own ? "Edit" : "Override here"}
                          </button>
                        ) : null}
                      </td>
                    </tr>
                  );
                });
              })}
            </tbody>
          </table>
          {(place.level === "line" || place.level === "point") && hallOfPlace ? (
            <p className="border-t border-paper-line px-4 py-2 text-xs text-ink-faint">
              Humidity rules are set per hall:{" "}
              <button type="button" className="text-brand underline-offset-2 hover:underline" onClick={() => choose(hallOfPlace)}>
                open {hallOfPlace.label}
              </button>
              .
            </p>
          ) : null}
          {canEdit ? (
            <AddRule
              onAdd={(kind, severity) => {
                const inherited = rulesInForce(rules, place, kind).find((r) => r.severity === severity) ?? rulesInForce(rules, place, kind)[0] ?? null;
                setDraft(draftFrom(inherited, kind, severity, place, false));
                setReplay(null);
                setMessage(null);
                setFieldErrors({});
              }}
              kinds={kindsHere}
            />
          ) : (
            <p className="border-t border-paper-line px-4 py-2 text-xs text-ink-faint">Engineers and admins edit limits; you can see them.</p>
          )}
        </section>

        {message && !draft ? (
          <p role={message.tone === "error" ? "alert" : "status"} className={clsx("rounded px-3 py-2 text-sm", message.tone === "ok" ? "bg-brand-soft text-brand-deep" : "bg-over-soft text-over")} data-testid="limits-message">
            {message.text}
          </p>
        ) : null}

        {draft && canEdit ? (
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
        ) : null}
        <p className="text-xs text-ink-faint">
          Limits are plant settings, not published safety limits. In solvent areas, static hazards are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and
          local codes; Stillfield is a monitoring aid, not a safety system. Times are plant time ({timeZone}).
        </p>
      </div>
    </div>
  );
}

const smallButton = "rounded border border-paper-line bg-paper-raised px-2.5 py-1 text-xs font-medium text-ink hover:bg-paper-sunk";

function PlaceButton({ active, onClick, label, depth, strong }: { active: boolean; onClick: () => void; label: string; depth: number; strong?: boolean }) {
  return (
    <button
      type="button"
      onClick={onClick}
      aria-current={active ? "true" : undefined}
      className={clsx(
        "block w-full truncate rounded px-2 py-1 text-left",
        active ? "bg-brand text-white" : "text-ink-soft hover:bg-paper-sunk hover:text-ink",
        strong && !active && "font-medium text-ink",
      )}
      style={{ paddingLeft: `${0.5 + depth * 0.9}rem` }}
    >
      {label}
    </button>
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

function AddRule({ onAdd, kinds }: { onAdd: (kind: RuleKind, severity: Severity) => void; kinds: RuleKind[] }) {
  const [kind, setKind] = useState<RuleKind>(kinds[0] ?? "charge_high");
  const [severity, setSeverity] = useState<Severity>("high");
  const kindOptions = useMemo(() => kinds.map((k) => ({ value: k, label: RULE_KIND_WORDS[k] })), [kinds]);
  return (
    <div className="flex flex-wrap items-center gap-2 border-t border-paper-line px-4 py-2.5 text-sm">
      <span className="text-xs text-ink-soft">Add a rule here:</span>
      <span className="w-64">
        <select className={inputClass} value={kind} onChange={(e) => setKind(kindOptions.find((o) => o.value === e.target.value)?.value ?? kind)} aria-label="Kind of rule to add">
          {kindOptions.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </span>
      <span className="w-32">
        <select className={inputClass} value={severity} onChange={(e) => setSeverity(e.target.value === "low" ? "low" : e.target.value === "medium" ? "medium" : "high")} aria-label="Severity of rule to add">
          {(["low", "medium", "high"] as const).map((s) => (
            <option key={s} value={s}>
              {SEVERITY_WORDS[s]}
            </option>
          ))}
        </select>
      </span>
      <button type="button" className={smallButton} onClick={() => onAdd(kind, severity)}>
        Start
      </button>
    </div>
  );
}
