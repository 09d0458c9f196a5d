"use client";
// What a replay found: how many alerts the current rules and the proposal would have raised over
// the span, for how long in all, when (a strip per side), and the proposal's alerts one by one.
import clsx from "clsx";
import { SeverityTag } from "@/components/alerts/alert-bits";
import { formatAlertValue, formatDuration } from "@/lib/vocabulary";
import type { RuleKind } from "@/lib/vocabulary";
import { formatPlantTime } from "@/lib/plant-time";
import type { ReplayResult, ReplaySide } from "@/lib/views/replay";
import { DAY_MS as DAY } from "@/lib/vocabulary/time";

export function ReplayView({ result, timeZone, kind, stale }: { result: ReplayResult; timeZone: string; kind: RuleKind; stale: boolean }) {
  const diff = result.proposed.count - result.current.count;
  const span = `${formatPlantTime(result.fromTs, timeZone, "d MMM HH:mm")} – ${formatPlantTime(result.toTs, timeZone, "d MMM HH:mm")}`;
  return (
    <div className={clsx("space-y-4", stale && "opacity-60")} data-testid="replay-result">
      {stale ? <p className="rounded bg-near-soft px-2.5 py-1.5 text-xs text-near">The values changed since this replay; replay again before saving.</p> : null}
      <div className="grid grid-cols-2 gap-3">
        <SideCard title="Current rules" side={result.current} testId="replay-current" />
        <SideCard title="Proposed" side={result.proposed} testId="replay-proposed" emphasis />
      </div>
      <p className="text-sm text-ink" data-testid="replay-summary">
        {diff === 0
          ? "The proposal would have raised as many alerts as the current rules."
          : diff < 0
            ? `The proposal would have raised ${-diff} fewer alert${diff === -1 ? "" : "s"} than the current rules.`
            : `The proposal would have raised ${diff} more alert${diff === 1 ? "" : "s"} than the current rules.`}{" "}
        <span className="text-ink-soft">
          The live engine stored {result.stored} alert{result.stored === 1 ? "" : "s"} of this kind here over the span.
        </span>
      </p>
      <Timeline result={result} />
      <p className="text-xs text-ink-faint">
        {span} · {result.readings.toLocaleString("en-GB")} readings from {result.sensors.length} sensor{result.sensors.length === 1 ? "" : "s"} ·{" "}
        {result.source === "raw" ? "raw readings" : "1-minute rollups (extremes of charge, means of humidity; raw readings are no longer kept for all of this span)"} ·{" "}
        {(result.elapsedMs / 1000).toFixed(1)} s
      </p>
      {result.proposed.episodes.length > 0 ? (
        <div className="max-h-72 overflow-y-auto rounded border border-paper-line">
          <table className="w-full text-xs" data-testid="replay-episodes">
            <thead className="sticky top-0 bg-paper-raised text-left text-ink-faint">
              <tr>
                <th className="px-2 py-1.5 font-medium">Raised</th>
                <th className="px-2 py-1.5 font-medium">Where</th>
                <th className="px-2 py-1.5 font-medium">Severity</th>
                <th className="px-2 py-1.5 font-medium">For</th>
                <th className="px-2 py-1.5 font-medium">Peak</th>
              </tr>
            </thead>
            <tbody>
              {[...result.proposed.episodes].reverse().slice(0, 100).map((e, i) => (
                <tr key={`${e.ruleId}-${e.subjectKey}-${e.raisedTs}-${i}`} className={clsx("border-t border-paper-line", e.edited ? "" : "text-ink-faint")}>
                  <td className="num px-2 py-1">{formatPlantTime(e.raisedTs, timeZone, "d MMM HH:mm")}</td>
                  <td className="px-2 py-1">{e.where}</td>
                  <td className="px-2 py-1">
                    <SeverityTag severity={e.severity} />
                  </td>
                  <td className="num px-2 py-1">{e.durationMs !== null ? formatDuration(e.durationMs) : "still active at the end"}{e.chattering ? " · chattering" : ""}</td>
                  <td className="num px-2 py-1">{formatAlertValue(kind, e.peakValue)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </div>
  );
}

function SideCard({ title, side, testId, emphasis }: { title: string; side: ReplaySide; testId: string; emphasis?: boolean }) {
  return (
    <div className={clsx("rounded border px-3 py-2", emphasis ? "border-brand/50 bg-brand-soft/40" : "border-paper-line bg-paper")} data-testid={testId} data-count={side.count}>
      <div className="text-xs font-medium text-ink-soft">{title}</div>
      <div className="num mt-0.5 text-2xl font-semibold text-ink">
        {side.count} <span className="text-sm font-normal text-ink-soft">alert{side.count === 1 ? "" : "s"}</span>
      </div>
      <div className="num text-xs text-ink-soft">
        {formatDuration(side.totalDurationMs)} active in all
        {side.chattering ? ` · ${side.chattering} chattering` : ""}
        {side.stillActive ? ` · ${side.stillActive} still active` : ""}
      </div>
    </div>
  );
}

/** One strip per side over the span; each alert a bar from raise to clear. */
function Timeline({ result }: { result: ReplayResult }) {
  const W = 1000;
  const span = Math.max(1, result.toTs - result.fromTs);
  const x = (ts: number) => ((ts - result.fromTs) / span) * W;
  const days: number[] = [];
  for (let t = Math.ceil(result.fromTs / DAY) * DAY; t < result.toTs; t += DAY) days.push(t);
  const row = (side: ReplaySide, y: number, cls: string) =>
    side.episodes.map((e, i) => {
      const x0 = x(e.raisedTs);
      const x1 = x(e.clearedTs ?? result.toTs);
      return <rect key={i} x={x0} y={y} width={Math.max(2, x1 - x0)} height={14} className={cls} />;
    });
  return (
    <div className="grid grid-cols-[4.5rem_1fr] items-center gap-x-2 text-xs text-ink-faint">
      <div className="space-y-[14px] text-right">
        <div>current</div>
        <div>proposed</div>
      </div>
    <svg viewBox={`0 0 ${W} 60`} className="h-16 w-full" preserveAspectRatio="none" role="img" aria-label="When the alerts would have been active">
      <rect x={0} y={0} width={W} height={60} className="fill-paper" />
      {days.map((d) => (
        <line key={d} x1={x(d)} x2={x(d)} y1={0} y2={60} className="stroke-paper-line" strokeWidth={1} />
      ))}
      {row(result.current, 4, "fill-ink-faint")}
      {row(result.proposed, 34, "fill-brand")}
    </svg>
    </div>
  );
}
