// A fixed meter's cross-checks against handheld survey readings, newest first (Devices page).
import Link from "next/link";
import { StateBadge } from "@/components/ui/state-badge";
import type { CrossCheckView } from "@/lib/surveys/types";

export function CrossCheckHistory({ checks, fmt }: { checks: CrossCheckView[]; fmt: (ts: number) => string }) {
  if (!checks.length) return <p className="text-sm text-ink-faint">No survey has checked this meter against a handheld reading yet.</p>;
  return (
    <ul className="space-y-1 text-sm" data-testid="cross-check-history">
      {checks.map((c) => (
        <li key={c.id} className="flex flex-wrap items-center gap-2">
          <span className="num text-ink-soft">{fmt(c.ts)}</span>
          <span>
            fixed {c.fixedKv.toFixed(1)} kV, handheld {c.handheldKv.toFixed(1)} kV: {Math.round(c.diffShare * 100)} % apart (allowed {Math.round(c.allowedShare * 100)} %)
          </span>
          {c.flagged ? <StateBadge state="over" label="Check calibration" /> : <StateBadge state="normal" label="Agrees" />}
          <Link href={`/surveys/${c.surveyId}`} className="text-xs text-brand hover:underline">
            survey #{c.surveyId}
          </Link>
        </li>
      ))}
    </ul>
  );
}
