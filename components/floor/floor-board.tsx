"use client";
// The Floor: every hall and line on one screen, hall → line → point reading left to right in
// web-path order. Normal is grey; only points near or over their limit, silent sensors and
// shelved alerts get colour, always with their shape and word (StateBadge).
import { SparkMargin } from "./spark-margin";
import Link from "next/link";
import clsx from "clsx";
import type { FloorSnapshot } from "@/lib/views/floor";
import { Sparkline } from "@/components/charts/sparkline";
import { StateBadge } from "@/components/ui/state-badge";
import { UnitsProvider, UnitsToggle, useUnits } from "@/components/live/units";
import { formatChargeLimit, formatRh, formatSpeed, formatTemp, formatAbsoluteHumidity } from "@/lib/units";
import { formatPlantSince, formatPlantTime, shiftAt } from "@/lib/plant-time";
import { ChargeValue, PointStateMark, RunIndicator, StreamIndicator } from "./bits";
import { useFloorLive } from "./use-floor-live";
import { hallView, TREND_MS, type HallView, type LineView, type PointView } from "./view-model";

export function FloorBoard({ initial, notice }: { initial: FloorSnapshot; notice?: React.ReactNode }) {
  return (
    <UnitsProvider defaults={{ chargeUnit: initial.settings.chargeUnit, tempUnit: initial.settings.tempUnit }}>
      <FloorInner initial={initial} notice={notice} />
    </UnitsProvider>
  );
}

function FloorInner({ initial, notice }: { initial: FloorSnapshot; notice?: React.ReactNode }) {
  const { snapshot, store, stream, now } = useFloorLive(initial);
  const tz = snapshot.settings.timeZone;
  const shift = shiftAt(now, snapshot.settings);
  const halls = snapshot.areas.map((a) => hallView(a, store, now));

  return (
    <div>
      <div className="mb-4 flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-xl font-semibold tracking-tight text-ink">Floor</h1>
          <p className="mt-0.5 text-sm text-ink-soft">
            {snapshot.settings.name} · <span className="num">{formatPlantTime(now, tz, "EEE d MMM, HH:mm")}</span> · {shift.name} shift{" "}
            <span className="num text-ink-faint">
              ({formatPlantTime(shift.startTs, tz)}–{formatPlantTime(shift.endTs, tz)})
            </span>
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-4">
          <StreamIndicator status={stream.status} brokerConnected={stream.brokerConnected} />
          <UnitsToggle />
          <Link href="/wallboard" className="text-sm text-brand hover:underline">
            Wallboard
          </Link>
        </div>
      </div>
      {notice}
      {halls.length === 0 ? (
        <p className="rounded-card border border-dashed border-paper-line px-6 py-10 text-center text-ink-soft">No halls or lines are set up yet.</p>
      ) : (
        <div className="grid items-start gap-4 md:grid-cols-2 xl:grid-cols-3">
          {halls.map((h) => (
            <HallColumn key={h.area.id} hall={h} now={now} timeZone={tz} />
          ))}
        </div>
      )}
    </div>
  );
}

function HallColumn({ hall, now, timeZone }: { hall: HallView; now: number; timeZone: string }) {
  const { prefs } = useUnits();
  const a = hall.area;
  const silent = hall.rhState === "silent";
  return (
    <section className="space-y-3" data-testid="floor-hall" data-area-id={a.id} aria-label={a.name}>
      <div className="rounded-card border border-paper-line bg-paper-raised px-4 py-2.5">
        <div className="flex items-baseline justify-between gap-2">
          <h2 className="font-semibold text-ink">{a.name}</h2>
          <div className="flex items-center gap-2">
            {a.openAlerts > 0 ? <AlertCount n={a.openAlerts} /> : null}
            {hall.rhState !== "normal" ? <StateBadge state={hall.rhState} label={rhStateLabel(hall)} /> : null}
          </div>
        </div>
        {silent && hall.rhPct === null ? (
          <p className="mt-2 text-sm text-ink-faint">{noReadingsText(hall.ts, now, timeZone, "humidity logger")}</p>
        ) : (
          <div className="mt-2 grid grid-cols-[auto_1fr] items-center gap-x-4 gap-y-1">
            <dl className="grid grid-cols-[auto_auto] gap-x-3 gap-y-0.5 text-sm">
              <dt className="text-ink-faint">RH</dt>
              <dd className="num font-semibold text-ink" data-testid="hall-rh">
                {hall.rhPct !== null ? formatRh(hall.rhPct) : "–"}
              </dd>
              <dt className="text-ink-faint">Temp.</dt>
              <dd className="num text-ink-soft">{hall.tempC !== null ? formatTemp(hall.tempC, prefs.tempUnit) : "–"}</dd>
              <dt className="text-ink-faint">Dew point</dt>
              <dd className="num text-ink-soft">
                {hall.dewPointC !== null ? formatTemp(hall.dewPointC, prefs.tempUnit) : "–"}
                {hall.absHumidityGPerM3 !== null ? <span className="text-ink-faint"> · {formatAbsoluteHumidity(hall.absHumidityGPerM3)}</span> : null}
              </dd>
            </dl>
            <div className="min-w-0">
              <Sparkline
                samples={hall.rhTrend}
                fromTs={now - TREND_MS}
                toTs={now}
                lowLimit={a.rhLimit.limitPct}
                height={40}
                strokeClassName={hall.rhState === "over" ? "stroke-over" : hall.rhState === "near" ? "stroke-near" : "stroke-ink-faint"}
                label={`${a.name} relative humidity, last 15 minutes`}
              />
              <p className="mt-0.5 text-right text-[11px] text-ink-faint">
                limit {a.rhLimit.limitPct} % · aim {a.rhMinPct}–{a.rhMaxPct} %
              </p>
            </div>
          </div>
        )}
      </div>
      {hall.lines.map((l) => (
        <LineCard key={l.line.id} line={l} now={now} timeZone={timeZone} />
      ))}
    </section>
  );
}

function rhStateLabel(h: HallView): string | undefined {
  if (h.rhState === "over") return "RH low";
  if (h.rhState === "near") return "RH near limit";
  return undefined;
}

function AlertCount({ n }: { n: number }) {
  return (
    <Link href="/alerts" className="num rounded bg-over-soft px-1.5 py-0.5 text-xs font-medium text-over hover:underline" data-testid="open-alerts">
      {n} open alert{n === 1 ? "" : "s"}
    </Link>
  );
}

function noReadingsText(ts: number | null, now: number, tz: string, what: string): string {
  return ts ? `No readings from this ${what} since ${formatPlantSince(ts, now, tz)}` : `No readings from this ${what} yet`;
}

function LineCard({ line, now, timeZone }: { line: LineView; now: number; timeZone: string }) {
  const l = line.line;
  return (
    <article className="rounded-card border border-paper-line bg-paper-raised" data-testid="floor-line" data-line-id={l.id}>
      <header className="flex flex-wrap items-center justify-between gap-x-3 gap-y-1 border-b border-paper-line px-4 py-2">
        <div className="flex min-w-0 items-center gap-2">
          <Link href={`/lines/${l.id}`} className="truncate font-medium text-ink hover:text-brand hover:underline">
            {l.name}
          </Link>
          {line.worst === "over" || line.worst === "near" ? <StateBadge state={line.worst} /> : null}
        </div>
        <div className="flex items-center gap-3 text-xs">
          {l.openAlerts > 0 ? <AlertCount n={l.openAlerts} /> : null}
          <RunIndicator run={line.run} speedText={line.speedMpm !== null ? formatSpeed(line.speedMpm) : null} />
        </div>
      </header>
      {l.points.length === 0 ? (
        <p className="px-4 py-3 text-sm text-ink-faint">No measuring points on this line yet.</p>
      ) : (
        <ol className="divide-y divide-paper-line/70">
          {line.points.map((p) => (
            <PointRow key={p.point.id} view={p} now={now} timeZone={timeZone} />
          ))}
        </ol>
      )}
      {l.solventName ? (
        <SparkMargin
          className="border-t border-paper-line px-4 py-1.5"
          solventName={l.solventName}
          solventMieMj={l.solventMieMj}
          conductorCapacitancePf={l.conductorCapacitancePf}
          worstChargeKv={line.points.reduce<number | null>((w, p) => (p.value !== null && (w === null || Math.abs(p.value) > Math.abs(w)) ? p.value : w), null)}
        />
      ) : null}
    </article>
  );
}

function PointRow({ view, now, timeZone }: { view: PointView; now: number; timeZone: string }) {
  const { prefs } = useUnits();
  const p = view.point;
  const limit = p.limit?.limitKv ?? null;
  const attention = view.state === "over" || view.state === "near";
  return (
    <li
      className={clsx(
        "grid grid-cols-[1rem_minmax(0,8.5rem)_minmax(3rem,1fr)_5.25rem_4.5rem] items-center gap-2 px-4 py-1",
        view.state === "over" && "bg-over-soft/60",
        view.state === "near" && "bg-near-soft/50",
      )}
      data-testid="floor-point"
      data-point-id={p.id}
      data-state={view.state}
      title={
        view.state === "silent"
          ? noReadingsText(view.ts, now, timeZone, "sensor")
          : `${p.name}: limit ${limit !== null ? formatChargeLimit(limit, prefs.chargeUnit) : "none"}${p.neutralizer ? ` · ${p.neutralizer.tag}` : ""}`
      }
    >
      <span className="num text-xs text-ink-ghost">{p.position}</span>
      <span className={clsx("truncate text-sm", attention ? "font-medium text-ink" : "text-ink-soft")}>{p.name}</span>
      <Sparkline
        samples={view.trend}
        fromTs={now - TREND_MS}
        toTs={now}
        symmetricLimit={limit}
        strokeClassName={view.state === "over" ? "stroke-over" : view.state === "near" ? "stroke-near" : "stroke-ink-faint"}
        label={`${p.name} charge, last 15 minutes`}
      />
      <span className="text-right text-sm" data-testid="point-value" data-value={view.value ?? ""} data-ts={view.ts ?? ""}>
        {view.state === "silent" ? <span className="text-xs text-ink-faint">no data</span> : <ChargeValue valueKv={view.value} unit={prefs.chargeUnit} showUnit />}
      </span>
      <span className="text-right">
        <PointStateMark state={view.state} />
      </span>
    </li>
  );
}
