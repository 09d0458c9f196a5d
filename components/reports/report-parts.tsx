// Building blocks shared by the three reports: tabs between them, a print header and legend,
// summary tiles, tables, download links, and a bar that shows a value against its limit.
// Server components; print-friendly (controls carry print:hidden, rows avoid page breaks).
import Link from "next/link";
import clsx from "clsx";
import { StateShape } from "@/components/ui/state-badge";
import { STATE_WORDS, type PointState } from "@/lib/vocabulary";

export type ReportTab = "handover" | "weekly" | "equipment";

const TABS: { key: ReportTab; href: string; label: string }[] = [
  { key: "handover", href: "/reports/handover", label: "Shift handover" },
  { key: "weekly", href: "/reports/weekly", label: "Weekly line review" },
  { key: "equipment", href: "/reports/equipment", label: "Equipment compliance" },
];

export function ReportTabs({ active }: { active: ReportTab }) {
  return (
    <nav aria-label="Reports" className="mb-4 flex flex-wrap gap-1 border-b border-paper-line print:hidden">
      {TABS.map((t) => (
        <Link
          key={t.key}
          href={t.href}
          aria-current={t.key === active ? "page" : undefined}
          className={clsx(
            "-mb-px rounded-t border px-3 py-1.5 text-sm",
            t.key === active ? "border-paper-line border-b-paper bg-paper font-medium text-ink" : "border-transparent text-ink-soft hover:text-ink",
          )}
        >
          {t.label}
        </Link>
      ))}
    </nav>
  );
}

/** Shown only on paper: which report, which plant, when and by whom it was printed. */
export function PrintHeader({ title, period, plantName, generated }: { title: string; period: string; plantName: string; generated: string }) {
  return (
    <div className="mb-4 hidden border-b border-ink pb-2 print:block">
      <p className="text-xs">{plantName} · Stillfield</p>
      <p className="text-lg font-semibold">{title}</p>
      <p className="text-sm">{period}</p>
      <p className="text-xs">{generated}</p>
    </div>
  );
}

export function StateLegend() {
  const states: PointState[] = ["normal", "near", "over", "silent", "shelved"];
  return (
    <p className="mt-4 flex flex-wrap items-center gap-x-4 gap-y-1 text-xs text-ink-faint" data-testid="state-legend">
      <span>Codes:</span>
      {states.map((s) => (
        <span key={s} className="inline-flex items-center gap-1">
          <StateShape state={s} className="h-3 w-3" />
          {STATE_WORDS[s]}
        </span>
      ))}
    </p>
  );
}

/** A state shape with its word, for table cells (shape + word: legible in greyscale). */
export function StateCell({ state, label }: { state: PointState; label?: string }) {
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap text-xs font-medium" data-state={state}>
      <StateShape state={state} className="h-3 w-3" />
      <span className={clsx(state === "normal" ? "text-ink-soft" : state === "near" ? "text-near" : state === "over" ? "text-over" : state === "silent" ? "text-silent" : "text-shelved", "print:text-ink")}>
        {label ?? STATE_WORDS[state]}
      </span>
    </span>
  );
}

export function Tiles({ children }: { children: React.ReactNode }) {
  return <div className="mb-5 grid grid-cols-2 gap-3 md:grid-cols-3 xl:grid-cols-6 print:grid-cols-3">{children}</div>;
}

export function Tile({ label, value, detail, state }: { label: string; value: React.ReactNode; detail?: React.ReactNode; state?: PointState }) {
  return (
    <div className="rounded-card border border-paper-line bg-paper-raised px-3 py-2.5 print:break-inside-avoid" data-testid="report-tile">
      <p className="flex items-center gap-1.5 text-xs text-ink-faint">
        {state ? <StateShape state={state} className="h-2.5 w-2.5" /> : null}
        {label}
      </p>
      <p className="num mt-0.5 text-xl font-semibold tracking-tight text-ink">{value}</p>
      {detail ? <p className="mt-0.5 text-xs leading-snug text-ink-soft">{detail}</p> : null}
    </div>
  );
}

export function Section({ title, aside, children, className, testId }: { title: React.ReactNode; aside?: React.ReactNode; children: React.ReactNode; className?: string; testId?: string }) {
  return (
    <section className={clsx("mb-5 rounded-card border border-paper-line bg-paper-raised print:border-ink/40", className)} data-testid={testId}>
      <header className="flex flex-wrap items-center justify-between gap-2 border-b border-paper-line px-4 py-2.5">
        <h2 className="text-sm font-semibold text-ink">{title}</h2>
        {aside ? <div className="text-xs text-ink-faint">{aside}</div> : null}
      </header>
      <div className="px-4 py-3">{children}</div>
    </section>
  );
}

export function Table({ children, className }: { children: React.ReactNode; className?: string }) {
  return (
    <div className="overflow-x-auto print:overflow-visible" tabIndex={0} role="region" aria-label="Table (scrolls sideways on a narrow screen)">
      <table className={clsx("w-full border-collapse text-sm", className)}>{children}</table>
    </div>
  );
}

export function Th({ children, className, right }: { children?: React.ReactNode; className?: string; right?: boolean }) {
  return <th className={clsx("whitespace-nowrap pb-1.5 pr-3 text-xs font-medium text-ink-faint", right ? "text-right" : "text-left", className)}>{children}</th>;
}

export function Td({ children, className, right, muted }: { children?: React.ReactNode; className?: string; right?: boolean; muted?: boolean }) {
  return <td className={clsx("border-t border-paper-line py-1.5 pr-3 align-top", right && "num text-right", muted && "text-ink-faint", className)}>{children}</td>;
}

export function Tr({ children, className, testId }: { children: React.ReactNode; className?: string; testId?: string }) {
  return (
    <tr className={clsx("break-inside-avoid", className)} data-testid={testId}>
      {children}
    </tr>
  );
}

/** A small horizontal bar of |value| against a limit (the limit drawn as a tick at 2/3 of the width). */
export function LimitBar({ value, limit, state }: { value: number; limit: number; state: PointState }) {
  const scale = limit * 1.5;
  const width = Math.max(2, Math.min(100, (100 * Math.abs(value)) / scale));
  return (
    <span className="relative inline-block h-1.5 w-20 rounded-full bg-paper-sunk align-middle print:border print:border-ink/30" aria-hidden="true">
      <span className={clsx("absolute inset-y-0 left-0 rounded-full", state === "over" ? "bg-over" : state === "near" ? "bg-near" : "bg-ink-ghost", "print:bg-ink")} style={{ width: `${width}%` }} />
      <span className="absolute -inset-y-0.5 w-px bg-ink" style={{ left: `${(100 * limit) / scale}%` }} />
    </span>
  );
}

export function Downloads({ links }: { links: { href: string; label: string }[] }) {
  return (
    <div className="mb-5 flex flex-wrap items-center gap-2 text-sm print:hidden" data-testid="csv-downloads">
      <span className="text-xs text-ink-faint">Download CSV:</span>
      {links.map((l) => (
        <a key={l.href} href={l.href} download className="rounded border border-paper-line bg-paper-raised px-2 py-1 text-xs text-brand-deep hover:bg-paper-sunk">
          {l.label}
        </a>
      ))}
    </div>
  );
}

export function Notice({ children, tone = "info" }: { children: React.ReactNode; tone?: "info" | "warn" }) {
  return (
    <div className={clsx("mb-4 rounded-card border px-4 py-2.5 text-sm", tone === "warn" ? "border-near/40 bg-near-soft text-ink" : "border-paper-line bg-paper-sunk text-ink-soft")}>{children}</div>
  );
}

export const controlLabel = "text-xs font-medium text-ink-soft";
export const controlInput =
  "mt-1 block rounded border border-paper-line bg-white px-2.5 py-1.5 text-sm outline-none focus:border-brand focus:ring-2 focus:ring-brand-soft";
export const primaryButton = "rounded bg-brand px-3 py-1.5 text-sm font-medium text-white hover:bg-brand-deep";
export const quietButton = "rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk";
