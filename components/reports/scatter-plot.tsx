// A small SVG scatter plot with its least-squares line: server-rendered, prints crisply (vector)
// and reads in greyscale (dots, a solid fitted line). Used for |charge| against RH and speed.
import type { LineFit, Pair } from "@/lib/reports/regression";

/** Round tick values covering [min, max], about `count` of them. */
export function niceTicks(min: number, max: number, count = 4): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (min === max) return [min];
  const raw = (max - min) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) out.push(Number(v.toFixed(10)));
  return out;
}

export function ScatterPlot({
  pairs,
  fit,
  xLabel,
  yLabel,
  title,
  width = 320,
  height = 210,
}: {
  pairs: readonly Pair[];
  fit: LineFit | null;
  xLabel: string;
  yLabel: string;
  title: string;
  width?: number;
  height?: number;
}) {
  const m = { top: 10, right: 12, bottom: 34, left: 40 };
  const w = width - m.left - m.right;
  const h = height - m.top - m.bottom;
  const xs = pairs.map((p) => p[0]);
  const ys = pairs.map((p) => p[1]);
  let xMin = Math.min(...xs);
  let xMax = Math.max(...xs);
  if (xMin === xMax) {
    xMin -= 1;
    xMax += 1;
  }
  const xPad = (xMax - xMin) * 0.05;
  xMin -= xPad;
  xMax += xPad;
  const yMax = Math.max(1, ...ys) * 1.1;
  const sx = (x: number) => m.left + ((x - xMin) / (xMax - xMin)) * w;
  const sy = (y: number) => m.top + h - (Math.max(0, Math.min(yMax, y)) / yMax) * h;
  const xTicks = niceTicks(xMin, xMax, 4).filter((t) => t >= xMin && t <= xMax);
  const yTicks = niceTicks(0, yMax, 4).filter((t) => t <= yMax);
  const fx0 = fit ? Math.max(xMin, fit.xMin) : 0;
  const fx1 = fit ? Math.min(xMax, fit.xMax) : 0;

  return (
    <svg viewBox={`0 0 ${width} ${height}`} width="100%" role="img" aria-label={title} className="max-w-[26rem] text-ink-faint">
      <title>{title}</title>
      {yTicks.map((t) => (
        <g key={`y${t}`}>
          <line x1={m.left} x2={m.left + w} y1={sy(t)} y2={sy(t)} className="stroke-paper-line" strokeWidth={1} />
          <text x={m.left - 5} y={sy(t) + 3.5} textAnchor="end" className="fill-ink-faint text-[10px]">
            {t}
          </text>
        </g>
      ))}
      {xTicks.map((t) => (
        <text key={`x${t}`} x={sx(t)} y={m.top + h + 13} textAnchor="middle" className="fill-ink-faint text-[10px]">
          {t}
        </text>
      ))}
      <line x1={m.left} x2={m.left + w} y1={m.top + h} y2={m.top + h} className="stroke-ink-ghost" strokeWidth={1} />
      <line x1={m.left} x2={m.left} y1={m.top} y2={m.top + h} className="stroke-ink-ghost" strokeWidth={1} />
      {pairs.map(([x, y], i) => (
        <circle key={i} cx={sx(x)} cy={sy(y)} r={2.2} className="fill-ink-soft" fillOpacity={0.45} />
      ))}
      {fit ? (
        <line
          x1={sx(fx0)}
          y1={sy(fit.intercept + fit.slope * fx0)}
          x2={sx(fx1)}
          y2={sy(fit.intercept + fit.slope * fx1)}
          className="stroke-brand-deep"
          strokeWidth={2}
          data-testid="fit-line"
        />
      ) : null}
      <text x={m.left + w / 2} y={height - 4} textAnchor="middle" className="fill-ink-soft text-[11px]">
        {xLabel}
      </text>
      <text x={11} y={m.top + h / 2} textAnchor="middle" transform={`rotate(-90 11 ${m.top + h / 2})`} className="fill-ink-soft text-[11px]">
        {yLabel}
      </text>
    </svg>
  );
}
