// Page scaffolding shared by the signed-in pages: a header, designed empty and forbidden states.
import clsx from "clsx";

export function PageHeader({ title, subtitle, actions }: { title: string; subtitle?: React.ReactNode; actions?: React.ReactNode }) {
  return (
    <div className="mb-5 flex flex-wrap items-end justify-between gap-3">
      <div>
        <h1 className="text-xl font-semibold tracking-tight text-ink">{title}</h1>
        {subtitle ? <p className="mt-0.5 text-sm text-ink-soft">{subtitle}</p> : null}
      </div>
      {actions ? <div className="flex items-center gap-2">{actions}</div> : null}
    </div>
  );
}

export function Card({ children, className, title, aside }: { children: React.ReactNode; className?: string; title?: React.ReactNode; aside?: React.ReactNode }) {
  return (
    <section className={clsx("rounded-card border border-paper-line bg-paper-raised", className)}>
      {title ? (
        <header className="flex items-center justify-between gap-2 border-b border-paper-line px-4 py-2.5">
          <h2 className="text-sm font-semibold text-ink">{title}</h2>
          {aside}
        </header>
      ) : null}
      <div className="p-4">{children}</div>
    </section>
  );
}

export function EmptyState({ title, children }: { title: string; children?: React.ReactNode }) {
  return (
    <div className="rounded-card border border-dashed border-paper-line bg-paper px-6 py-10 text-center">
      <p className="font-medium text-ink-soft">{title}</p>
      {children ? <div className="mt-1 text-sm text-ink-faint">{children}</div> : null}
    </div>
  );
}

export function Forbidden({ what }: { what: string }) {
  return (
    <div role="alert" className="rounded-card border border-over/30 bg-over-soft px-5 py-4 text-over">
      <p className="font-semibold">Not allowed (403)</p>
      <p className="mt-1 text-sm">Your role cannot {what}. Ask an admin if you need this.</p>
    </div>
  );
}

export function ComingLater({ what, issue }: { what: string; issue: string }) {
  return (
    <EmptyState title={`${what} is not built yet`}>
      This page is a placeholder; {issue} will fill it. Nothing here is live yet.
    </EmptyState>
  );
}
