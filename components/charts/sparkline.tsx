// A small trend (the Floor's and the wallboard's "last 15 minutes") drawn as SVG: a neutral
// line, the zero line and the limit(s) dashed, gaps where the sensor sent nothing. SVG rather
// than a canvas chart: dozens of them re-render cheaply, scale with the layout and print.
import { memo } from "react";
import clsx from "clsx";

type Props = {
  samples: ReadonlyArray<readonly [number, number]>;
  fromTs: number;
  toTs: number;
  /** charge: a symmetric range around zero with ± the limit drawn */
  symmetricLimit?: number | null;
  /** a one-sided limit (e.g. RH low) and an optional band to shade (the hall's RH band) */
  lowLimit?: number | null;
  band?: [number, number] | null;
  className?: string;
  strokeClassName?: string;
  height?: number;
  label?: string;
  /** dark background (wallboard) */
  dark?: boolean;
};

const GAP_MS = 30_000;
const MAX_POINTS = 180;
const W = 100;

function SparklineImpl({ samples, fromTs, toTs, symmetricLimit, lowLimit, band, className, strokeClassName = "stroke-ink-soft", height = 28, label, dark = false }: Props) {
  const zeroClass = dark ? "stroke-night-line" : "stroke-paper-line";
  const limitClass = dark ? "stroke-over-bright/60" : "stroke-over/50";
  const H = height;
  const span = Math.max(1, toTs - fromTs);
  const visible = samples.filter((s) => s[0] >= fromTs && s[0] <= toTs);
  const step = Math.max(1, Math.ceil(visible.length / MAX_POINTS));
  const pts = step === 1 ? visible : visible.filter((_, i) => i % step === 0 || i === visible.length - 1);

  let lo: number;
  let hi: number;
  if (symmetricLimit !== undefined) {
    const m = Math.max(symmetricLimit ? symmetricLimit * 1.15 : 0, ...pts.map((p) => Math.abs(p[1])), 1);
    lo = -m;
    hi = m;
  } else {
    const values = pts.map((p) => p[1]);
    const extra = [lowLimit ?? undefined, ...(band ?? [])].filter((v): v is number => v !== undefined && v !== null);
    lo = Math.min(...values, ...extra);
    hi = Math.max(...values, ...extra);
    if (!Number.isFinite(lo) || !Number.isFinite(hi)) {
      lo = 0;
      hi = 1;
    }
    const pad = Math.max((hi - lo) * 0.12, 0.5);
    lo -= pad;
    hi += pad;
  }
  const x = (ts: number) => ((ts - fromTs) / span) * W;
  const y = (v: number) => H - ((v - lo) / (hi - lo)) * H;

  let d = "";
  let prevTs = -Infinity;
  for (const [ts, v] of pts) {
    d += `${ts - prevTs > GAP_MS ? "M" : "L"}${x(ts).toFixed(2)},${y(v).toFixed(2)}`;
    prevTs = ts;
  }

  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      preserveAspectRatio="none"
      className={clsx("block w-full overflow-visible", className)}
      style={{ height: H }}
      role="img"
      aria-label={label ?? "trend"}
    >
      {band ? <rect x={0} width={W} y={y(band[1])} height={Math.max(0, y(band[0]) - y(band[1]))} className={dark ? "fill-night-line" : "fill-paper-sunk"} /> : null}
      {symmetricLimit !== undefined ? <line x1={0} x2={W} y1={y(0)} y2={y(0)} className={zeroClass} strokeWidth={1} vectorEffect="non-scaling-stroke" /> : null}
      {symmetricLimit ? (
        <>
          <line x1={0} x2={W} y1={y(symmetricLimit)} y2={y(symmetricLimit)} className={limitClass} strokeDasharray="3 3" strokeWidth={1} vectorEffect="non-scaling-stroke" />
          <line x1={0} x2={W} y1={y(-symmetricLimit)} y2={y(-symmetricLimit)} className={limitClass} strokeDasharray="3 3" strokeWidth={1} vectorEffect="non-scaling-stroke" />
        </>
      ) : null}
      {lowLimit !== undefined && lowLimit !== null ? (
        <line x1={0} x2={W} y1={y(lowLimit)} y2={y(lowLimit)} className={limitClass} strokeDasharray="3 3" strokeWidth={1} vectorEffect="non-scaling-stroke" />
      ) : null}
      {d ? <path d={d} fill="none" className={strokeClassName} strokeWidth={1.5} strokeLinejoin="round" vectorEffect="non-scaling-stroke" /> : null}
    </svg>
  );
}

export const Sparkline = memo(SparklineImpl);
