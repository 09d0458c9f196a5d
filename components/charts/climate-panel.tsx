"use client";
// The hall's climate on the line page: RH with its min/max band, limit and aim band, and
// temperature and dew point on a second axis.
import { useMemo } from "react";
import { useUnits } from "@/components/live/units";
import { PointStateMark } from "@/components/floor/bits";
import type { hallView } from "@/components/floor/view-model";
import { formatAbsoluteHumidity, formatRh, formatTemp, tempInUnit, tempUnitLabel } from "@/lib/units";
import { dewPointC } from "@/lib/physics/psychrometrics";
import { formatPlantTime } from "@/lib/plant-time";
import { TimeChart, type HLine } from "./time-chart";
import { alignMeans, gapThresholdMs, hasSpread, toColumns } from "./series-data";
import { EmptyOverlay, emptyText, Legend, type PanelCommon, type SeriesData } from "./panel-common";

export function ClimatePanel({
  areaName,
  rh,
  temp,
  hall,
  rhLimitPct,
  aim,
  timeLabels,
  ...c
}: PanelCommon & {
  timeLabels: "top" | "bottom" | "none";
  areaName: string;
  rh: SeriesData;
  temp: SeriesData;
  hall: ReturnType<typeof hallView>;
  rhLimitPct: number;
  aim: [number, number];
}) {
  const { prefs } = useUnits();
  const tu = prefs.tempUnit;
  const data = useMemo(() => {
    const cols = toColumns(rh.buckets, gapThresholdMs(rh.result?.bucketMs ?? 1000));
    const tol = Math.max(rh.result?.bucketMs ?? 1000, temp.result?.bucketMs ?? 1000);
    const tMeans = alignMeans(cols.xs, temp.buckets, tol);
    const dew = cols.xs.map((_, i) => {
      const t = tMeans[i];
      const r = cols.mean[i];
      if (t === null || r === null || r <= 0) return null;
      try {
        return tempInUnit(dewPointC(t, r), tu);
      } catch {
        return null;
      }
    });
    return [cols.xs, cols.mean, cols.min, cols.max, tMeans.map((v) => (v === null ? null : tempInUnit(v, tu))), dew];
  }, [rh.buckets, rh.result?.bucketMs, temp.buckets, temp.result?.bucketMs, tu]);
  const band = hasSpread(rh.buckets);
  const hLines = useMemo<HLine[]>(() => [{ value: rhLimitPct, color: "over", dash: [6, 4] }], [rhLimitPct]);
  const hBands = useMemo(() => [{ from: aim[0], to: aim[1], color: "inkGhost" as const, alpha: 0.12 }], [aim]);
  const empty = emptyText(rh.buckets, rh.result?.lastTs ?? hall.ts, c.now, c.timeZone, "humidity logger");
  return (
    <section className="relative rounded-card border border-paper-line bg-paper-raised" aria-label={`${areaName} humidity and temperature`}>
      <header className="flex flex-wrap items-center gap-x-3 gap-y-1 px-3 pt-2">
        <h3 className="text-sm font-semibold text-ink">{areaName} climate</h3>
        <span className="num text-base font-semibold text-ink">{hall.rhPct !== null ? `${formatRh(hall.rhPct)} RH` : "–"}</span>
        <PointStateMark state={hall.rhState} />
        <span className="num text-xs text-ink-soft">
          {hall.tempC !== null ? formatTemp(hall.tempC, tu) : "–"} · dew point {hall.dewPointC !== null ? formatTemp(hall.dewPointC, tu) : "–"}
          {hall.absHumidityGPerM3 !== null ? ` · ${formatAbsoluteHumidity(hall.absHumidityGPerM3)}` : ""}
        </span>
        <span className="text-xs text-ink-faint">
          RH limit {rhLimitPct} % · aim {aim[0]}–{aim[1]} %
        </span>
        <span className="ml-auto flex items-center gap-3 text-[11px] text-ink-faint">
          <Legend swatch="bg-ink-soft" text="RH %" />
          <Legend swatch="bg-brand" text={`temp. ${tempUnitLabel(tu)}`} />
          <Legend swatch="bg-brand" dashed text={`dew point ${tempUnitLabel(tu)}`} />
        </span>
      </header>
      <TimeChart
        syncKey={c.syncKey}
        height={140}
        timeZone={c.timeZone}
        xRange={c.xRange}
        data={data}
        series={[
          { label: "RH", color: "inkSoft", width: 1.5 },
          { label: "RH min", color: "inkFaint", faint: true },
          { label: "RH max", color: "inkFaint", faint: true },
          { label: "temperature", color: "brand", width: 1.25, scale: "y2" },
          { label: "dew point", color: "brand", width: 1, scale: "y2", dash: [4, 3] },
        ]}
        band={{ upper: 3, lower: 2, color: "inkFaint", alpha: 0.22 }}
        y={{ fmt: (v) => `${v.toFixed(0)} %`, range: (mn, mx) => [Math.max(0, Math.min(mn ?? 30, rhLimitPct, aim[0]) - 5), Math.min(100, Math.max(mx ?? 60, aim[1]) + 5)], size: 48 }}
        y2={{ fmt: (v) => `${v.toFixed(0)}°`, size: 40 }}
        timeLabels={timeLabels}
        hLines={hLines}
        hBands={hBands}
        markers={c.markers}
        spans={c.spans}
        onZoom={c.onZoom}
        onPick={c.onPick}
        readout={(idx, d) => {
          if (idx === null) return "";
          const ts = d[0][idx];
          const r = d[1][idx];
          const t = d[4]?.[idx];
          const dp = d[5]?.[idx];
          if (ts == null || r == null) return "";
          return `${formatPlantTime(ts, c.timeZone, "d MMM HH:mm:ss")} · ${formatRh(r)}${t != null ? ` · ${t.toFixed(1)} ${tempUnitLabel(tu)}` : ""}${dp != null ? ` · dew point ${dp.toFixed(1)} ${tempUnitLabel(tu)}` : ""}`;
        }}
        testId="line-chart"
        attrs={{ kind: "climate", source: rh.result?.source ?? "", band: band ? "on" : "off", points: rh.buckets.length, notes: c.markers.length }}
      />
      {empty ? <EmptyOverlay text={empty} /> : null}
    </section>
  );
}
