// A small time chart as an SVG string, drawn the same way for the alert page (inline SVG) and
// for e-mails (the mailer turns it into a PNG with sharp): the series as a line with its
// min–max band, dashed limit lines with their value, the moment of interest marked with a
// vertical line and its time, an optional dashed comparison series, and a few time and value
// ticks. Pure: numbers in, text out. Colours are the design tokens (tailwind.config.ts), since
// an e-mail client has no stylesheet.
import { formatPlantTime } from "../plant-time";

export type SvgChartPoint = { ts: number; min: number; mean: number; max: number };

export type SvgChartInput = {
  points: readonly SvgChartPoint[];
  fromTs: number;
  toTs: number;
  unit: string;
  timeZone: string;
  /** horizontal limit lines, each with its label ("limit 20 kV") */
  limits?: ReadonlyArray<{ value: number; label: string }>;
  /** a moment to mark ("raised 14:02") */
  mark?: { ts: number; label: string };
  /** a dashed comparison series (e.g. the same span a day earlier, shifted onto this span) */
  compare?: { points: readonly SvgChartPoint[]; label: string };
  title?: string;
  width?: number;
  height?: number;
  /** small: no title, fewer ticks (handover e-mail) */
  compact?: boolean;
};

const INK = "#23262b";
const SOFT = "#4b5058";
const FAINT = "#62676f";
const LINE = "#d9d7cf";
const BRAND = "#35566f";
const BAND = "#dfe7ed";
const OVER = "#b42318";
const MARK = "#5b4f8a";

export function escapeXml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

/** "Nice" tick values covering [lo, hi] (about `count` of them). */
export function niceTicks(lo: number, hi: number, count = 4): number[] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  if (hi - lo < 1e-9) {
    hi = lo + 1;
    lo = lo - 1;
  }
  const raw = (hi - lo) / Math.max(1, count);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Number(v.toFixed(10)));
  return out;
}

function fmt(v: number): string {
  const a = Math.abs(v);
  const s = a >= 100 ? v.toFixed(0) : a >= 10 ? v.toFixed(1).replace(/\.0$/, "") : v.toFixed(2).replace(/0$/, "").replace(/\.0$/, "");
  return s.replace("-", "\u2212");
}

/** The chart as a complete SVG document. */
export function renderSvgChart(input: SvgChartInput): string {
  const width = input.width ?? 600;
  const height = input.height ?? 240;
  const compact = input.compact ?? false;
  const pad = { left: compact ? 34 : 46, right: compact ? 8 : 14, top: compact ? 8 : input.title ? 30 : 14, bottom: compact ? 16 : 26 };
  const plotW = width - pad.left - pad.right;
  const plotH = height - pad.top - pad.bottom;
  const span = Math.max(1, input.toTs - input.fromTs);
  const values: number[] = [];
  for (const p of input.points) values.push(p.min, p.max);
  for (const p of input.compare?.points ?? []) values.push(p.mean);
  for (const l of input.limits ?? []) values.push(l.value);
  let lo = values.length ? Math.min(...values) : 0;
  let hi = values.length ? Math.max(...values) : 1;
  const margin = (hi - lo || Math.abs(hi) || 1) * 0.08;
  lo -= margin;
  hi += margin;
  const x = (ts: number) => pad.left + ((ts - input.fromTs) / span) * plotW;
  const y = (v: number) => pad.top + (1 - (v - lo) / (hi - lo)) * plotH;
  const r = (n: number) => n.toFixed(1);
  const font = `font-family="DejaVu Sans, Verdana, sans-serif"`;
  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(input.title ?? "chart")}">`,
    `<rect width="${width}" height="${height}" fill="#ffffff"/>`,
  ];
  if (input.title && !compact) parts.push(`<text x="${pad.left}" y="18" ${font} font-size="13" font-weight="bold" fill="${INK}">${escapeXml(input.title)}</text>`);
  // value grid and ticks
  for (const t of niceTicks(lo, hi, compact ? 2 : 4)) {
    if (t < lo || t > hi) continue;
    parts.push(`<line x1="${pad.left}" x2="${width - pad.right}" y1="${r(y(t))}" y2="${r(y(t))}" stroke="${LINE}" stroke-width="1"/>`);
    parts.push(`<text x="${pad.left - 4}" y="${r(y(t) + 4)}" ${font} font-size="${compact ? 9 : 11}" text-anchor="end" fill="${SOFT}">${escapeXml(fmt(t))}</text>`);
  }
  if (!compact) parts.push(`<text x="4" y="${pad.top + 4}" ${font} font-size="11" fill="${SOFT}">${escapeXml(input.unit)}</text>`);
  // time ticks: every 15 min for an hour, else a quarter of the span
  const step = span <= 2 * 3_600_000 ? 15 * 60_000 : Math.ceil(span / 4 / 60_000) * 60_000;
  for (let t = Math.ceil(input.fromTs / step) * step; t <= input.toTs; t += step) {
    if (compact && t !== Math.ceil(input.fromTs / step) * step && t + step <= input.toTs) continue;
    parts.push(`<text x="${r(x(t))}" y="${height - (compact ? 3 : 8)}" ${font} font-size="${compact ? 9 : 11}" text-anchor="middle" fill="${SOFT}">${formatPlantTime(t, input.timeZone, "HH:mm")}</text>`);
  }
  parts.push(`<rect x="${pad.left}" y="${pad.top}" width="${plotW}" height="${plotH}" fill="none" stroke="${LINE}"/>`);
  // the series: min–max band, then the mean line; gaps over 3 buckets break the line
  const pts = [...input.points].sort((a, b) => a.ts - b.ts);
  if (pts.length) {
    const gap = Math.max(60_000, (span / Math.max(pts.length, 1)) * 3);
    const runs: SvgChartPoint[][] = [[]];
    for (const [i, p] of pts.entries()) {
      if (i > 0 && p.ts - pts[i - 1].ts > gap) runs.push([]);
      runs[runs.length - 1].push(p);
    }
    for (const run of runs) {
      if (run.length > 1) {
        const top = run.map((p) => `${r(x(p.ts))},${r(y(p.max))}`);
        const bottom = [...run].reverse().map((p) => `${r(x(p.ts))},${r(y(p.min))}`);
        parts.push(`<polygon points="${[...top, ...bottom].join(" ")}" fill="${BAND}"/>`);
      }
      parts.push(`<polyline points="${run.map((p) => `${r(x(p.ts))},${r(y(p.mean))}`).join(" ")}" fill="none" stroke="${BRAND}" stroke-width="${compact ? 1.5 : 2}"/>`);
    }
  } else {
    parts.push(`<text x="${pad.left + plotW / 2}" y="${pad.top + plotH / 2}" ${font} font-size="12" text-anchor="middle" fill="${FAINT}">No readings in this span</text>`);
  }
  if (input.compare && input.compare.points.length > 1) {
    const cp = [...input.compare.points].sort((a, b) => a.ts - b.ts);
    parts.push(`<polyline points="${cp.map((p) => `${r(x(p.ts))},${r(y(p.mean))}`).join(" ")}" fill="none" stroke="${SOFT}" stroke-width="1.5" stroke-dasharray="5 4"/>`);
  }
  for (const l of input.limits ?? []) {
    parts.push(`<line x1="${pad.left}" x2="${width - pad.right}" y1="${r(y(l.value))}" y2="${r(y(l.value))}" stroke="${OVER}" stroke-width="1.5" stroke-dasharray="6 4"/>`);
    if (!compact) parts.push(`<text x="${width - pad.right - 4}" y="${r(y(l.value) - 4)}" ${font} font-size="11" text-anchor="end" fill="${OVER}">${escapeXml(l.label)}</text>`);
  }
  if (input.mark && input.mark.ts >= input.fromTs && input.mark.ts <= input.toTs) {
    const mx = r(x(input.mark.ts));
    parts.push(`<line x1="${mx}" x2="${mx}" y1="${pad.top}" y2="${pad.top + plotH}" stroke="${MARK}" stroke-width="1.5"/>`);
    parts.push(`<path d="M${mx} ${pad.top} l-5 -6 h10 z" fill="${MARK}"/>`);
    if (!compact) {
      const anchor = x(input.mark.ts) > pad.left + plotW * 0.7 ? "end" : "start";
      parts.push(`<text x="${anchor === "end" ? r(x(input.mark.ts) - 5) : r(x(input.mark.ts) + 5)}" y="${pad.top + 12}" ${font} font-size="11" text-anchor="${anchor}" fill="${MARK}">${escapeXml(input.mark.label)}</text>`);
    }
  }
  if (input.compare && !compact) {
    const lx = pad.left + 6;
    const ly = pad.top + plotH - 8;
    parts.push(`<line x1="${lx}" x2="${lx + 22}" y1="${ly}" y2="${ly}" stroke="${SOFT}" stroke-width="1.5" stroke-dasharray="5 4"/>`);
    parts.push(`<text x="${lx + 26}" y="${ly + 4}" ${font} font-size="11" fill="${SOFT}">${escapeXml(input.compare.label)}</text>`);
  }
  parts.push(`</svg>`);
  return parts.join("");
}
