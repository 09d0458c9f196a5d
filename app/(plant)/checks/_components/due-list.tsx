// The due list: what is overdue or due within 14 days, by hall, with the decay-time projection
// and the last day's effect for neutralizers.
import Link from "next/link";
import { StateBadge } from "@/components/ui/state-badge";
import { DUE_WHAT_LABELS, type DueList } from "@/db/queries/due-list";
import { EffectValue } from "../../equipment/_components/badges";
import { fmtDate, fmtDaysLeft } from "../../equipment/_components/format";

export function DueListView({ list, timeZone }: { list: DueList; timeZone: string }) {
  if (list.halls.length === 0) {
    return (
      <p className="rounded border border-dashed border-paper-line px-4 py-6 text-center text-sm text-ink-soft" data-testid="due-empty">
        Nothing is overdue or due in the next {list.horizonDays} days.
      </p>
    );
  }
  return (
    <div className="space-y-4" data-testid="due-list">
      {list.halls.map((h) => (
        <section key={h.areaName}>
          <h3 className="mb-1 text-xs font-semibold uppercase tracking-wide text-ink-soft">{h.areaName}</h3>
          <div className="-mx-4 overflow-x-auto">
            <table className="w-full min-w-[46rem] text-sm">
              <thead className="text-left text-xs text-ink-faint">
                <tr>
                  <th className="px-4 py-1 font-medium">Status</th>
                  <th className="py-1 pr-3 font-medium">Due</th>
                  <th className="py-1 pr-3 font-medium">What</th>
                  <th className="py-1 pr-3 font-medium">Item</th>
                  <th className="py-1 pr-3 font-medium" title="Least-squares trend of decay time across checks">
                    Cleaning likely due
                  </th>
                  <th className="py-1 pr-4 text-right font-medium" title="1 − |after| / |before| over the last 24 h while running">
                    Effect 24 h
                  </th>
                </tr>
              </thead>
              <tbody>
                {h.items.map((i) => (
                  <tr key={i.key} className="border-t border-paper-line align-top" data-testid="due-item" data-label={i.label} data-what={i.what} data-overdue={i.overdue}>
                    <td className="px-4 py-1.5">
                      <StateBadge state={i.overdue ? "over" : "near"} label={fmtDaysLeft(i.daysLeft, i.overdue)} />
                    </td>
                    <td className="num py-1.5 pr-3 text-ink-soft">{fmtDate(i.dueTs, timeZone)}</td>
                    <td className="py-1.5 pr-3">{DUE_WHAT_LABELS[i.what]}</td>
                    <td className="py-1.5 pr-3">
                      <Link href={i.subjectType === "neutralizer" ? `/equipment/${i.subjectId}` : `/devices/${i.subjectId}`} className="font-medium text-brand hover:underline">
                        {i.label}
                      </Link>
                      <span className="block text-xs text-ink-faint">
                        {i.where} · {i.reason}
                      </span>
                    </td>
                    <td className="num py-1.5 pr-3 text-ink-soft">{i.projectedTs !== null ? fmtDate(i.projectedTs, timeZone) : <span className="text-ink-faint">—</span>}</td>
                    <td className="py-1.5 pr-4 text-right">{i.subjectType === "neutralizer" ? <EffectValue effect={i.effectDay} /> : <span className="text-ink-faint">—</span>}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ))}
    </div>
  );
}
