"use client";
// Under the range bar: overlay the same span of the previous shift, day or week on the charge
// charts (dashed, with a legend on each chart), and a link that freezes the shown window and the
// overlay (lib/charts/compare.ts), to paste into a handover or a message.
import Link from "next/link";
import { COMPARE_KINDS, COMPARE_LABELS, type CompareKind } from "@/lib/charts/compare";

export function CompareBar({ compare, onCompare, frozenHref }: { compare: CompareKind | null; onCompare: (k: CompareKind | null) => void; frozenHref: string }) {
  return (
    <div className="mb-3 flex flex-wrap items-center gap-x-4 gap-y-2 px-1 text-sm">
      <label className="inline-flex items-center gap-2 text-ink-soft">
        Compare with
        <select
          value={compare ?? ""}
          onChange={(e) => onCompare((COMPARE_KINDS as readonly string[]).includes(e.target.value) ? (e.target.value as CompareKind) : null)}
          className="min-h-9 rounded border border-paper-line bg-paper-raised px-2 text-ink"
          data-testid="compare-select"
        >
          <option value="">nothing</option>
          {COMPARE_KINDS.map((k) => (
            <option key={k} value={k}>
              {COMPARE_LABELS[k].toLowerCase()}
            </option>
          ))}
        </select>
      </label>
      <Link href={frozenHref} className="text-brand underline" data-testid="frozen-link">
        Link to this view
      </Link>
    </div>
  );
}
