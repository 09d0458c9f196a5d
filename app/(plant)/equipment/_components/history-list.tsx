// An equipment item's history: cleanings, checks, faults, moves, notes, uploads, newest first.
import { EVENT_KIND_LABELS, type EquipmentEventRow } from "@/db/queries/equipment";
import { fmtDateTime } from "./format";

const tone: Partial<Record<EquipmentEventRow["kind"], string>> = {
  fault: "bg-over-soft text-over",
  cleaned: "bg-brand-soft text-brand-deep",
  check: "bg-paper-sunk text-ink",
  secret_rotated: "bg-shelved-soft text-shelved",
};

export function HistoryList({ events, timeZone }: { events: EquipmentEventRow[]; timeZone: string }) {
  if (!events.length) return <p className="text-sm text-ink-faint">Nothing recorded yet.</p>;
  return (
    <ol className="divide-y divide-paper-line text-sm" data-testid="history">
      {events.map((e) => (
        <li key={e.id} className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-3 gap-y-1 py-1.5 sm:grid-cols-[9.5rem_5.5rem_minmax(0,1fr)]">
          <span className="num text-xs text-ink-faint">{fmtDateTime(e.ts, timeZone)}</span>
          <span>
            <span className={`inline-block rounded px-1.5 py-0.5 text-xs font-medium ${tone[e.kind] ?? "bg-paper-sunk text-ink-soft"}`}>{EVENT_KIND_LABELS[e.kind]}</span>
          </span>
          <span className="col-span-2 break-words text-ink sm:col-span-1">
            {e.text}
            {e.personName ? <span className="text-ink-faint"> — {e.personName}</span> : null}
          </span>
        </li>
      ))}
    </ol>
  );
}
