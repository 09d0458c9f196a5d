"use client";
// One line's charts on a shared time axis: each measuring point's charge (signed, with its
// limits), the hall's humidity and temperature, the line's speed. Live (last 15 minutes,
// streaming), the current shift, 24 h, 7 days, 30 days or a custom range; long ranges come from
// the rollups and show a min/max band so a spike never disappears in an average. Drag on any
// chart to zoom all of them (the zoomed window is fetched again at its own resolution); click
// to pick the time of a note. Notes and alerts are drawn on the same axis.
import Link from "next/link";
import { useRouter, useSearchParams } from "next/navigation";
import { useQueries, useQueryClient, keepPreviousData } from "@tanstack/react-query";
import { useCallback, useMemo, useState, useSyncExternalStore } from "react";
import type { FloorArea, FloorLine } from "@/lib/views/floor";
import type { HistoryResult } from "@/lib/views/history";
import type { PlantSettings } from "@/lib/plant-settings";
import { SparkMargin } from "@/components/floor/spark-margin";
import { LiveStore } from "@/components/live/live-store";
import { useLiveStream } from "@/components/live/use-live-stream";
import { useNow } from "@/components/live/use-now";
import { UnitsProvider, UnitsToggle, useUnits } from "@/components/live/units";
import { RunIndicator, StreamIndicator } from "@/components/floor/bits";
import { hallView, lineView } from "@/components/floor/view-model";
import { StateBadge } from "@/components/ui/state-badge";
import { formatPlantTime, shiftAt } from "@/lib/plant-time";
import { formatSpeed } from "@/lib/units";
import type { Span, VMarker } from "./time-chart";
import { mergeHistoryAndLive, type Bucket } from "./series-data";
import { anchorStepMs, LIVE_WINDOW_MS, parseRangeParams, rangeToQuery, resolveRange, type RangeState } from "./ranges";
import { eventsKey, useLineEvents, type LineEvents } from "./use-history";
import { NoteForm, type NoteAction } from "./note-form";
import { historySourceText, RangeBar } from "./range-bar";
import { CompareBar } from "./compare-bar";
import type { CompareOverlay } from "./charge-panel";
import { COMPARE_LABELS, compareOffsetMs, frozenViewQuery, parseCompare, type CompareKind } from "@/lib/charts/compare";
import { ChargePanel } from "./charge-panel";
import { ClimatePanel } from "./climate-panel";
import { SpeedPanel } from "./speed-panel";
import type { SeriesData } from "./panel-common";
import { LineNotesPanel, OpenAlertsPanel, SidePanel } from "./line-side-panels";
import { PlannedWorkList } from "./planned-work-list";

type Props = {
  area: FloorArea;
  line: FloorLine;
  settings: PlantSettings;
  canAddNote: boolean;
  addNote?: NoteAction;
  serverNow: number;
  /** "Plan work here" (Planned work page prefilled with this line), for those who may plan */
  planWorkHref?: string;
};

const MAX_POINTS = 1000;

/** The reading furthest from zero, sign kept (what the spark-margin figure is judged on). */
function worstAbsKv(values: Array<number | null>): number | null {
  let worst: number | null = null;
  for (const v of values) if (v !== null && (worst === null || Math.abs(v) > Math.abs(worst))) worst = v;
  return worst;
}

export function LineDashboard(props: Props) {
  return (
    <UnitsProvider defaults={{ chargeUnit: props.settings.chargeUnit, tempUnit: props.settings.tempUnit }}>
      <LineDashboardInner {...props} />
    </UnitsProvider>
  );
}

type SeriesDef = { key: string; deviceId: number; channel: string };

async function fetchHistory(d: SeriesDef, fromTs: number, toTs: number): Promise<HistoryResult> {
  const p = new URLSearchParams({ deviceId: String(d.deviceId), channel: d.channel, from: String(fromTs), to: String(toTs), maxPoints: String(MAX_POINTS) });
  const res = await fetch(`/api/history?${p}`, { cache: "no-store" });
  if (!res.ok) throw new Error(`history ${res.status}`);
  return (await res.json()) as HistoryResult;
}

function LineDashboardInner({ area, line, settings, canAddNote, addNote, serverNow, planWorkHref }: Props) {
  const { prefs } = useUnits();
  const router = useRouter();
  const searchParams = useSearchParams();
  const queryClient = useQueryClient();
  const tz = settings.timeZone;
  const range = parseRangeParams((k) => searchParams.get(k));
  const compare = parseCompare(searchParams.get("compare"));
  const [zoom, setZoom] = useState<[number, number] | null>(null);
  const [pickedTs, setPickedTs] = useState<number | null>(null);
  const [liveAnchor, setLiveAnchor] = useState(serverNow);

  const store = useMemo(() => new LiveStore(LIVE_WINDOW_MS + 2 * 60_000, 2_400, 100), []);
  const refetchEvents = useCallback(() => void queryClient.invalidateQueries({ queryKey: eventsKey(line.id) }), [queryClient, line.id]);
  const stream = useLiveStream({ scope: "line", id: line.id }, store, { onAlert: refetchEvents, onReset: () => setLiveAnchor(Date.now()) }, serverNow);
  const version = useSyncExternalStore(store.subscribe, store.getVersion, store.getVersion);
  const now = useNow(1_000, stream.clockOffsetMs, serverNow);

  const isLive = range.kind === "live" && zoom === null;
  const step = anchorStepMs(range.kind);
  const anchor = range.kind === "live" ? liveAnchor : Math.floor(now / step) * step;
  const [rangeFrom, rangeTo] = resolveRange(range, anchor, settings);
  const view: [number, number] = zoom ?? (isLive ? [now - LIVE_WINDOW_MS, now] : [rangeFrom, rangeTo]);
  const fetchWindow: [number, number] = zoom ?? [rangeFrom, rangeTo];

  const defs = useMemo<SeriesDef[]>(() => {
    const out: SeriesDef[] = [];
    for (const p of line.points) if (p.fieldMeter) out.push({ key: `p${p.id}`, deviceId: p.fieldMeter.deviceId, channel: "charge_kv" });
    if (area.logger) {
      out.push({ key: "rh", deviceId: area.logger.deviceId, channel: "rh_pct" });
      out.push({ key: "temp", deviceId: area.logger.deviceId, channel: "temp_c" });
    }
    if (line.speedGateway) out.push({ key: "speed", deviceId: line.speedGateway.deviceId, channel: "speed_mpm" });
    return out;
  }, [line, area]);

  const histories = useQueries({
    queries: defs.map((d) => ({
      queryKey: ["history", d.deviceId, d.channel, fetchWindow[0], fetchWindow[1], MAX_POINTS],
      queryFn: () => fetchHistory(d, fetchWindow[0], fetchWindow[1]),
      placeholderData: keepPreviousData,
      staleTime: 30_000,
    })),
  });
  const historyByKey = new Map(defs.map((d, i) => [d.key, histories[i]?.data] as const));
  // the compared window: the fetched window moved back by the previous shift, day or week
  const compareOffset = compare ? compareOffsetMs(compare, fetchWindow[0], settings) : 0;
  const chargeDefs = compare ? defs.filter((d) => d.channel === "charge_kv") : [];
  const earlier = useQueries({
    queries: chargeDefs.map((d) => ({
      queryKey: ["history", d.deviceId, d.channel, fetchWindow[0] - compareOffset, fetchWindow[1] - compareOffset, MAX_POINTS],
      queryFn: () => fetchHistory(d, fetchWindow[0] - compareOffset, fetchWindow[1] - compareOffset),
      placeholderData: keepPreviousData,
      staleTime: 60_000,
    })),
  });
  const earlierByKey = new Map(chargeDefs.map((d, i) => [d.key, earlier[i]?.data] as const));
  const loading = histories.some((h) => h.isFetching && !h.data);
  const failed = histories.find((h) => h.error)?.error;

  // minute steps: a sliding live window must not refetch every second
  const events = useLineEvents(line.id, Math.floor(view[0] / 60_000) * 60_000 - 60_000, Math.ceil(Math.max(view[1], now) / 60_000) * 60_000 + 60_000);

  // current values for the headers
  const lv = lineView(line, store, now);
  const hv = hallView(area, store, now);

  const bucketsFor = (key: string, deviceId: number, channel: string): SeriesData => {
    const result = historyByKey.get(key);
    const hist = result && result.fromTs <= view[1] && result.toTs >= view[0] ? result.points : undefined;
    const live = isLive ? store.since(deviceId, channel, view[0]) : [];
    return { buckets: mergeHistoryAndLive(hist, live, view[0], view[1]), result };
  };

  // recomputed when history arrives, the window moves, or (live only) the stream brings data;
  // a static range keeps the same arrays, so its charts are not redrawn every second
  const dataStamp = histories.map((h) => h.dataUpdatedAt).join(",");
  const seriesData = useMemo(() => {
    const out = new Map<string, SeriesData>();
    for (const d of defs) out.set(d.key, bucketsFor(d.key, d.deviceId, d.channel));
    return out;
    // eslint-disable-next-line react-hooks/exhaustive-deps -- bucketsFor reads this render's histories and store; these are what it depends on
  }, [defs, dataStamp, view[0], view[1], isLive ? version : -1]);
  const emptySeries = { buckets: [] as Bucket[], result: undefined };
  const dataOf = (key: string) => seriesData.get(key) ?? emptySeries;

  const noteMarkers: VMarker[] = useMemo(
    () => (events.data?.notes ?? []).map((n, i) => ({ ts: n.ts, label: String(i + 1), color: "brand" as const })),
    [events.data],
  );
  const alertSpans = useCallback(
    (filter: (a: LineEvents["alerts"][number]) => boolean): Span[] =>
      (events.data?.alerts ?? []).filter(filter).map((a) => ({
        from: a.startTs,
        to: a.endTs ?? now,
        color: a.shelvedUntilTs && a.shelvedUntilTs > now ? ("shelved" as const) : ("over" as const),
        alpha: 0.05,
      })),
    [events.data, now],
  );
  // planned work (maintenance windows) as hatched, labelled bands
  const windowSpans = useCallback(
    (filter: (w: NonNullable<LineEvents["windows"]>[number]) => boolean): Span[] =>
      (events.data?.windows ?? []).filter(filter).map((w) => ({ from: w.startTs, to: w.endTs, color: "inkSoft" as const, alpha: 0.06, hatch: true, label: `Planned work: ${w.reason}` })),
    [events.data],
  );

  const withCompare = (q: string, k: CompareKind | null) => (k ? `${q}${q ? "&" : "?"}compare=${k}` : q);
  const setRange = (r: RangeState) => {
    setZoom(null);
    setPickedTs(null);
    if (r.kind === "live") setLiveAnchor(Date.now() + stream.clockOffsetMs);
    router.replace(`/lines/${line.id}${withCompare(rangeToQuery(r), compare)}`, { scroll: false });
  };
  const setCompare = (k: CompareKind | null) => router.replace(`/lines/${line.id}${withCompare(rangeToQuery(range), k)}`, { scroll: false });
  // one overlay object per chart, kept while nothing it shows changes (a static range is not redrawn every second)
  const earlierStamp = earlier.map((h) => h.dataUpdatedAt).join(",");
  const overlays = useMemo(() => {
    const m = new Map<string, CompareOverlay>();
    if (!compare) return m;
    const label = `${COMPARE_LABELS[compare]} (${formatPlantTime(fetchWindow[0] - compareOffset, tz, "EEE d MMM HH:mm")}–${formatPlantTime(fetchWindow[1] - compareOffset, tz, "HH:mm")})`;
    for (const [key, r] of earlierByKey) m.set(key, { label, offsetMs: compareOffset, buckets: r?.points ?? [], bucketMs: r?.bucketMs ?? 1000 });
    return m;
    // eslint-disable-next-line react-hooks/exhaustive-deps -- earlierByKey is rebuilt each render from the queries; earlierStamp says when they changed
  }, [compare, compareOffset, earlierStamp, fetchWindow[0], fetchWindow[1], tz]);
  const compareOverlay = (key: string) => overlays.get(key) ?? null;

  const shift = shiftAt(now, settings);
  const openAlerts = (events.data?.alerts ?? []).filter((a) => a.state !== "closed");
  const syncKey = `line-${line.id}`;

  return (
    <div>
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <div className="min-w-0">
          <p className="text-sm text-ink-faint">
            <Link href="/floor" className="hover:text-brand hover:underline">
              Floor
            </Link>{" "}
            / {area.name}
          </p>
          <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <h1 className="text-xl font-semibold tracking-tight text-ink">{line.name}</h1>
            {lv.worst === "over" || lv.worst === "near" ? <StateBadge state={lv.worst} /> : null}
            <RunIndicator run={lv.run} speedText={lv.speedMpm !== null ? formatSpeed(lv.speedMpm) : null} className="text-sm" />
          </div>
          <p className="mt-0.5 text-xs text-ink-faint">
            {[line.material, line.solventName ? `solvent: ${line.solventName}` : null, `nominal ${formatSpeed(line.nominalSpeedMpm)}`].filter(Boolean).join(" · ")}
          </p>
          <SparkMargin
            variant="page"
            className="mt-1 max-w-3xl"
            solventName={line.solventName}
            solventMieMj={line.solventMieMj}
            conductorCapacitancePf={line.conductorCapacitancePf}
            worstChargeKv={worstAbsKv(lv.points.map((p) => p.value))}
          />
        </div>
        <div className="flex flex-wrap items-center gap-3">
          <StreamIndicator status={stream.status} brokerConnected={stream.brokerConnected} />
          {planWorkHref ? (
            <Link href={planWorkHref} className="rounded border border-paper-line bg-paper-raised px-2.5 py-1 text-sm text-ink hover:bg-paper-sunk" data-testid="plan-work-link">
              Plan work here
            </Link>
          ) : null}
          <UnitsToggle />
        </div>
      </div>

      <RangeBar
        range={range}
        onRange={setRange}
        zoomed={zoom !== null}
        onResetZoom={() => setZoom(null)}
        view={view}
        timeZone={tz}
        shiftName={shift.name}
        loading={loading}
        sourceText={historySourceText(historyByKey.get(defs[0]?.key ?? ""))}
      />
      <CompareBar compare={compare} onCompare={setCompare} frozenHref={`/lines/${line.id}${frozenViewQuery(view[0], view[1], compare)}`} />
      {failed ? (
        <p role="alert" className="mb-3 rounded bg-over-soft px-3 py-1.5 text-sm text-over">
          Some history could not be loaded ({failed instanceof Error ? failed.message : "error"}). Live values still update.
        </p>
      ) : null}

      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_19rem]">
        <div className="space-y-2" data-testid="line-charts">
          <PlannedWorkList windows={(events.data?.windows ?? []).filter((w) => w.endTs > view[0] && w.startTs < view[1])} now={now} timeZone={tz} />
          {lv.points.map((pv, i) => {
            const p = pv.point;
            const fm = p.fieldMeter;
            const { buckets, result } = fm ? dataOf(`p${p.id}`) : emptySeries;
            return (
              <ChargePanel
                key={p.id}
                view={pv}
                buckets={buckets}
                result={result}
                xRange={view}
                isLive={isLive}
                timeLabels={i === 0 ? "top" : "none"}
                syncKey={syncKey}
                timeZone={tz}
                now={now}
                markers={noteMarkers}
                spans={[...windowSpans((w) => w.pointId === null || w.pointId === p.id), ...alertSpans((a) => a.pointId === p.id)]}
                onZoom={(a, b) => setZoom([a, b])}
                onPick={canAddNote ? setPickedTs : undefined}
                compare={fm ? compareOverlay(`p${p.id}`) : null}
              />
            );
          })}
          {area.logger ? (
            <ClimatePanel
              areaName={area.name}
              rh={dataOf("rh")}
              temp={dataOf("temp")}
              hall={hv}
              rhLimitPct={area.rhLimit.limitPct}
              aim={[area.rhMinPct, area.rhMaxPct]}
              xRange={view}
              syncKey={syncKey}
              timeZone={tz}
              now={now}
              markers={noteMarkers}
              spans={[...windowSpans((w) => w.targetKind === "area"), ...alertSpans((a) => a.pointId === null && a.lineId === null)]}
              onZoom={(a, b) => setZoom([a, b])}
              onPick={canAddNote ? setPickedTs : undefined}
              timeLabels={!line.speedGateway ? "bottom" : line.points.length === 0 ? "top" : "none"}
            />
          ) : null}
          {line.speedGateway ? (
            <SpeedPanel
              data={dataOf("speed")}
              nominal={line.nominalSpeedMpm}
              xRange={view}
              syncKey={syncKey}
              timeZone={tz}
              now={now}
              markers={noteMarkers}
              spans={[...windowSpans((w) => w.pointId === null), ...alertSpans((a) => a.lineId === line.id && a.pointId === null)]}
              onZoom={(a, b) => setZoom([a, b])}
              onPick={canAddNote ? setPickedTs : undefined}
            />
          ) : null}
          <p className="px-1 pt-1 text-xs text-ink-faint">
            Drag across a chart to zoom all charts; {canAddNote ? "click a moment to set the time of a note; " : ""}times are plant time ({tz}). Charge
            is signed, {prefs.chargeUnit}, at each sensor&apos;s calibrated distance.
          </p>
        </div>

        <aside className="space-y-4">
          <OpenAlertsPanel openAlerts={openAlerts} now={now} tz={tz} />
          <SidePanel title="Add a note">
            {canAddNote && addNote ? (
              <NoteForm lineId={line.id} points={line.points} pickedTs={pickedTs} nowTs={Math.floor(now / 60_000) * 60_000} timeZone={tz} action={addNote} onAdded={refetchEvents} />
            ) : (
              <p className="text-sm text-ink-faint">Shift leads, engineers and admins can add notes; your role can read them.</p>
            )}
          </SidePanel>
          <LineNotesPanel notes={events.data?.notes ?? []} points={line.points} tz={tz} />
        </aside>
      </div>
    </div>
  );
}
