"use client";
// The line's speed on the line page, with the nominal speed as a dotted line.
import { useMemo } from "react";
import { formatSpeed } from "@/lib/units";
import { TimeChart, type HLine } from "./time-chart";
import { gapThresholdMs, toColumns } from "./series-data";
import { EmptyOverlay, emptyText, readoutText, type PanelCommon, type SeriesData } from "./panel-common";

export function SpeedPanel({ data: d, nominal, ...c }: PanelCommon & { data: SeriesData; nominal: number }) {
  const data = useMemo(() => {
    const cols = toColumns(d.buckets, gapThresholdMs(d.result?.bucketMs ?? 1000));
    return [cols.xs, cols.mean, cols.min, cols.max];
  }, [d.buckets, d.result?.bucketMs]);
  const hLines = useMemo<HLine[]>(() => [{ value: nominal, color: "inkGhost", dash: [2, 3] }], [nominal]);
  const empty = emptyText(d.buckets, d.result?.lastTs, c.now, c.timeZone, "speed sensor");
  return (
    <section className="relative rounded-card border border-paper-line bg-paper-raised" aria-label="Line speed">
      <header className="flex items-center gap-3 px-3 pt-2">
        <h3 className="text-sm font-semibold text-ink">Line speed</h3>
        <span className="text-xs text-ink-faint">m/min · nominal {formatSpeed(nominal)} dotted</span>
      </header>
      <TimeChart
        syncKey={c.syncKey}
        height={96}
        timeZone={c.timeZone}
        xRange={c.xRange}
        data={data}
        series={[
          { label: "speed", color: "inkSoft", width: 1.5 },
          { label: "min", color: "inkFaint", faint: true },
          { label: "max", color: "inkFaint", faint: true },
        ]}
        band={{ upper: 3, lower: 2, color: "inkFaint", alpha: 0.2 }}
        y={{ fmt: (v) => v.toFixed(0), range: (_mn, mx) => [0, Math.max(mx ?? 0, nominal) * 1.15], size: 52 }}
        hLines={hLines}
        markers={c.markers}
        spans={c.spans}
        onZoom={c.onZoom}
        onPick={c.onPick}
        readout={(idx, dd) => readoutText(idx, dd, c.timeZone, (v) => formatSpeed(v), false)}
        timeLabels="bottom"
        testId="line-chart"
        attrs={{ kind: "speed", source: d.result?.source ?? "", points: d.buckets.length, notes: c.markers.length }}
      />
      {empty ? <EmptyOverlay text={empty} /> : null}
    </section>
  );
}
