// Tomorrow's dry air on the Floor (engineers and up): a calm note, one line per hall and span,
// with the forecast's source and time. Server-rendered from lib/forecast/warnings.ts.
import type { DryAirWarnings } from "@/lib/forecast/warnings";

export function DryAirBanner({ warnings }: { warnings: DryAirWarnings }) {
  if (warnings.lines.length === 0) return null;
  return (
    <section aria-labelledby="dry-air-title" className="mb-4 rounded-card border border-near/40 bg-near-soft/60 px-4 py-3 text-sm text-ink" data-testid="dry-air-warning">
      <h2 id="dry-air-title" className="font-medium">
        Tomorrow&apos;s dry air
      </h2>
      <ul className="mt-1 space-y-1">
        {warnings.lines.map((line) => (
          <li key={line} className="break-words">
            {line}
          </li>
        ))}
      </ul>
      <p className="mt-1 text-xs text-ink-soft">{warnings.sourceLine}</p>
    </section>
  );
}
