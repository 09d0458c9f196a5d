// Small pieces shared by the Floor, the line page and the wallboard: a signed charge value in the
// polarity tokens, a line's run state, the live-connection indicator.
import clsx from "clsx";
import { chargePolarity, formatCharge, type ChargeUnit } from "@/lib/units";
import type { RunState } from "./view-model";
import type { StreamStatus } from "@/components/live/use-live-stream";
import { StateBadge, StateShape } from "@/components/ui/state-badge";
import { STATE_WORDS } from "@/lib/vocabulary";
import type { PointState } from "@/lib/vocabulary";

const polarityTone = { pos: "text-pos", neg: "text-neg", zero: "text-ink-soft" } as const;
const polarityToneDark = { pos: "text-pos-soft", neg: "text-neg-soft", zero: "text-night-ink" } as const;

export function ChargeValue({
  valueKv,
  unit,
  className,
  dark = false,
  showUnit = false,
}: {
  valueKv: number | null;
  unit: ChargeUnit;
  className?: string;
  dark?: boolean;
  showUnit?: boolean;
}) {
  if (valueKv === null) return <span className={clsx("num", dark ? "text-night-soft" : "text-ink-ghost", className)}>–</span>;
  const pol = chargePolarity(valueKv, unit);
  return (
    <span className={clsx("num font-semibold", (dark ? polarityToneDark : polarityTone)[pol], className)} data-polarity={pol}>
      {formatCharge(valueKv, unit)}
      {showUnit ? <span className={clsx("ml-0.5 font-normal", dark ? "text-night-soft" : "text-ink-faint")}> {unit}</span> : null}
    </span>
  );
}

const RUN_WORDS: Record<RunState, string> = { running: "Running", stopped: "Stopped", silent: "No speed signal", unknown: "No speed sensor" };

export function RunIndicator({ run, speedText, dark = false, className }: { run: RunState; speedText?: string | null; dark?: boolean; className?: string }) {
  return (
    <span className={clsx("inline-flex items-center gap-1.5", className)} data-run={run}>
      <svg viewBox="0 0 10 10" className="h-2.5 w-2.5 shrink-0" aria-hidden="true">
        {run === "running" ? (
          <path d="M1.5 1 L9 5 L1.5 9 Z" className={dark ? "fill-night-ink" : "fill-ink-soft"} />
        ) : run === "stopped" ? (
          <rect x="1.5" y="1.5" width="7" height="7" className={dark ? "fill-night-soft" : "fill-ink-faint"} />
        ) : (
          <circle cx="5" cy="5" r="3.5" fill="none" strokeDasharray="2 1.5" strokeWidth="1.3" className={dark ? "stroke-night-soft" : "stroke-silent"} />
        )}
      </svg>
      <span className={dark ? "text-night-ink" : run === "running" ? "text-ink-soft" : "text-ink-faint"}>
        {RUN_WORDS[run]}
        {run === "running" && speedText ? <span className="num"> · {speedText}</span> : null}
      </span>
    </span>
  );
}

export function StreamIndicator({ status, brokerConnected, dark = false }: { status: StreamStatus; brokerConnected: boolean | null; dark?: boolean }) {
  const live = status === "live" && brokerConnected !== false;
  const word = status === "connecting" ? "Connecting…" : status === "reconnecting" ? "Reconnecting…" : brokerConnected === false ? "Live data paused (broker)" : "Live";
  return (
    <span className={clsx("inline-flex items-center gap-1.5 text-xs", dark ? "text-night-soft" : "text-ink-faint")} data-testid="stream-status" data-status={live ? "live" : status}>
      <span
        className={clsx(
          "inline-block h-2 w-2 rounded-full",
          live ? (dark ? "bg-night-ink" : "bg-ink-soft") : "border border-dashed border-current bg-transparent",
          live && "animate-pulse",
        )}
        aria-hidden="true"
      />
      {word}
    </span>
  );
}

/** A point's state: quiet shape and word when normal (calm by default), the full badge otherwise. */
export function PointStateMark({ state, dark = false, className }: { state: PointState; dark?: boolean; className?: string }) {
  if (state === "normal") {
    return (
      <span className={clsx("inline-flex items-center gap-1 px-1.5 text-xs", dark ? "text-night-soft" : "text-ink-faint", className)} data-state="normal">
        <StateShape state="normal" className={clsx("h-2.5 w-2.5", dark && "text-night-soft!")} />
        {STATE_WORDS.normal}
      </span>
    );
  }
  return <StateBadge state={state} className={className} />;
}
