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
import clsx from "clsx";
import type { FloorArea, FloorLine, FloorPoint } from "@/db/queries/floor";
import { SparkMargin } from "@/components/floor/spark-margin";

function worstAbsKv(values: Array<number | null>): number | null {
  let worst: number | null = null;
  for (const v of values) if (v !== null && (worst === null || Math.abs(v) > Math.abs(worst))) worst = v;
  return worst;
}
import type { HistoryResult } from "@/db/queries/history";
import type { PlantSettings } from "@/lib/plant-settings";
import { LiveStore } from "@/components/live/live-store";
import { useLiveStream } from "@/components/live/use-live-stream";
import { useNow } from "@/components/live/use-now";
import { UnitsProvider, UnitsToggle, useUnits } from "@/components/live/units";
import { ChargeValue, PointStateMark, RunIndicator, StreamIndicator } from "@/components/floor/bits";
import { hallView, lineView, type PointView } from "@/components/floor/view-model";
import { StateBadge } from "@/components/ui/state-badge";
import { formatPlantSince, formatPlantTime, fromPlantLocalInput, shiftAt, toPlantLocalInput } from "@/lib/plant-time";
import {
  chargeInUnit,
  formatAbsoluteHumidity,
  formatCharge,
  formatChargeLimit,
  formatRh,
  formatSpeed,
  formatTemp,
  tempInUnit,
  tempUnitLabel,
} from "@/lib/units";
import { dewPointC } from "@/lib/physics/psychrometrics";
import { pickTicks, TimeChart, type HLine, type Span, type VMarker } from "./time-chart";
import { alignMeans, gapThresholdMs, hasSpread, mergeHistoryAndLive, symmetricRange, toColumns, type Bucket } from "./series-data";
import { anchorStepMs, LIVE_WINDOW_MS, parseRangeParams, RANGE_KINDS, RANGE_LABELS, rangeToQuery, resolveRange, type RangeState } from "./ranges";
import { eventsKey, useLineEvents, type LineEvents } from "./use-history";
import { NoteForm, type NoteAction } from "./note-form";

type Props = {
  area: FloorArea;
  line: FloorLine;
  settings: PlantSettings;
  canAddNote: boolean;
  addNote?: NoteAction;
  serverNow: number;
};

const MAX_POINTS = 1000;

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

function LineDashboardInner({ area, line, settings, canAddNote, addNote, serverNow }: Props) {
  const { prefs } = useUnits();
  const router = useRouter();
  const searchParams = useSearchParams();
  const queryClient = useQueryClient();
  const tz = settings.timeZone;
  const range = parseRangeParams((k) => searchParams.get(k));
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
  const loading = histories.some((h) => h.isFetching && !h.data);
  const failed = histories.find((h) => h.error)?.error;

  // minute steps: a sliding live window must not refetch every second
  const events = useLineEvents(line.id, Math.floor(view[0] / 60_000) * 60_000 - 60_000, Math.ceil(Math.max(view[1], now) / 60_000) * 60_000 + 60_000);

  // current values for the headers
  const lv = lineView(line, store, now);
  const hv = hallView(area, store, now);

  const bucketsFor = (key: string, deviceId: number, channel: string): { buckets: Bucket[]; result: HistoryResult | undefined } => {
    const result = historyByKey.get(key);
    const hist = result && result.fromTs <= view[1] && result.toTs >= view[0] ? result.points : undefined;
    const live = isLive ? store.since(deviceId, channel, view[0]) : [];
    return { buckets: mergeHistoryAndLive(hist, live, view[0], view[1]), result };
  };

  // recomputed when history arrives, the window moves, or (live only) the stream brings data;
  // a static range keeps the same arrays, so its charts are not redrawn every second
  const dataStamp = histories.map((h) => h.dataUpdatedAt).join(",");
  const seriesData = useMemo(() => {
    const out = new Map<string, { buckets: Bucket[]; result: HistoryResult | undefined }>();
    for (const d of defs) out.set(d.key, bucketsFor(d.key, d.deviceId, d.channel));
    return out;
    // bucketsFor reads this render's histories and store; these are what it depends on
    // eslint-disable-next-line react-hooks/exhaustive-deps
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

  const setRange = (r: RangeState) => {
    setZoom(null);
    setPickedTs(null);
    if (r.kind === "live") setLiveAnchor(Date.now() + stream.clockOffsetMs);
    router.replace(`/lines/${line.id}${rangeToQuery(r)}`, { scroll: false });
  };

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
        sourceText={sourceText(historyByKey.get(defs[0]?.key ?? ""))}
      />
      {failed ? (
        <p role="alert" className="mb-3 rounded bg-over-soft px-3 py-1.5 text-sm text-over">
          Some history could not be loaded ({failed instanceof Error ? failed.message : "error"}). Live values still update.
        </p>
      ) : null}

      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_19rem]">
        <div className="space-y-2" data-testid="line-charts">
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
                spans={alertSpans((a) => a.pointId === p.id)}
                onZoom={(a, b) => setZoom([a, b])}
                onPick={canAddNote ? setPickedTs : undefined}
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
              spans={alertSpans((a) => a.pointId === null && a.lineId === null)}
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
              spans={alertSpans((a) => a.lineId === line.id && a.pointId === null)}
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
          <SidePanel title={`Open alerts${openAlerts.length ? ` (${openAlerts.length})` : ""}`}>
            {openAlerts.length === 0 ? (
              <p className="text-sm text-ink-faint">No open alerts on this line or its hall.</p>
            ) : (
              <ul className="space-y-2" data-testid="line-open-alerts">
                {openAlerts.slice(0, 3).map((a) => {
                  const shelved = a.shelvedUntilTs !== null && a.shelvedUntilTs > now;
                  return (
                    <li key={a.id} className="text-sm">
                      <div className="flex items-center gap-2">
                        <StateBadge
                          state={shelved ? "shelved" : "over"}
                          label={shelved ? "Shelved" : a.state === "active_acked" ? "Acknowledged" : a.state === "cleared_unacked" ? "Cleared" : "Active"}
                        />
                        <span className="num text-xs text-ink-faint">since {formatPlantSince(a.startTs, now, tz)}</span>
                      </div>
                      <p className="mt-0.5 leading-snug text-ink-soft">{a.message}</p>
                    </li>
                  );
                })}
                <li>
                  <Link href="/alerts" className="text-xs text-brand hover:underline">
                    {openAlerts.length > 3 ? `${openAlerts.length - 3} more — all alerts` : "All alerts"}
                  </Link>
                </li>
              </ul>
            )}
          </SidePanel>
          <SidePanel title="Add a note">
            {canAddNote && addNote ? (
              <NoteForm lineId={line.id} points={line.points} pickedTs={pickedTs} nowTs={Math.floor(now / 60_000) * 60_000} timeZone={tz} action={addNote} onAdded={refetchEvents} />
            ) : (
              <p className="text-sm text-ink-faint">Shift leads, engineers and admins can add notes; your role can read them.</p>
            )}
          </SidePanel>
          <SidePanel title="Notes in this range">
            {(events.data?.notes ?? []).length === 0 ? (
              <p className="text-sm text-ink-faint">No notes in this range.</p>
            ) : (
              <ol className="max-h-96 space-y-2 overflow-y-auto" data-testid="line-notes">
                {(events.data?.notes ?? []).map((n, i) => (
                  <li key={n.id} className="grid grid-cols-[1.5rem_1fr] gap-2 text-sm">
                    <span className="num mt-0.5 inline-flex h-4 min-w-4 items-center justify-center rounded-sm bg-brand px-1 text-[10px] font-semibold text-white">
                      {i + 1}
                    </span>
                    <div>
                      <p className="text-ink" data-testid="line-note-text">
                        {n.text}
                      </p>
                      <p className="text-xs text-ink-faint">
                        <span className="num">{formatPlantTime(n.ts, tz, "d MMM HH:mm")}</span>
                        {n.pointId ? ` · ${line.points.find((p) => p.id === n.pointId)?.name ?? "point"}` : ""} · {n.personName}
                      </p>
                    </div>
                  </li>
                ))}
              </ol>
            )}
          </SidePanel>
        </aside>
      </div>
    </div>
  );
}

function sourceText(r: HistoryResult | undefined): string {
  if (!r) return "";
  const what = r.source === "raw" ? "raw readings" : r.source === "1m" ? "1-minute rollups" : "1-hour rollups";
  const bucket = r.bucketMs >= 3_600_000 ? `${r.bucketMs / 3_600_000} h` : r.bucketMs >= 60_000 ? `${r.bucketMs / 60_000} min` : `${r.bucketMs / 1000} s`;
  return `${what}, ${bucket} steps${r.source === "raw" ? "" : " with min–max band"}`;
}

function SidePanel({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="rounded-card border border-paper-line bg-paper-raised">
      <h2 className="border-b border-paper-line px-3 py-2 text-sm font-semibold text-ink">{title}</h2>
      <div className="p-3">{children}</div>
    </section>
  );
}

function RangeBar({
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

type PanelCommon = {
  xRange: [number, number];
  syncKey: string;
  timeZone: string;
  now: number;
  markers: VMarker[];
  spans: Span[];
  onZoom: (a: number, b: number) => void;
  onPick?: (ts: number) => void;
};

function NEUTRALIZER_STATE(state: string): { state: "normal" | "near" | "over" | "silent"; word: string } {
  if (state === "needs_cleaning") return { state: "near", word: "Needs cleaning" };
  if (state === "faulty") return { state: "over", word: "Faulty" };
  if (state === "removed") return { state: "silent", word: "Removed" };
  return { state: "normal", word: "In service" };
}

function EmptyOverlay({ text }: { text: string }) {
  return (
    <div className="pointer-events-none absolute inset-0 flex items-center justify-center">
      <span className="rounded bg-paper-raised/90 px-3 py-1 text-sm text-ink-faint" data-testid="chart-empty">
        {text}
      </span>
    </div>
  );
}

function emptyText(buckets: Bucket[], lastTs: number | null | undefined, now: number, tz: string, what: string): string | null {
  if (buckets.length > 0) return null;
  return lastTs ? `No readings from this ${what} since ${formatPlantSince(lastTs, now, tz)}` : `No readings from this ${what} in this range`;
}

function ChargePanel({
  view,
  buckets,
  result,
  isLive,
  timeLabels,
  ...c
}: PanelCommon & { view: PointView; buckets: Bucket[]; result: HistoryResult | undefined; isLive: boolean; timeLabels: "top" | "none" }) {
  const { prefs } = useUnits();
  const p: FloorPoint = view.point;
  const limit = p.limit?.limitKv ?? null;
  const unit = prefs.chargeUnit;
  const data = useMemo(() => {
    const cols = toColumns(buckets, gapThresholdMs(result?.bucketMs ?? 1000));
    const conv = (a: Array<number | null>) => a.map((v) => (v === null ? null : chargeInUnit(v, unit)));
    return [cols.xs, conv(cols.mean), conv(cols.min), conv(cols.max)];
  }, [buckets, result?.bucketMs, unit]);
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
  const n = NEUTRALIZER_STATE(p.neutralizer?.state ?? "in_service");
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
        syncKey={c.syncKey}
        height={timeLabels === "top" ? 140 : 118}
        timeZone={c.timeZone}
        xRange={c.xRange}
        data={data}
        series={[
          { label: "mean", color: "inkSoft", width: 1.5 },
          { label: "min", color: "inkFaint", faint: true },
          { label: "max", color: "inkFaint", faint: true },
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
        attrs={{ kind: "charge", "point-id": p.id, source: result?.source ?? "", band: band ? "on" : "off", points: buckets.length, notes: c.markers.length }}
      />
      {empty ? <EmptyOverlay text={empty} /> : null}
    </section>
  );
}

function readoutText(idx: number | null, d: ReadonlyArray<ArrayLike<number | null | undefined>>, tz: string, fmt: (v: number) => string, band: boolean): string {
  if (idx === null || idx === undefined) return "";
  const ts = d[0][idx];
  const mean = d[1]?.[idx];
  if (ts == null || mean == null) return "";
  const mn = d[2]?.[idx];
  const mx = d[3]?.[idx];
  const range = band && mn != null && mx != null && mx - mn > 1e-9 ? ` (min ${fmt(mn)}, max ${fmt(mx)})` : "";
  return `${formatPlantTime(ts, tz, "d MMM HH:mm:ss")} · ${fmt(mean)}${range}`;
}

function ClimatePanel({
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
  rh: { buckets: Bucket[]; result: HistoryResult | undefined };
  temp: { buckets: Bucket[]; result: HistoryResult | undefined };
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

function Legend({ swatch, text, dashed = false }: { swatch: string; text: string; dashed?: boolean }) {
  return (
    <span className="inline-flex items-center gap-1">
      <span className={clsx("inline-block h-0.5 w-3", dashed ? "border-t border-dashed border-brand bg-transparent" : swatch)} />
      {text}
    </span>
  );
}

function SpeedPanel({ data: d, nominal, ...c }: PanelCommon & { data: { buckets: Bucket[]; result: HistoryResult | undefined }; nominal: number }) {
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
