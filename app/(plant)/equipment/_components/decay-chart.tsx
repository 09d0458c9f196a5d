// Decay time across checks with the least-squares line and the limit: the "cleaning likely due"
// date is where the line meets the limit. Server-rendered SVG (no script needed to read it).
import type { DecayProjection } from "@/db/queries/checks";
import { fmtDate } from "./format";
import { DAY_MS } from "@/lib/vocabulary";


export function DecayChart({ projection, nowMs, timeZone }: { projection: DecayProjection; nowMs: number; timeZone: string }) {
  const { points, limitS, dueTs, slopeSPerDay, interceptS, originTs } = projection;
  if (points.length === 0) return <p className="text-sm text-ink-faint">No charged-plate checks with both decay times in the past year.</p>;
  const W = 560;
  const H = 200;
  const pad = { l: 40, r: 16, t: 12, b: 28 };
  const t0 = points[0].ts;
  const lastTs = Math.max(nowMs, points[points.length - 1].ts);
  const t1 = dueTs !== null && dueTs > lastTs && dueTs < lastTs + 365 * DAY_MS ? dueTs + 5 * DAY_MS : lastTs + 5 * DAY_MS;
  const yMax = Math.max(limitS * 1.2, ...points.map((p) => p.decayS * 1.1));
  const x = (ts: number) => pad.l + ((ts - t0) / Math.max(t1 - t0, DAY_MS)) * (W - pad.l - pad.r);
  const y = (s: number) => pad.t + (1 - s / yMax) * (H - pad.t - pad.b);
  const fit = (ts: number) => (interceptS ?? 0) + (slopeSPerDay ?? 0) * ((ts - (originTs ?? t0)) / DAY_MS);
  const ticks = [0, limitS / 2, limitS].map((v) => Math.round(v * 10) / 10);
  return (
    <figure>
      <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full max-w-[560px]" role="img" aria-label="Decay time across checks">
        {ticks.map((v) => (
          <g key={v}>
            <line x1={pad.l} x2={W - pad.r} y1={y(v)} y2={y(v)} className="stroke-paper-line" strokeWidth={1} />
            <text x={pad.l - 6} y={y(v) + 4} textAnchor="end" className="fill-ink-faint text-[10px]">
              {v} s
            </text>
          </g>
        ))}
        <line x1={pad.l} x2={W - pad.r} y1={y(limitS)} y2={y(limitS)} className="stroke-over" strokeWidth={1.5} strokeDasharray="6 4" />
        <text x={W - pad.r} y={y(limitS) - 4} textAnchor="end" className="fill-over text-[10px]">
          limit {limitS} s
        </text>
        {slopeSPerDay !== null ? (
          <line x1={x(t0)} y1={y(fit(t0))} x2={x(t1)} y2={y(Math.min(Math.max(fit(t1), 0), yMax))} className="stroke-brand" strokeWidth={1.5} />
        ) : null}
        {points.map((p) => (
          <circle key={p.ts} cx={x(p.ts)} cy={y(p.decayS)} r={4} className={p.decayS > limitS ? "fill-over" : "fill-ink-soft"} />
        ))}
        {dueTs !== null && dueTs <= t1 ? <circle cx={x(dueTs)} cy={y(limitS)} r={5} className="fill-none stroke-over" strokeWidth={2} /> : null}
        <line x1={x(nowMs)} x2={x(nowMs)} y1={pad.t} y2={H - pad.b} className="stroke-ink-ghost" strokeDasharray="2 3" />
        <text x={x(nowMs)} y={H - 8} textAnchor="middle" className="fill-ink-faint text-[10px]">
          today
        </text>
        <text x={pad.l} y={H - 8} className="fill-ink-faint text-[10px]">
          {fmtDate(t0, timeZone)}
        </text>
      </svg>
      <figcaption className="mt-1 text-xs text-ink-faint">
        Dots: the longer of the two decay times (+ and −) of each check. Line: least-squares fit {projection.basis === "since_cleaning" ? "of the checks since the last cleaning" : "of the checks of the past year"}.
      </figcaption>
    </figure>
  );
}
