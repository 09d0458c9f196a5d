// Building blocks of the calculators: a card with its formula, source, assumptions and cautions;
// a number field that says what is wrong next to it; result rows. Usable from client components.
import clsx from "clsx";

export function CalcCard({ id, title, purpose, children }: { id: string; title: string; purpose: string; children: React.ReactNode }) {
  return (
    <section id={id} className="scroll-mt-20 rounded-card border border-paper-line bg-paper-raised" data-testid={`calc-${id}`}>
      <header className="border-b border-paper-line px-4 py-3">
        <h2 className="font-semibold text-ink">{title}</h2>
        <p className="mt-0.5 text-sm text-ink-soft">{purpose}</p>
      </header>
      <div className="space-y-4 px-4 py-4">{children}</div>
    </section>
  );
}

export function FieldGrid({ children }: { children: React.ReactNode }) {
  return <div className="grid grid-cols-1 gap-x-4 gap-y-3 sm:grid-cols-2">{children}</div>;
}

export function NumberInput({
  id,
  label,
  unit,
  value,
  onChange,
  error,
  hint,
}: {
  id: string;
  label: string;
  unit?: string;
  value: string;
  onChange: (v: string) => void;
  error?: string;
  hint?: string;
}) {
  return (
    <label className="block" htmlFor={id}>
      <span className="text-xs font-medium text-ink-soft">{label}</span>
      <span className="mt-1 flex">
        <input
          id={id}
          name={id}
          inputMode="decimal"
          autoComplete="off"
          value={value}
          onChange={(e) => onChange(e.target.value)}
          aria-invalid={Boolean(error)}
          aria-describedby={error ? `${id}-error` : undefined}
          className={clsx(
            "num block w-full min-w-0 border bg-white px-2.5 py-1.5 text-sm outline-none focus:ring-2 focus:ring-brand-soft",
            unit ? "rounded-l" : "rounded",
            error ? "border-over focus:border-over" : "border-paper-line focus:border-brand",
          )}
        />
        {unit ? <span className="inline-flex shrink-0 items-center rounded-r border border-l-0 border-paper-line bg-paper-sunk px-2 text-xs text-ink-soft">{unit}</span> : null}
      </span>
      {error ? (
        <span id={`${id}-error`} role="alert" className="mt-0.5 block text-xs text-over">
          {error}
        </span>
      ) : hint ? (
        <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span>
      ) : null}
    </label>
  );
}

export function SelectInput({ id, label, value, onChange, children, hint, error }: { id: string; label: string; value: string; onChange: (v: string) => void; children: React.ReactNode; hint?: string; error?: string }) {
  return (
    <label className="block" htmlFor={id}>
      <span className="text-xs font-medium text-ink-soft">{label}</span>
      <select
        id={id}
        name={id}
        value={value}
        onChange={(e) => onChange(e.target.value)}
        className="mt-1 block w-full rounded border border-paper-line bg-white px-2.5 py-1.5 text-sm outline-none focus:border-brand focus:ring-2 focus:ring-brand-soft"
      >
        {children}
      </select>
      {error ? <span className="mt-0.5 block text-xs text-over">{error}</span> : hint ? <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span> : null}
    </label>
  );
}

export function Presets({ label, items }: { label: string; items: { key: string; label: string; onPick: () => void }[] }) {
  if (items.length === 0) return null;
  return (
    <div className="flex flex-wrap items-center gap-1.5 text-xs">
      <span className="text-ink-faint">{label}</span>
      {items.map((i) => (
        <button key={i.key} type="button" onClick={i.onPick} className="rounded border border-paper-line bg-paper px-2 py-0.5 text-ink-soft hover:border-brand hover:text-brand-deep">
          {i.label}
        </button>
      ))}
    </div>
  );
}

/** The answer in plain words, then the figures. */
export function Answer({ children, tone = "normal", testId }: { children: React.ReactNode; tone?: "normal" | "near" | "over" | "muted"; testId?: string }) {
  return (
    <div
      role="status"
      data-testid={testId}
      className={clsx(
        "rounded border-l-4 px-3 py-2.5 text-sm leading-relaxed",
        tone === "over" && "border-over bg-over-soft text-ink",
        tone === "near" && "border-near bg-near-soft text-ink",
        tone === "normal" && "border-brand bg-brand-soft/60 text-ink",
        tone === "muted" && "border-paper-line bg-paper-sunk text-ink-soft",
      )}
    >
      {children}
    </div>
  );
}

export function Results({ rows }: { rows: { label: string; value: React.ReactNode; note?: string; testId?: string }[] }) {
  return (
    <dl className="grid grid-cols-1 gap-x-6 gap-y-1.5 text-sm sm:grid-cols-2">
      {rows.map((r) => (
        <div key={r.label} className="flex items-baseline justify-between gap-3 border-b border-dotted border-paper-line pb-1">
          <dt className="text-ink-soft">
            {r.label}
            {r.note ? <span className="block text-xs text-ink-faint">{r.note}</span> : null}
          </dt>
          <dd className="num whitespace-nowrap font-semibold text-ink" data-testid={r.testId}>
            {r.value}
          </dd>
        </div>
      ))}
    </dl>
  );
}

/** Formula, source and assumptions, folded by default to keep the card short. */
export function Method({ formula, source, assumptions }: { formula: React.ReactNode; source: React.ReactNode; assumptions: React.ReactNode[] }) {
  return (
    <details open className="group rounded border border-paper-line bg-paper px-3 py-2 text-sm">
      <summary className="cursor-pointer select-none text-xs font-medium text-ink-soft group-open:mb-2">Formula, source and assumptions</summary>
      <div className="space-y-2 text-ink-soft">
        <div className="overflow-x-auto rounded bg-paper-raised px-2.5 py-1.5 font-mono text-xs leading-relaxed text-ink">{formula}</div>
        <p className="text-xs">
          <b className="font-medium text-ink">Source:</b> {source}
        </p>
        <ul className="list-disc space-y-0.5 pl-5 text-xs">
          {assumptions.map((a, i) => (
            <li key={i}>{a}</li>
          ))}
        </ul>
      </div>
    </details>
  );
}

export function Caution({ title = "Caution", children, testId }: { title?: string; children: React.ReactNode; testId?: string }) {
  return (
    <div role="note" data-testid={testId} className="rounded border border-near/50 bg-near-soft px-3 py-2.5 text-sm leading-relaxed text-ink">
      <p className="mb-0.5 flex items-center gap-1.5 font-semibold">
        <svg viewBox="0 0 12 12" className="h-3 w-3 text-near" aria-hidden="true">
          <path d="M6 1 L11 11 L1 11 Z" fill="currentColor" />
        </svg>
        {title}
      </p>
      <div className="text-ink-soft">{children}</div>
    </div>
  );
}
