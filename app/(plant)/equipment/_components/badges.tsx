// The equipment pages speak the one set of state codes (components/ui/state-badge.tsx): a
// neutralizer's state, a check's result and a due date map onto normal / near / over / silent.
import { StateBadge } from "@/components/ui/state-badge";
import { NEUTRALIZER_STATE_CODE, NEUTRALIZER_STATE_WORDS, type NeutralizerState } from "@/lib/vocabulary";
import { fmtDaysLeft, wholeDaysLeft } from "./format";

export function NeutralizerStateBadge({ state }: { state: NeutralizerState }) {
  return <StateBadge state={NEUTRALIZER_STATE_CODE[state]} label={NEUTRALIZER_STATE_WORDS[state]} />;
}

export function CheckResultBadge({ passed }: { passed: boolean }) {
  return <StateBadge state={passed ? "normal" : "over"} label={passed ? "Pass" : "Fail"} />;
}

/** Overdue → over, due within the horizon → near, later → plain text. */
export function DueBadge({ dueTs, nowMs, horizonDays = 14 }: { dueTs: number | null; nowMs: number; horizonDays?: number }) {
  if (dueTs === null) return <span className="text-ink-faint">—</span>;
  const overdue = dueTs < nowMs;
  const daysLeft = wholeDaysLeft(dueTs, nowMs);
  if (overdue) return <StateBadge state="over" label={fmtDaysLeft(daysLeft, true)} />;
  if (daysLeft <= horizonDays) return <StateBadge state="near" label={fmtDaysLeft(daysLeft)} />;
  return <span className="text-xs text-ink-soft">{fmtDaysLeft(daysLeft)}</span>;
}

export function EffectValue({ effect }: { effect: number | null }) {
  if (effect === null) return <span className="text-ink-faint">—</span>;
  const pct = Math.round(effect * 100);
  // below half of the charge removed the neutralizer is losing its effect (the live rule's default)
  const tone = effect < 0.5 ? "text-over font-semibold" : effect < 0.7 ? "text-near font-medium" : "text-ink";
  return <span className={`num ${tone}`}>{pct} %</span>;
}
