// Small pieces of the alert screens: the severity tag (word + bars, never colour alone) and the
// alert's state code (the one shape-and-word set from components/ui/state-badge).
import clsx from "clsx";
import { StateBadge } from "@/components/ui/state-badge";
import { SEVERITY_WORDS, SEVERITY_RANK, alertStateCode, type AlertState, type RuleKind, type Severity } from "@/lib/vocabulary";

export function SeverityTag({ severity, className }: { severity: Severity; className?: string }) {
  const rank = SEVERITY_RANK[severity];
  return (
    <span
      className={clsx(
        "inline-flex items-center gap-1.5 text-xs",
        severity === "high" ? "font-semibold text-ink" : severity === "medium" ? "font-medium text-ink-soft" : "text-ink-faint",
        className,
      )}
      data-severity={severity}
    >
      <span className="inline-flex items-end gap-[2px]" aria-hidden="true">
        {[1, 2, 3].map((i) => (
          <span key={i} className={clsx("w-[3px] rounded-[1px]", i <= rank ? "bg-current" : "bg-paper-line")} style={{ height: `${4 + i * 3}px` }} />
        ))}
      </span>
      {SEVERITY_WORDS[severity]}
    </span>
  );
}

export function AlertCode({ kind, state, shelved }: { kind: RuleKind; state: AlertState; shelved: boolean }) {
  return <StateBadge state={alertStateCode({ kind, state, shelved })} />;
}
