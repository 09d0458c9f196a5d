"use client";
// The rules in force at the chosen place, one row per kind and severity, with where each comes
// from (here or inherited) and the buttons to edit, override or add one.
import { useMemo, useState } from "react";
import clsx from "clsx";
import { inputClass } from "@/components/forms/action-form";
import { SeverityTag } from "@/components/alerts/alert-bits";
import { RULE_KIND_WORDS, SEVERITY_WORDS, type RuleKind, type Severity } from "@/lib/vocabulary";
import { summarizeParams } from "./rule-fields";
import type { Draft } from "./rule-draft";
import { LEVEL_WORDS, levelOf, rulesInForce, type Place, type RuleInfo } from "./rules-in-force";

export function RulesTable({
  rules,
  place,
  kindsHere,
  draft,
  canEdit,
  hallOfPlace,
  onChoose,
  onEdit,
  onAdd,
}: {
  rules: RuleInfo[];
  place: Place;
  kindsHere: RuleKind[];
  draft: Draft | null;
  canEdit: boolean;
  hallOfPlace: Place | null;
  onChoose: (p: Place) => void;
  onEdit: (rule: RuleInfo | null, kind: RuleKind, severity: Severity) => void;
  onAdd: (kind: RuleKind, severity: Severity) => void;
}) {
  return (
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
                      <button type="button" className={smallButton} onClick={() => onEdit(null, kind, "medium")}>
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
                      <button type="button" className={smallButton} onClick={() => onEdit(r, kind, r.severity)} data-testid="rule-edit">
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
          <button type="button" className="text-brand underline-offset-2 hover:underline" onClick={() => onChoose(hallOfPlace)}>
            open {hallOfPlace.label}
          </button>
          .
        </p>
      ) : null}
      {canEdit ? (
        <AddRule onAdd={onAdd} kinds={kindsHere} />
      ) : (
        <p className="border-t border-paper-line px-4 py-2 text-xs text-ink-faint">Engineers and admins edit limits; you can see them.</p>
      )}
    </section>
  );
}

const smallButton = "rounded border border-paper-line bg-paper-raised px-2.5 py-1 text-xs font-medium text-ink hover:bg-paper-sunk";

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
