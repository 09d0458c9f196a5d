"use client";
// One measuring point's charge over time on the line page: signed charge with its ± limit lines,
// the live value and state, the limit's source and the neutralizer that serves the point.
import { useMemo } from "react";
import type { FloorPoint } from "@/lib/views/floor";
import type { HistoryResult } from "@/lib/views/history";
import { useUnits } from "@/components/live/units";
import { ChargeValue, PointStateMark } from "@/components/floor/bits";
import type { PointView } from "@/components/floor/view-model";
import { StateBadge } from "@/components/ui/state-badge";
import { chargeInUnit, formatCharge, formatChargeLimit } from "@/lib/units";
import { pickTicks, TimeChart, type HLine } from "./time-chart";
import { gapThresholdMs, hasSpread, symmetricRange, toColumns, type Bucket } from "./series-data";
import { EmptyOverlay, emptyText, Legend, readoutText, type PanelCommon } from "./panel-common";
import { alignCompare } from "@/lib/charts/compare";

/** The same span of an earlier window (previous shift, day or week), drawn dashed over the chart. */
export type CompareOverlay = { label: string; offsetMs: number; buckets: readonly Bucket[]; bucketMs: number };
import { NEUTRALIZER_STATE_CODE, NEUTRALIZER_STATE_WORDS, isNeutralizerState, type NeutralizerState, type PointState } from "@/lib/vocabulary";

/** A neutralizer's state as the panel header shows it (state colour and word). */
function neutralizerStateMark(state: string): { state: PointState; word: string } {
  const s: NeutralizerState = isNeutralizerState(state) ? state : "in_service";
  return { state: NEUTRALIZER_STATE_CODE[s], word: NEUTRALIZER_STATE_WORDS[s] };
}

export function ChargePanel({
  view,
  buckets,
  result,
  isLive,
  timeLabels,
  compare,
  ...c
}: PanelCommon & { view: PointView; buckets: Bucket[]; result: HistoryResult | undefined; isLive: boolean; timeLabels: "top" | "none"; compare?: CompareOverlay | null }) {
  const { prefs } = useUnits();
  const p: FloorPoint = view.point;
  const limit = p.limit?.limitKv ?? null;
  const unit = prefs.chargeUnit;
  const data = useMemo(() => {
    const cols = toColumns(buckets, gapThresholdMs(result?.bucketMs ?? 1000));
    const conv = (a: Array<number | null>) => a.map((v) => (v === null ? null : chargeInUnit(v, unit)));
    const out = [cols.xs, conv(cols.mean), conv(cols.min), conv(cols.max)];
    if (compare) out.push(conv(alignCompare(cols.xs, compare.buckets.map((b) => [b[0], b[2]] as const), compare.offsetMs, Math.max(compare.bucketMs, result?.bucketMs ?? 1000))));
    return out;
  }, [buckets, result?.bucketMs, unit, compare]);
  const band = hasSpread(buckets);
  const limitInUnit = limit !== null ? chargeInUnit(limit, unit) : null;
  const hLines = useMemo<HLine[]>(
    () =>
      limitInUnit !== null
        ? [
            { value: limitInUnit, color: "over", dash: [6, 4] },
            { value: -limitInUnit, color: "over", dash: [6, 4] },
            { value: 0, color: "inkGhost", dash: [], alpha: 0.6 },
          ]
        : [{ value: 0, color: "inkGhost", dash: [], alpha: 0.6 }],
    [limitInUnit],
  );
  const lastSeen = result?.lastTs ?? view.ts;
  const empty = emptyText(buckets, isLive ? view.ts : lastSeen, c.now, c.timeZone, "sensor");
  const n = neutralizerStateMark(p.neutralizer?.state ?? "in_service");
  return (
    <section className="relative rounded-card border border-paper-line bg-paper-raised" aria-label={`${p.name} charge`}>
      <header className="flex flex-wrap items-center gap-x-3 gap-y-1 px-3 pt-2">
        <h3 className="text-sm font-semibold text-ink">
          <span className="num mr-1 text-ink-ghost">{p.position}</span>
          {p.name}
        </h3>
        <span data-testid="live-value" data-point-id={p.id} data-value={view.value ?? ""} data-ts={view.ts ?? ""}>
          <ChargeValue valueKv={view.state === "silent" ? null : view.value} unit={unit} showUnit className="text-base" />
        </span>
        <PointStateMark state={view.state} />
        <span className="text-xs text-ink-faint">
          limit {limit !== null ? formatChargeLimit(limit, unit) : "none set"}
          {p.limit ? ` · ${p.limit.level === "plant" ? "plant default" : `${p.limit.level} rule`}` : ""}
        </span>
        {p.neutralizer ? (
          <span className="inline-flex items-center gap-1.5 text-xs text-ink-faint" data-testid="neutralizer">
            {p.neutralizer.kind === "ionized_air_blower" ? "Blower" : "Bar"} {p.neutralizer.tag}
            {n.state === "normal" ? <span>· {n.word}</span> : <StateBadge state={n.state} label={n.word} />}
          </span>
        ) : (
          <span className="text-xs text-ink-faint">no neutralizer</span>
        )}
      </header>
      <TimeChart
        // the chart's series are fixed when it is created: turning the overlay on or off makes a new one
        key={compare ? "compare" : "plain"}
        syncKey={c.syncKey}
        height={timeLabels === "top" ? 140 : 118}
        timeZone={c.timeZone}
        xRange={c.xRange}
        data={data}
        series={[
          { label: "mean", color: "inkSoft", width: 1.5 },
          { label: "min", color: "inkFaint", faint: true },
          { label: "max", color: "inkFaint", faint: true },
          ...(compare ? [{ label: compare.label, color: "brand" as const, width: 1.25, dash: [5, 4] }] : []),
        ]}
        band={{ upper: 3, lower: 2, color: "inkFaint", alpha: 0.22 }}
        y={{
          fmt: (v) => (unit === "V" ? formatCharge(v / 1000, "V") : formatCharge(v, "kV").replace(/\.0$/, "")),
          range: (mn, mx) => symmetricRange(mn, mx, limitInUnit),
          splits: (mn, mx, h) => pickTicks(limitInUnit !== null ? [0, mn, mx, -limitInUnit, limitInUnit] : [0, mn, mx], mn, mx, h),
          size: unit === "V" ? 62 : 52,
        }}
        timeLabels={timeLabels}
        hLines={hLines}
        markers={c.markers}
        spans={c.spans}
        onZoom={c.onZoom}
        onPick={c.onPick}
        readout={(idx, d) => readoutText(idx, d, c.timeZone, (v) => formatCharge(unit === "V" ? v / 1000 : v, unit, { withUnit: true }), band)}
        testId="line-chart"
        attrs={{ kind: "charge", compare: compare ? compare.label : "", "compare-points": compare ? compare.buckets.length : 0, "point-id": p.id, source: result?.source ?? "", band: band ? "on" : "off", points: buckets.length, notes: c.markers.length, "planned-work": c.spans.filter((s) => s.hatch).length }}
      />
      {compare ? (
        <p className="flex flex-wrap gap-x-4 px-3 pb-2 text-xs text-ink-soft" data-testid="compare-legend">
          <Legend swatch="bg-ink-soft" text="This window" />
          <Legend swatch="" dashed text={compare.label} />
        </p>
      ) : null}
      {empty ? <EmptyOverlay text={empty} /> : null}
    </section>
  );
}
