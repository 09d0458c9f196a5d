"use client";
// Verification limits per neutralizer kind (plant settings). Engineers edit; others read.
import { ActionForm, FieldError, inputClass, SubmitButton } from "@/components/forms/action-form";
import { saveCheckLimits } from "../actions";

type Row = { kind: string; label: string; maxDecayS: number; maxOffsetAbsV: number; source: "default" | "plant" };

export function LimitsForm({ rows, canEdit }: { rows: Row[]; canEdit: boolean }) {
  const table = (
    <table className="w-full text-sm" data-testid="limits-table">
      <thead className="text-left text-xs text-ink-faint">
        <tr>
          <th className="pb-1.5 font-medium">Kind</th>
          <th className="pb-1.5 font-medium">Decay ≤ (s)</th>
          <th className="pb-1.5 font-medium">Offset ± (V)</th>
          <th className="pb-1.5 font-medium">From</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.kind} className="border-t border-paper-line align-top">
            <td className="py-1.5 pr-2">{r.label}</td>
            <td className="py-1.5 pr-2">
              {canEdit ? (
                <>
                  <input name={`${r.kind}.maxDecayS`} defaultValue={r.maxDecayS} inputMode="decimal" className={`${inputClass} w-20!`} aria-label={`Decay limit for ${r.label}`} />
                  <FieldError name={`${r.kind}.maxDecayS`} />
                </>
              ) : (
                <span className="num">{r.maxDecayS}</span>
              )}
            </td>
            <td className="py-1.5 pr-2">
              {canEdit ? (
                <>
                  <input name={`${r.kind}.maxOffsetAbsV`} defaultValue={r.maxOffsetAbsV} inputMode="decimal" className={`${inputClass} w-20!`} aria-label={`Offset limit for ${r.label}`} />
                  <FieldError name={`${r.kind}.maxOffsetAbsV`} />
                </>
              ) : (
                <span className="num">±{r.maxOffsetAbsV}</span>
              )}
            </td>
            <td className="py-1.5 text-xs text-ink-faint">{r.source === "plant" ? "plant setting" : "default"}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
  if (!canEdit) return table;
  return (
    <ActionForm action={saveCheckLimits} className="space-y-3" successMessage="Limits saved; new checks are judged against them.">
      {table}
      <SubmitButton variant="quiet">Save limits</SubmitButton>
    </ActionForm>
  );
}
