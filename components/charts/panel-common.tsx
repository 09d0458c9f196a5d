"use client";
// What the line page's chart panels (charge, climate, speed) share: the props every panel
// takes, the "no readings" overlay, the hover read-out text and the legend swatch.
import clsx from "clsx";
import { formatPlantSince, formatPlantTime } from "@/lib/plant-time";
import type { HistoryResult } from "@/lib/views/history";
import type { Span, VMarker } from "./time-chart";
import type { Bucket } from "./series-data";

/** One series as a panel draws it: merged buckets and the history answer they came from. */
export type SeriesData = { buckets: Bucket[]; result: HistoryResult | undefined };

export type PanelCommon = {
  xRange: [number, number];
  syncKey: string;
  timeZone: string;
  now: number;
  markers: VMarker[];
  spans: Span[];
  onZoom: (a: number, b: number) => void;
  onPick?: (ts: number) => void;
};

export function EmptyOverlay({ text }: { text: string }) {
  return (
    <div className="pointer-events-none absolute inset-0 flex items-center justify-center">
      <span className="rounded bg-paper-raised/90 px-3 py-1 text-sm text-ink-faint" data-testid="chart-empty">
        {text}
      </span>
    </div>
  );
}

export function emptyText(buckets: Bucket[], lastTs: number | null | undefined, now: number, tz: string, what: string): string | null {
  if (buckets.length > 0) return null;
  return lastTs ? `No readings from this ${what} since ${formatPlantSince(lastTs, now, tz)}` : `No readings from this ${what} in this range`;
}

export function readoutText(idx: number | null, d: ReadonlyArray<ArrayLike<number | null | undefined>>, tz: string, fmt: (v: number) => string, band: boolean): string {
  if (idx === null || idx === undefined) return "";
  const ts = d[0][idx];
  const mean = d[1]?.[idx];
  if (ts == null || mean == null) return "";
  const mn = d[2]?.[idx];
  const mx = d[3]?.[idx];
  const range = band && mn != null && mx != null && mx - mn > 1e-9 ? ` (min ${fmt(mn)}, max ${fmt(mx)})` : "";
  return `${formatPlantTime(ts, tz, "d MMM HH:mm:ss")} · ${fmt(mean)}${range}`;
}

export function Legend({ swatch, text, dashed = false }: { swatch: string; text: string; dashed?: boolean }) {
  return (
    <span className="inline-flex items-center gap-1">
      <span className={clsx("inline-block h-0.5 w-3", dashed ? "border-t border-dashed border-brand bg-transparent" : swatch)} />
      {text}
    </span>
  );
}
