// Planned work in the charts' view, named above them: the hatched bands on the charts are cut to
// a few words, so this says which work each is, when, and who owns it.
import Link from "next/link";
import { formatPlantSince, formatPlantTime } from "@/lib/plant-time";
import type { MaintenanceWindowView } from "@/lib/views/maintenance";

export function PlannedWorkList({ windows, now, timeZone }: { windows: MaintenanceWindowView[]; now: number; timeZone: string }) {
  if (windows.length === 0) return null;
  return (
    <ul className="space-y-0.5 rounded-card border border-paper-line bg-paper-raised px-3 py-1.5 text-xs text-ink-soft" data-testid="planned-work-list">
      {windows.map((w) => (
        <li key={w.id} className="flex flex-wrap items-center gap-x-1.5">
          <svg viewBox="0 0 12 12" className="h-3 w-3 shrink-0 text-ink-faint" aria-hidden="true">
            <rect x="0.5" y="0.5" width="11" height="11" fill="none" stroke="currentColor" />
            <path d="M0 12 L12 0 M-3 6 L6 -3 M6 15 L15 6" stroke="currentColor" />
          </svg>
          <Link href="/maintenance" className="font-medium text-ink hover:text-brand hover:underline">
            Planned work
          </Link>
          <span className="num">
            {formatPlantSince(w.startTs, now, timeZone)}–{formatPlantTime(w.endTs, timeZone, "HH:mm")}
            {w.startTs <= now && now < w.endTs ? " (running)" : ""}
          </span>
          <span className="min-w-0 break-words">
            {w.targetName}: {w.reason} · {w.ownerName}
          </span>
        </li>
      ))}
    </ul>
  );
}
