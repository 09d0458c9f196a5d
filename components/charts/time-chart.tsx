"use client";
// A time chart on uPlot: created once per mount (uPlot is loaded only in the browser, as its own
// chunk), then updated in place with setData as data arrive — never re-created per tick.
// Charts sharing a `syncKey` move one cursor together; a drag selects a time window that the
// parent applies to all of them (zoom), a click picks a moment (e.g. for a note).
// Drawn on top: limit lines, markers (notes), spans (alerts; hatched with a label: planned work),
// shaded bands (a humidity aim).
import "uplot/dist/uPlot.min.css";
import type uPlot from "uplot";
import { useEffect, useRef } from "react";
import clsx from "clsx";
import { formatPlantTime } from "@/lib/plant-time";
import { tokenColors, withAlpha, type TokenName } from "./token-colors";

export type ChartSeries = {
  label: string;
  color: TokenName;
  width?: number;
  scale?: "y" | "y2";
  dash?: number[];
  /** min/max series only outline the band */
  faint?: boolean;
};
export type HLine = { value: number; scale?: "y" | "y2"; color: TokenName; dash?: number[]; alpha?: number };
export type HBand = { from: number; to: number; scale?: "y" | "y2"; color: TokenName; alpha: number };
export type VMarker = { ts: number; label: string; color: TokenName };
/** `hatch` with a `label`: planned work (a maintenance window), drawn hatched and named at its foot. */
export type Span = { from: number; to: number; color: TokenName; alpha: number; hatch?: boolean; label?: string };
export type Axis = {
  fmt: (v: number) => string;
  range?: (min: number, max: number) => [number, number];
  /** fixed tick values (e.g. −limit, 0, +limit) instead of uPlot's spacing; heightPx is the plot's height */
  splits?: (min: number, max: number, heightPx: number) => number[];
  size?: number;
  label?: string;
};

export type TimeChartProps = {
  syncKey: string;
  height: number;
  timeZone: string;
  xRange: [number, number];
  /** [xs, ...one array per series]; null is a gap */
  data: Array<Array<number | null>>;
  series: ChartSeries[];
  /** 1-based series indexes of the band's upper and lower edge */
  band?: { upper: number; lower: number; color: TokenName; alpha: number } | null;
  y: Axis;
  y2?: Axis;
  hLines?: HLine[];
  hBands?: HBand[];
  markers?: VMarker[];
  spans?: Span[];
  onZoom?: (fromTs: number, toTs: number) => void;
  onPick?: (ts: number) => void;
  /** text for the cursor position (null idx: cursor left the chart) */
  readout?: (idx: number | null, data: uPlot.AlignedData) => string;
  /** where this chart shows time labels: a stack of charts needs them once at the top and once at the bottom */
  timeLabels?: "top" | "bottom" | "none";
  className?: string;
  testId?: string;
  attrs?: Record<string, string | number>;
};

export function TimeChart(props: TimeChartProps) {
  const boxRef = useRef<HTMLDivElement>(null);
  const readoutRef = useRef<HTMLSpanElement>(null);
  const plotRef = useRef<uPlot | null>(null);
  const propsRef = useRef(props);
  // eslint-disable-next-line react-hooks/refs -- latest-props ref for uPlot's callbacks, which outlive a render
  propsRef.current = props;

  // create once
  useEffect(() => {
    let cancelled = false;
    let plot: uPlot | null = null;
    let ro: ResizeObserver | null = null;
    const box = boxRef.current;
    if (!box) return;
    void import("uplot").then(({ default: UPlot }) => {
      if (cancelled || !boxRef.current) return;
      const p = propsRef.current;
      const c = tokenColors();
      const dpr = () => window.devicePixelRatio || 1;
      const font = `11px ${getComputedStyle(document.body).fontFamily}`;
      const axisBase = { stroke: c.inkFaint, font, grid: { stroke: withAlpha(c.paperLine, 0.9), width: 1 }, ticks: { stroke: c.paperLine, width: 1, size: 4 } };
      const yAxis = (a: Axis, scale: "y" | "y2", side: 1 | 3): uPlot.Axis => ({
        ...axisBase,
        scale,
        side,
        size: a.size ?? 58,
        grid: side === 3 ? axisBase.grid : { show: false },
        values: (_u, splits) => splits.map((v) => (v == null ? "" : a.fmt(v))),
        ...(a.splits ? { splits: (u: uPlot) => a.splits!(u.scales[scale].min ?? 0, u.scales[scale].max ?? 1, u.bbox.height / dpr()) } : {}),
        label: a.label,
        labelFont: font,
        labelSize: a.label ? 14 : 0,
      });
      const mouse = { x: 0 };
      const opts: uPlot.Options = {
        width: Math.max(200, box.clientWidth),
        height: p.height,
        ms: 1,
        tzDate: (ts) => UPlot.tzDate(new Date(ts), propsRef.current.timeZone),
        legend: { show: false },
        // room for the outermost y labels where no time axis sits below or above
        padding: [p.timeLabels === "top" ? 0 : 9, 8, p.timeLabels === "bottom" || p.timeLabels === undefined ? 0 : 9, 0],
        cursor: {
          sync: { key: p.syncKey, scales: ["x", null] },
          drag: { x: true, y: false, setScale: false },
          points: { size: 6 },
        },
        scales: {
          x: { time: true, range: () => propsRef.current.xRange },
          y: { range: (_u, min, max) => (propsRef.current.y.range ? propsRef.current.y.range(min, max) : padRange(min, max)) },
          ...(p.y2 ? { y2: { range: (_u: uPlot, min: number, max: number) => (propsRef.current.y2?.range ? propsRef.current.y2.range(min, max) : padRange(min, max)) } } : {}),
        },
        axes: [
          {
            ...axisBase,
            side: p.timeLabels === "top" ? 0 : 2,
            space: 80,
            size: p.timeLabels === "none" ? 6 : 28,
            values: (_u, splits, _i, _space, incr) =>
              p.timeLabels === "none" ? splits.map(() => "") : splits.map((ts) => formatTimeTick(ts, incr, propsRef.current.timeZone)),
          },
          yAxis(p.y, "y", 3),
          ...(p.y2 ? [yAxis(p.y2, "y2", 1)] : []),
        ],
        series: [
          {},
          ...p.series.map((s) => ({
            label: s.label,
            scale: s.scale ?? "y",
            stroke: s.faint ? withAlpha(c[s.color], 0.35) : c[s.color],
            width: s.width ?? (s.faint ? 1 : 1.5),
            dash: s.dash,
            points: s.faint ? { show: false } : undefined,
            spanGaps: false,
          })),
        ],
        bands: p.band ? [{ series: [p.band.upper, p.band.lower], fill: withAlpha(c[p.band.color], p.band.alpha) }] : [],
        hooks: {
          drawClear: [
            (u) => {
              const q = propsRef.current;
              const ctx = u.ctx;
              const { left, top, width, height } = u.bbox;
              ctx.save();
              ctx.beginPath();
              ctx.rect(left, top, width, height);
              ctx.clip();
              for (const b of q.hBands ?? []) {
                const y1 = u.valToPos(b.to, b.scale ?? "y", true);
                const y2 = u.valToPos(b.from, b.scale ?? "y", true);
                ctx.fillStyle = withAlpha(c[b.color], b.alpha);
                ctx.fillRect(left, Math.min(y1, y2), width, Math.abs(y2 - y1));
              }
              // alert spans: a light tint over the time plus a solid bar along the top edge
              for (const s of q.spans ?? []) {
                const x1 = Math.max(left, u.valToPos(s.from, "x", true));
                const x2 = Math.min(left + width, u.valToPos(s.to, "x", true));
                const w = Math.max(dpr(), x2 - x1);
                ctx.fillStyle = withAlpha(c[s.color], s.alpha);
                ctx.fillRect(x1, top, w, height);
                if (s.hatch) {
                  drawHatch(ctx, x1, top, w, height, withAlpha(c[s.color], 0.22), dpr());
                  continue;
                }
                ctx.fillStyle = withAlpha(c[s.color], 0.75);
                ctx.fillRect(x1, top, w, 4 * dpr());
              }
              ctx.restore();
            },
          ],
          draw: [
            (u) => {
              const q = propsRef.current;
              const ctx = u.ctx;
              const { left, top, width, height } = u.bbox;
              ctx.save();
              ctx.beginPath();
              ctx.rect(left, top, width, height);
              ctx.clip();
              for (const h of q.hLines ?? []) {
                const y = Math.round(u.valToPos(h.value, h.scale ?? "y", true)) + 0.5;
                ctx.strokeStyle = withAlpha(c[h.color], h.alpha ?? 0.8);
                ctx.lineWidth = dpr();
                ctx.setLineDash((h.dash ?? [6, 4]).map((d) => d * dpr()));
                ctx.beginPath();
                ctx.moveTo(left, y);
                ctx.lineTo(left + width, y);
                ctx.stroke();
              }
              ctx.setLineDash([3 * dpr(), 3 * dpr()]);
              ctx.font = `600 ${10 * dpr()}px ${getComputedStyle(document.body).fontFamily}`;
              ctx.textBaseline = "top";
              // planned-work labels at the foot of their band, cut to the band's width
              for (const s of q.spans ?? []) {
                if (!s.hatch || !s.label) continue;
                const x1 = Math.max(left, u.valToPos(s.from, "x", true));
                const x2 = Math.min(left + width, u.valToPos(s.to, "x", true));
                if (x2 - x1 < 24 * dpr()) continue;
                ctx.textAlign = "left";
                // the whole label if it fits, else the bare words "Planned work" (the list above the charts names it)
                const room = x2 - x1 - 8 * dpr();
                const text = ctx.measureText(s.label).width <= room ? s.label : fitText(ctx, "Planned work", room);
                const tw = ctx.measureText(text).width + 6 * dpr();
                ctx.fillStyle = withAlpha(c.paperSunk, 0.92);
                ctx.fillRect(x1 + 2 * dpr(), top + height - 15 * dpr(), tw, 13 * dpr());
                ctx.fillStyle = c[s.color];
                ctx.fillText(text, x1 + 5 * dpr(), top + height - 13.5 * dpr());
              }
              for (const m of q.markers ?? []) {
                const x = Math.round(u.valToPos(m.ts, "x", true)) + 0.5;
                if (x < left || x > left + width) continue;
                ctx.strokeStyle = c[m.color];
                ctx.lineWidth = dpr();
                ctx.beginPath();
                ctx.moveTo(x, top);
                ctx.lineTo(x, top + height);
                ctx.stroke();
                // the flag sits right of its line, or left of it at the right edge
                const tw = ctx.measureText(m.label).width + 6 * dpr();
                const fx = x + tw > left + width ? x - tw : x;
                ctx.fillStyle = c[m.color];
                ctx.fillRect(fx, top, tw, 13 * dpr());
                ctx.fillStyle = "white";
                ctx.fillText(m.label, fx + 3 * dpr(), top + 1.5 * dpr());
              }
              ctx.restore();
            },
          ],
          setSelect: [
            (u) => {
              const sel = u.select;
              if (sel.width > 4 && propsRef.current.onZoom) {
                const a = u.posToVal(sel.left, "x");
                const b = u.posToVal(sel.left + sel.width, "x");
                propsRef.current.onZoom(Math.round(a), Math.round(b));
              }
              if (sel.width > 0) u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
            },
          ],
          setCursor: [
            (u) => {
              const r = readoutRef.current;
              const fn = propsRef.current.readout;
              if (!r || !fn) return;
              const idx = u.cursor.idx ?? null;
              r.textContent = fn(u.cursor.left !== undefined && u.cursor.left >= 0 ? idx : null, u.data);
            },
          ],
        },
      };
      plot = new UPlot(opts, p.data as uPlot.AlignedData, box);
      plotRef.current = plot;
      const over = plot.over;
      over.addEventListener("mousedown", (e) => {
        mouse.x = e.clientX;
      });
      over.addEventListener("mouseup", (e) => {
        const fn = propsRef.current.onPick;
        if (!fn || !plot || Math.abs(e.clientX - mouse.x) > 3 || plot.cursor.left === undefined || plot.cursor.left < 0) return;
        fn(Math.round(plot.posToVal(plot.cursor.left, "x")));
      });
      ro = new ResizeObserver(() => {
        if (plot && boxRef.current) plot.setSize({ width: Math.max(200, boxRef.current.clientWidth), height: propsRef.current.height });
      });
      ro.observe(box);
      if (readoutRef.current && p.readout) readoutRef.current.textContent = p.readout(null, plot.data);
    });
    return () => {
      cancelled = true;
      ro?.disconnect();
      plot?.destroy();
      plotRef.current = null;
    };
    // created once per mount; later changes go through setData / redraw below
  }, []);

  // new data or a new window: update in place
  const { data, xRange, hLines, hBands, markers, spans } = props;
  useEffect(() => {
    const plot = plotRef.current;
    if (!plot) return;
    plot.setData(data as uPlot.AlignedData, true);
    const r = readoutRef.current;
    if (r && propsRef.current.readout && (plot.cursor.left === undefined || plot.cursor.left < 0)) r.textContent = propsRef.current.readout(null, plot.data);
  }, [data, xRange]);
  useEffect(() => {
    plotRef.current?.redraw(false, false);
  }, [hLines, hBands, markers, spans]);

  return (
    <div className={clsx("relative", props.className)} data-testid={props.testId} {...dataAttrs(props.attrs)}>
      <div ref={boxRef} className="w-full" style={{ minHeight: props.height }} />
      {props.readout ? <span ref={readoutRef} className="num pointer-events-none absolute right-2 top-0 text-[11px] text-ink-faint" aria-hidden="true" /> : null}
    </div>
  );
}

/** Diagonal lines over a rectangle (the planned-work band: a pattern, so it reads without colour). */
function drawHatch(ctx: CanvasRenderingContext2D, x: number, y: number, w: number, h: number, stroke: string, ratio: number): void {
  ctx.save();
  ctx.beginPath();
  ctx.rect(x, y, w, h);
  ctx.clip();
  ctx.strokeStyle = stroke;
  ctx.lineWidth = ratio;
  ctx.beginPath();
  const step = 7 * ratio;
  for (let d = -h; d < w; d += step) {
    ctx.moveTo(x + d, y + h);
    ctx.lineTo(x + d + h, y);
  }
  ctx.stroke();
  ctx.restore();
}

/** The label cut with an ellipsis to fit `maxPx`. */
function fitText(ctx: CanvasRenderingContext2D, text: string, maxPx: number): string {
  if (ctx.measureText(text).width <= maxPx) return text;
  let t = text;
  while (t.length > 1 && ctx.measureText(`${t}…`).width > maxPx) t = t.slice(0, -1);
  return `${t}…`;
}

function dataAttrs(attrs?: Record<string, string | number>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(attrs ?? {})) out[`data-${k}`] = String(v);
  return out;
}

/** Time tick labels in plant time: clock times within a day, dates at midnight or for day steps. */
function formatTimeTick(ts: number, incrMs: number, timeZone: string): string {
  const hm = formatPlantTime(ts, timeZone, "HH:mm");
  if (incrMs >= 86_400_000) return formatPlantTime(ts, timeZone, "d MMM");
  if (hm === "00:00") return formatPlantTime(ts, timeZone, "d MMM");
  return incrMs < 60_000 ? formatPlantTime(ts, timeZone, "HH:mm:ss") : hm;
}

/**
 * Tick values from candidates in order of importance, skipping any that would sit closer than
 * `minGapPx` to one already chosen (so "+12", "0" and "−12" never print on top of each other).
 */
export function pickTicks(candidates: number[], min: number, max: number, heightPx: number, minGapPx = 16): number[] {
  const span = max - min || 1;
  const chosen: number[] = [];
  for (const v of candidates) {
    if (!Number.isFinite(v) || v < min - 1e-9 || v > max + 1e-9) continue;
    if (chosen.every((c) => (Math.abs(c - v) / span) * heightPx >= minGapPx)) chosen.push(v);
  }
  return chosen.sort((a, b) => a - b);
}

function padRange(min: number | null, max: number | null): [number, number] {
  if (min === null || max === null || !Number.isFinite(min) || !Number.isFinite(max)) return [0, 1];
  if (min === max) return [min - 1, max + 1];
  const pad = (max - min) * 0.08;
  return [min - pad, max + pad];
}
