// The handover's planned work: each maintenance window overlapping the shift, with its owner,
// reason, times and (once it ended) what happened during it. Server component.
import { formatDayTime, formatTs } from "@/lib/reports/format";
import { maintenanceStatus, MAINTENANCE_TARGET_WORDS, type MaintenanceWindowView } from "@/lib/views/maintenance";
import { EmptyState } from "@/components/ui/page";
import { Section } from "./report-parts";

const STATUS_WORDS = { planned: "planned", active: "running", ended: "ended" } as const;

export function HandoverMaintenance({ windows, zone, nowMs }: { windows: MaintenanceWindowView[]; zone: string; nowMs: number }) {
  return (
    <Section title="Planned work" aside={`${windows.length} window${windows.length === 1 ? "" : "s"}; alerts they explained were recorded without telling on call`} testId="handover-maintenance">
      {windows.length === 0 ? (
        <EmptyState title="No planned work this shift" />
      ) : (
        <ul className="divide-y divide-paper-line">
          {windows.map((w) => (
            <li key={w.id} className="py-2 text-sm break-inside-avoid" data-testid="handover-maintenance-window">
              <p className="flex flex-wrap gap-x-2">
                <span className="num text-ink-faint">
                  {formatDayTime(w.startTs, zone)}–{formatTs(w.endTs, zone)}
                </span>
                <span className="font-medium text-ink">
                  {MAINTENANCE_TARGET_WORDS[w.targetKind]}: {w.targetName}
                </span>
                <span className="text-xs text-ink-faint">({STATUS_WORDS[maintenanceStatus(w, nowMs)]}{w.endedEarlyTs !== null ? ", ended early" : ""})</span>
              </p>
              <p className="text-ink-soft">
                {w.reason} <span className="text-xs text-ink-faint">— owner {w.ownerName}</span>
              </p>
              {w.extendReason ? <p className="text-xs text-ink-faint">Longer because: {w.extendReason}</p> : null}
              {w.summary ? <p className="mt-0.5 text-xs text-ink-soft">{w.summary}</p> : null}
            </li>
          ))}
        </ul>
      )}
    </Section>
  );
}
