// The cautions on every survey screen and report (lib/surveys/cautions.ts).
import { SURVEY_CAUTIONS } from "@/lib/surveys/cautions";

export function SurveyCautions({ solventName, compact = false }: { solventName?: string | null; compact?: boolean }) {
  return (
    <aside role="note" aria-label="Caution" className="rounded-card border border-near/40 border-l-4 border-l-near bg-near-soft/50 px-3 py-2 text-sm text-ink" data-testid="survey-cautions">
      <p className="flex items-center gap-2 font-semibold text-near">
        <svg viewBox="0 0 12 12" className="h-3.5 w-3.5" aria-hidden="true">
          <path d="M6 1 L11 11 L1 11 Z" fill="currentColor" />
        </svg>
        Caution{solventName ? ` — solvent area (${solventName})` : ""}
      </p>
      {compact ? (
        <details className="mt-1 text-ink-soft">
          <summary className="cursor-pointer text-xs">High voltage, solvent areas, a qualified person: read before the round</summary>
          <ul className="mt-1 list-disc space-y-1 pl-4 text-xs leading-relaxed">
            {SURVEY_CAUTIONS.map((c) => (
              <li key={c}>{c}</li>
            ))}
          </ul>
        </details>
      ) : (
        <ul className="mt-1 list-disc space-y-1 pl-4 leading-relaxed text-ink-soft">
          {SURVEY_CAUTIONS.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      )}
    </aside>
  );
}
