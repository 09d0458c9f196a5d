// The due list: what is overdue or due within 14 days, by hall, one row per item (a neutralizer
// or a sensor) with everything due on it, the decay-time projection and the last day's effect.
import Link from "next/link";
import { StateBadge } from "@/components/ui/state-badge";
import type { DueItem, DueList, DueWhat } from "@/lib/views/due-list";
import { EffectValue } from "../../equipment/_components/badges";
import { fmtDate, fmtDaysLeft } from "../../equipment/_components/format";

const WHAT: Record<DueWhat, string> = { cleaning: "Cleaning", check: "Verification", repair: "Repair", calibration: "Calibration" };
const NEVER: Record<DueWhat, string> = { cleaning: "never cleaned", check: "never checked", repair: "repair", calibration: "calibration" };

function groupBySubject(items: DueItem[]): DueItem[][] {
  const m = new Map<string, DueItem[]>();
  for (const i of items) {
    const k = `${i.subjectType}:${i.subjectId}`;
    m.set(k, [...(m.get(k) ?? []), i]);
  }
  return [...m.values()];
}

export function DueListView({ list, timeZone }: { list: DueList; timeZone: string }) {
  if (list.halls.length === 0) {
    return (
      <p className="rounded border border-dashed border-paper-line px-4 py-6 text-center text-sm text-ink-soft" data-testid="due-empty">
        Nothing is overdue or due in the next {list.horizonDays} days.
      </p>
    );
  }
  return (
    <div className="-mx-4 -my-2 overflow-x-auto" data-testid="due-list">
      <table className="w-full min-w-[44rem] text-sm">
        <thead className="whitespace-nowrap text-left text-xs text-ink-faint">
          <tr>
            <th className="px-4 py-2 font-medium">Item</th>
            <th className="py-2 pr-3 font-medium">Due</th>
            <th className="py-2 pr-3 font-medium" title="Where the least-squares trend of decay time across checks reaches the limit">
              Cleaning likely due
            </th>
            <th className="py-2 pr-4 text-right font-medium" title="1 − |after| / |before| over the last 24 h while the line ran">
              Effect 24 h
            </th>
          </tr>
        </thead>
        <tbody>
          {list.halls.map((h) => (
            <HallRows key={h.areaName} name={h.areaName} items={h.items} timeZone={timeZone} />
          ))}
        </tbody>
      </table>
    </div>
  );
}

function HallRows({ name, items, timeZone }: { name: string; items: DueItem[]; timeZone: string }) {
  return (
    <>
      <tr className="border-t border-paper-line bg-paper/60">
        <th colSpan={4} className="px-4 py-1.5 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">
          {name}
        </th>
      </tr>
      {groupBySubject(items).map((group) => {
        const first = group[0];
        return (
          <tr key={`${first.subjectType}:${first.subjectId}`} className="border-t border-paper-line align-top">
            <td className="px-4 py-2">
              <Link href={first.subjectType === "neutralizer" ? `/equipment/${first.subjectId}` : `/devices/${first.subjectId}`} className="font-medium text-brand hover:underline">
                {first.label}
              </Link>
              <span className="block text-xs text-ink-faint">{first.where}</span>
            </td>
            <td className="py-2 pr-3">
              <ul className="space-y-1">
                {group.map((i) => (
                  <li key={i.key} className="flex flex-wrap items-center gap-x-2" data-testid="due-item" data-label={i.label} data-what={i.what} data-overdue={i.overdue} title={i.reason}>
                    <StateBadge state={i.overdue ? "over" : "near"} label={i.neverDone && i.overdue ? NEVER[i.what] : fmtDaysLeft(i.daysLeft, i.overdue)} className="whitespace-nowrap" />
                    <span className="text-ink">{WHAT[i.what]}</span>
                    {!i.neverDone ? <span className="num text-xs text-ink-faint">{fmtDate(i.dueTs, timeZone)}</span> : null}
                    {i.reason.startsWith("Marked") ? <span className="text-xs text-ink-soft">{i.reason}</span> : null}
                  </li>
                ))}
              </ul>
            </td>
            <td className="num whitespace-nowrap py-2 pr-3 text-ink-soft">{first.projectedTs !== null ? fmtDate(first.projectedTs, timeZone) : <span className="text-ink-faint">—</span>}</td>
            <td className="py-2 pr-4 text-right">{first.subjectType === "neutralizer" ? <EffectValue effect={first.effectDay} /> : <span className="text-ink-faint">—</span>}</td>
          </tr>
        );
      })}
    </>
  );
}
