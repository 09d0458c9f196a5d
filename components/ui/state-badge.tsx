// One shape for each state code, used everywhere (Floor, line page, alerts, e-mails, reports,
// wallboard); the words and symbols are in lib/vocabulary/point-states.ts. Colour is never the only code: the shape and the word carry it in
// greyscale and for colour-blind readers.
//   normal  — small hollow ring, "OK", no colour
//   near    — upward triangle, "Near", amber
//   over    — filled diamond, "Over", red
//   silent  — dashed circle, "Silent", grey
//   shelved — pause bars, "Shelved", violet
import clsx from "clsx";
import { STATE_WORDS, type PointState } from "@/lib/vocabulary";

const tone: Record<PointState, string> = {
  normal: "text-ink-soft",
  near: "text-near",
  over: "text-over",
  silent: "text-silent",
  shelved: "text-shelved",
};

const chip: Record<PointState, string> = {
  normal: "bg-paper-sunk text-ink-soft",
  near: "bg-near-soft text-near",
  over: "bg-over-soft text-over",
  silent: "bg-silent-soft text-silent",
  shelved: "bg-shelved-soft text-shelved",
};

export function StateShape({ state, className = "h-3 w-3" }: { state: PointState; className?: string }) {
  const c = clsx(className, tone[state], "inline-block shrink-0");
  switch (state) {
    case "near":
      return (
        <svg viewBox="0 0 12 12" className={c} aria-hidden="true">
          <path d="M6 1 L11 11 L1 11 Z" fill="currentColor" />
        </svg>
      );
    case "over":
      return (
        <svg viewBox="0 0 12 12" className={c} aria-hidden="true">
          <path d="M6 0.5 L11.5 6 L6 11.5 L0.5 6 Z" fill="currentColor" />
        </svg>
      );
    case "silent":
      return (
        <svg viewBox="0 0 12 12" className={c} aria-hidden="true">
          <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.5" strokeDasharray="2 1.6" />
        </svg>
      );
    case "shelved":
      return (
        <svg viewBox="0 0 12 12" className={c} aria-hidden="true">
          <rect x="2.5" y="1.5" width="2.5" height="9" fill="currentColor" />
          <rect x="7" y="1.5" width="2.5" height="9" fill="currentColor" />
        </svg>
      );
    default:
      return (
        <svg viewBox="0 0 12 12" className={c} aria-hidden="true">
          <circle cx="6" cy="6" r="3.5" fill="none" stroke="currentColor" strokeWidth="1.5" />
        </svg>
      );
  }
}

export function StateBadge({ state, label, className }: { state: PointState; label?: string; className?: string }) {
  return (
    <span
      className={clsx("inline-flex items-center gap-1 rounded px-1.5 py-0.5 text-xs font-medium", chip[state], className)}
      data-state={state}
    >
      <StateShape state={state} className="h-2.5 w-2.5" />
      {label ?? STATE_WORDS[state]}
    </span>
  );
}
