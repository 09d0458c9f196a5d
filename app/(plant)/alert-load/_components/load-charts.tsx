// Server-rendered charts of the alert-load page: alerts per 10 minutes against the benchmark
// lines, and alerts per day. Plain SVG (no script needed to read them, and they print).
import { formatPlantTime } from "@/lib/plant-time";
import { BENCHMARK_ACCEPTABLE_PER_10_MIN, BENCHMARK_MANAGEABLE_PER_10_MIN, FLOOD_PER_10_MIN, TEN_MIN_MS, type AlertLoad } from "@/lib/alert-load";
import { DAY_MS as DAY } from "@/lib/vocabulary/time";

export function Per10MinChart({ load, timeZone }: { load: AlertLoad; timeZone: string }) {
  const W = 1000;
  const H = 180;
  const n = load.per10Min.length;
  const top = Math.max(12, load.peakPer10Min + 1);
  const y = (v: number) => H - (v / top) * H;
  const bw = W / n;
  const days: number[] = [];
  for (let t = Math.ceil(load.fromTs / DAY) * DAY; t < load.toTs; t += DAY) days.push(t);
  const x = (ts: number) => ((ts - load.fromTs) / (n * TEN_MIN_MS)) * W;
  const refs = [
    { v: BENCHMARK_ACCEPTABLE_PER_10_MIN, label: "1 — very likely acceptable", cls: "stroke-neg" },
    { v: BENCHMARK_MANAGEABLE_PER_10_MIN, label: "2 — manageable", cls: "stroke-near" },
    { v: FLOOD_PER_10_MIN, label: "10 — flood above", cls: "stroke-over" },
  ];
  return (
    <div>
      <div className="relative">
        <svg viewBox={`0 0 ${W} ${H}`} preserveAspectRatio="none" className="h-48 w-full" role="img" aria-label="Alerts raised in each 10 minutes">
          <rect x={0} y={0} width={W} height={H} className="fill-paper" />
          {days.map((d) => (
            <line key={d} x1={x(d)} x2={x(d)} y1={0} y2={H} className="stroke-paper-line" strokeWidth={1} vectorEffect="non-scaling-stroke" />
          ))}
          {load.per10Min.map((v, i) =>
            v > 0 ? <rect key={i} x={i * bw} y={y(v)} width={Math.max(bw * 0.85, 0.8)} height={H - y(v)} className={v > FLOOD_PER_10_MIN ? "fill-over" : "fill-ink-soft"} /> : null,
          )}
          {refs.map((r) => (
            <line key={r.v} x1={0} x2={W} y1={y(r.v)} y2={y(r.v)} className={r.cls} strokeWidth={1.5} strokeDasharray="6 4" vectorEffect="non-scaling-stroke" />
          ))}
        </svg>
        <div className="pointer-events-none absolute inset-0">
          {refs.map((r) => (
            <span key={r.v} className="absolute right-1 -translate-y-full bg-paper/80 px-1 text-[11px] text-ink-soft" style={{ top: `${(y(r.v) / H) * 100}%` }}>
              {r.label}
            </span>
          ))}
        </div>
      </div>
      <div className="mt-1 flex justify-between text-[11px] text-ink-faint">
        <span>{formatPlantTime(load.fromTs, timeZone, "d MMM HH:mm")}</span>
        <span>alerts per 10 minutes (scale 0–{top}); red bars are floods</span>
        <span>{formatPlantTime(load.toTs, timeZone, "d MMM HH:mm")}</span>
      </div>
    </div>
  );
}

/** Alerts per plant day (the 10-minute buckets summed by the plant-local date they start on). */
export function PerDayBars({ load, timeZone }: { load: AlertLoad; timeZone: string }) {
  const days = new Map<string, { label: string; count: number }>();
  load.per10Min.forEach((count, i) => {
    const ts = load.fromTs + i * TEN_MIN_MS;
    const key = formatPlantTime(ts, timeZone, "yyyy-MM-dd");
    const d = days.get(key) ?? { label: formatPlantTime(ts, timeZone, "EEE d MMM"), count: 0 };
    d.count += count;
    days.set(key, d);
  });
  const list = [...days.entries()];
  const max = Math.max(1, ...list.map(([, d]) => d.count));
  return (
    <ol className="space-y-1 text-sm" data-testid="per-day">
      {list.map(([key, d]) => (
        <li key={key} className="grid grid-cols-[6.5rem_1fr_3rem] items-center gap-2">
          <span className="text-xs text-ink-soft">{d.label}</span>
          <span className="h-3 rounded-sm bg-paper-sunk">
            <span className="block h-3 rounded-sm bg-ink-soft" style={{ width: `${(d.count / max) * 100}%` }} />
          </span>
          <span className="num text-right">{d.count}</span>
        </li>
      ))}
    </ol>
  );
}
