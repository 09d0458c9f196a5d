"use client";
// The line page's time-range bar: live, shift, 24 h, 7 d, 30 d or a custom range in plant time,
// the window shown, a reset for a zoom, and which history source the charts are drawn from.
import { useState } from "react";
import clsx from "clsx";
import type { HistoryResult } from "@/lib/views/history";
import { formatPlantTime, fromPlantLocalInput, toPlantLocalInput } from "@/lib/plant-time";
import { RANGE_KINDS, RANGE_LABELS, type RangeState } from "./ranges";

/** Says where the charts' history came from (raw readings or rollups) and its step. */
export function historySourceText(r: HistoryResult | undefined): string {
  if (!r) return "";
  const what = r.source === "raw" ? "raw readings" : r.source === "1m" ? "1-minute rollups" : "1-hour rollups";
  const bucket = r.bucketMs >= 3_600_000 ? `${r.bucketMs / 3_600_000} h` : r.bucketMs >= 60_000 ? `${r.bucketMs / 60_000} min` : `${r.bucketMs / 1000} s`;
  return `${what}, ${bucket} steps${r.source === "raw" ? "" : " with min–max band"}`;
}

export function RangeBar({
  range,
  onRange,
  zoomed,
  onResetZoom,
  view,
  timeZone,
  shiftName,
  loading,
  sourceText,
}: {
  range: RangeState;
  onRange: (r: RangeState) => void;
  zoomed: boolean;
  onResetZoom: () => void;
  view: [number, number];
  timeZone: string;
  shiftName: string;
  loading: boolean;
  sourceText: string;
}) {
  const [customOpen, setCustomOpen] = useState(range.kind === "custom");
  const [from, setFrom] = useState(() => toPlantLocalInput(view[0], timeZone));
  const [to, setTo] = useState(() => toPlantLocalInput(view[1], timeZone));
  const [error, setError] = useState<string | null>(null);
  const apply = () => {
    const f = fromPlantLocalInput(from, timeZone);
    const t = fromPlantLocalInput(to, timeZone);
    if (f === null || t === null) return setError("Enter both times.");
    if (f >= t) return setError("The start must be before the end.");
    if (t - f > 400 * 86_400_000) return setError("At most 400 days.");
    setError(null);
    onRange({ kind: "custom", from: f, to: t });
  };
  return (
    <div className="mb-3 rounded-card border border-paper-line bg-paper-raised px-3 py-2">
      <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <div role="group" aria-label="Time range" className="inline-flex overflow-hidden rounded border border-paper-line text-sm">
          {RANGE_KINDS.map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={range.kind === k}
              onClick={() => {
                if (k === "custom") {
                  setFrom(toPlantLocalInput(view[0], timeZone));
                  setTo(toPlantLocalInput(view[1], timeZone));
                  setCustomOpen(true);
                } else {
                  setCustomOpen(false);
                  onRange({ kind: k });
                }
              }}
              className={clsx(
                "border-l border-paper-line px-3 py-1 first:border-l-0",
                range.kind === k ? "bg-ink text-paper-raised" : "bg-paper-raised text-ink-soft hover:bg-paper-sunk",
              )}
            >
              {k === "live" ? (
                <span className="inline-flex items-center gap-1.5">
                  <span className={clsx("inline-block h-1.5 w-1.5 rounded-full", range.kind === "live" ? "bg-paper-raised" : "bg-ink-faint")} />
                  Live
                </span>
              ) : k === "shift" ? (
                `${shiftName} shift`
              ) : (
                RANGE_LABELS[k]
              )}
            </button>
          ))}
        </div>
        <span className="num text-xs text-ink-soft" data-testid="range-text">
          {formatPlantTime(view[0], timeZone, "d MMM HH:mm")} – {formatPlantTime(view[1], timeZone, "d MMM HH:mm")}
        </span>
        {zoomed ? (
          <button type="button" onClick={onResetZoom} className="rounded border border-paper-line px-2 py-0.5 text-xs text-ink-soft hover:bg-paper-sunk">
            Reset zoom
          </button>
        ) : null}
        <span className="ml-auto text-xs text-ink-faint" data-testid="history-source">
          {loading ? "Loading…" : sourceText}
        </span>
      </div>
      {customOpen ? (
        <div className="mt-2 flex flex-wrap items-end gap-2 text-sm">
          <label className="block">
            <span className="text-xs text-ink-soft">From (plant time)</span>
            <input type="datetime-local" value={from} onChange={(e) => setFrom(e.target.value)} className="block rounded border border-paper-line bg-white px-2 py-1" />
          </label>
          <label className="block">
            <span className="text-xs text-ink-soft">To</span>
            <input type="datetime-local" value={to} onChange={(e) => setTo(e.target.value)} className="block rounded border border-paper-line bg-white px-2 py-1" />
          </label>
          <button type="button" onClick={apply} className="rounded bg-brand px-3 py-1 text-sm font-medium text-white hover:bg-brand-deep">
            Show
          </button>
          {error ? <span className="text-xs text-over">{error}</span> : null}
        </div>
      ) : null}
    </div>
  );
}
