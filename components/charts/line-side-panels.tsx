"use client";
// The line page's side column: the line's open alerts (first three), and the notes in the range
// shown, numbered like their markers on the charts.
import Link from "next/link";
import type { FloorLine } from "@/lib/views/floor";
import { StateBadge } from "@/components/ui/state-badge";
import { formatPlantSince, formatPlantTime } from "@/lib/plant-time";
import type { LineEvents } from "./use-history";

export function SidePanel({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="rounded-card border border-paper-line bg-paper-raised">
      <h2 className="border-b border-paper-line px-3 py-2 text-sm font-semibold text-ink">{title}</h2>
      <div className="p-3">{children}</div>
    </section>
  );
}

export function OpenAlertsPanel({ openAlerts, now, tz }: { openAlerts: LineEvents["alerts"]; now: number; tz: string }) {
  return (
    <SidePanel title={`Open alerts${openAlerts.length ? ` (${openAlerts.length})` : ""}`}>
      {openAlerts.length === 0 ? (
        <p className="text-sm text-ink-faint">No open alerts on this line or its hall.</p>
      ) : (
        <ul className="space-y-2" data-testid="line-open-alerts">
          {openAlerts.slice(0, 3).map((a) => {
            const shelved = a.shelvedUntilTs !== null && a.shelvedUntilTs > now;
            return (
              <li key={a.id} className="text-sm">
                <div className="flex items-center gap-2">
                  <StateBadge
                    state={shelved ? "shelved" : "over"}
                    label={shelved ? "Shelved" : a.state === "active_acked" ? "Acknowledged" : a.state === "cleared_unacked" ? "Cleared" : "Active"}
                  />
                  <span className="num text-xs text-ink-faint">since {formatPlantSince(a.startTs, now, tz)}</span>
                </div>
                <p className="mt-0.5 leading-snug text-ink-soft">{a.message}</p>
              </li>
            );
          })}
          <li>
            <Link href="/alerts" className="text-xs text-brand hover:underline">
              {openAlerts.length > 3 ? `${openAlerts.length - 3} more — all alerts` : "All alerts"}
            </Link>
          </li>
        </ul>
      )}
    </SidePanel>
  );
}

export function LineNotesPanel({ notes, points, tz }: { notes: LineEvents["notes"]; points: FloorLine["points"]; tz: string }) {
  return (
    <SidePanel title="Notes in this range">
      {notes.length === 0 ? (
        <p className="text-sm text-ink-faint">No notes in this range.</p>
      ) : (
        <ol className="max-h-96 space-y-2 overflow-y-auto" data-testid="line-notes" tabIndex={0} aria-label="Notes on this line">
          {notes.map((n, i) => (
            <li key={n.id} className="grid grid-cols-[1.5rem_1fr] gap-2 text-sm">
              <span className="num mt-0.5 inline-flex h-4 min-w-4 items-center justify-center rounded-sm bg-brand px-1 text-[10px] font-semibold text-white">
                {i + 1}
              </span>
              <div>
                <p className="text-ink" data-testid="line-note-text">
                  {n.text}
                </p>
                <p className="text-xs text-ink-faint">
                  <span className="num">{formatPlantTime(n.ts, tz, "d MMM HH:mm")}</span>
                  {n.pointId ? ` · ${points.find((p) => p.id === n.pointId)?.name ?? "point"}` : ""} · {n.personName}
                </p>
              </div>
            </li>
          ))}
        </ol>
      )}
    </SidePanel>
  );
}
