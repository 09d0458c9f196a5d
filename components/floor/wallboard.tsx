"use client";
// The wallboard: one hall's lines on a dark, full screen, in figures readable from a few metres,
// for a screen on the floor that stays open for days. Same state codes as everywhere (shape +
// word), the same live data path as the Floor; memory stays flat (fixed ring buffers, SVG trends
// re-rendered in place, one stream that renews itself). The session is kept alive by asking
// next-auth for it every 20 minutes, which re-issues the cookie.
import { useEffect, useMemo, useState } from "react";
import clsx from "clsx";
import type { FloorSnapshot } from "@/lib/views/floor";
import { Sparkline } from "@/components/charts/sparkline";
import { lighten, tokenColors } from "@/components/charts/token-colors";
import { StateShape } from "@/components/ui/state-badge";
import { STATE_WORDS } from "@/lib/vocabulary";
import { LogoMark } from "@/components/ui/logo";
import { chargePolarity, formatAbsoluteHumidity, formatCharge, formatChargeLimit, formatRh, formatSpeed, formatTemp } from "@/lib/units";
import { formatPlantSince, formatPlantTime, shiftAt } from "@/lib/plant-time";
import type { PointState } from "@/lib/vocabulary";
import { RunIndicator, StreamIndicator } from "./bits";
import { useFloorLive } from "./use-floor-live";
import { SparkMargin } from "./spark-margin";
import { hallView, TREND_MS, type LineView, type PointView } from "./view-model";

const KEEPALIVE_MS = 20 * 60_000;

const wallTone: Record<PointState, string> = {
  normal: "text-night-soft!",
  near: "text-near-bright!",
  over: "text-over-bright!",
  silent: "text-night-soft!",
  shelved: "text-shelved-soft!",
};

const wordTone: Record<PointState, string> = {
  normal: "text-night-soft",
  near: "text-near-bright",
  over: "text-over-bright",
  silent: "text-night-soft",
  shelved: "text-shelved-soft",
};

function WallState({ state, size = "md" }: { state: PointState; size?: "md" | "lg" }) {
  return (
    <span className={clsx("inline-flex items-center gap-2 font-semibold", wordTone[state], size === "lg" ? "text-2xl" : "text-lg")} data-state={state}>
      <StateShape state={state} className={clsx(size === "lg" ? "h-6 w-6" : "h-4 w-4", wallTone[state])} />
      {STATE_WORDS[state]}
    </span>
  );
}

/** Bright polarity hues derived from the pos/neg tokens (readable on the dark background). */
function usePolarityColors(): { pos: string; neg: string } | null {
  const [c, setC] = useState<{ pos: string; neg: string } | null>(null);
  useEffect(() => {
    const t = tokenColors();
    // eslint-disable-next-line react-hooks/set-state-in-effect -- CSS tokens exist only in the browser; reading them after mount keeps the first render equal to the server HTML
    setC({ pos: lighten(t.pos, 0.45), neg: lighten(t.neg, 0.45) });
  }, []);
  return c;
}

export function Wallboard({ initial, areaId }: { initial: FloorSnapshot; areaId: number }) {
  const { snapshot, store, stream, now } = useFloorLive(initial, { areaId, refetchMs: 60_000 });
  const polarity = usePolarityColors();
  const [signedOut, setSignedOut] = useState(false);

  useEffect(() => {
    const keepAlive = async () => {
      try {
        const res = await fetch("/api/auth/session", { cache: "no-store" });
        const body: unknown = await res.json();
        setSignedOut(!body || typeof body !== "object" || !("user" in body));
      } catch {
        /* offline for a moment: the stream shows it */
      }
    };
    const t = setInterval(keepAlive, KEEPALIVE_MS);
    return () => clearInterval(t);
  }, []);

  const area = snapshot.areas[0];
  const tz = snapshot.settings.timeZone;
  const hall = useMemo(() => (area ? hallView(area, store, now) : null), [area, store, now]);
  if (!area || !hall) return <p className="p-10 text-2xl text-night-soft">This hall no longer exists.</p>;
  const shift = shiftAt(now, snapshot.settings);
  const unit = snapshot.settings.chargeUnit;
  const tempUnit = snapshot.settings.tempUnit;

  return (
    <div className="flex min-h-screen flex-col gap-[1.2vh] p-[1.4vw]" data-testid="wallboard" data-area-id={area.id}>
      <header className="flex flex-wrap items-end justify-between gap-x-8 gap-y-2 border-b border-night-line pb-[1vh]">
        <div>
          <div className="flex items-center gap-2 text-night-soft">
            <LogoMark className="h-5 w-5" />
            <span className="text-sm tracking-wide">{snapshot.settings.name}</span>
          </div>
          <h1 className="text-[clamp(1.8rem,2.6vw,3rem)] font-semibold leading-tight">{area.name}</h1>
        </div>
        <div className="flex items-end gap-[2vw]" data-testid="wall-climate">
          <div>
            <div className="text-sm uppercase tracking-wider text-night-soft">Relative humidity</div>
            <div className="flex items-baseline gap-3">
              <span className={clsx("num text-[clamp(2.4rem,4vw,4.5rem)] font-semibold leading-none", hall.rhState === "over" ? "text-over-bright" : hall.rhState === "near" ? "text-near-bright" : "text-night-ink")}>
                {hall.rhPct !== null ? formatRh(hall.rhPct) : "–"}
              </span>
              <WallState state={hall.rhState} />
            </div>
          </div>
          <div className="num pb-1 text-[clamp(1rem,1.4vw,1.6rem)] leading-snug text-night-soft">
            <div>
              <span className="text-night-ink">{hall.tempC !== null ? formatTemp(hall.tempC, tempUnit) : "–"}</span>
            </div>
            <div>dew point {hall.dewPointC !== null ? formatTemp(hall.dewPointC, tempUnit) : "–"}</div>
            <div className="text-sm">{hall.absHumidityGPerM3 !== null ? formatAbsoluteHumidity(hall.absHumidityGPerM3) : ""} · limit {area.rhLimit.limitPct} %</div>
          </div>
          <div className="hidden w-[14vw] min-w-32 pb-1 lg:block">
            <Sparkline samples={hall.rhTrend} fromTs={now - TREND_MS} toTs={now} lowLimit={area.rhLimit.limitPct} height={56} strokeClassName="stroke-night-ink" label="Humidity, last 15 minutes" dark />
          </div>
        </div>
        <div className="text-right">
          <div className="num text-[clamp(2rem,3.4vw,4rem)] font-semibold leading-none" data-testid="wall-clock">
            {formatPlantTime(now, tz, "HH:mm")}
          </div>
          <div className="mt-1 text-night-soft">
            {shift.name} shift · {formatPlantTime(now, tz, "EEE d MMM")}
          </div>
          <div className="mt-1">
            <StreamIndicator status={stream.status} brokerConnected={stream.brokerConnected} dark />
          </div>
        </div>
      </header>

      {signedOut ? (
        <p role="alert" className="rounded bg-over-soft px-4 py-2 text-lg text-over">
          This screen&apos;s session has ended. Sign in again as the kiosk viewer to resume.
        </p>
      ) : null}

      <main className="flex flex-1 flex-col gap-[1.2vh]">
        {hall.lines.length === 0 ? <p className="text-2xl text-night-soft">No lines in this hall.</p> : null}
        {hall.lines.map((l) => (
          <WallLine key={l.line.id} line={l} now={now} timeZone={tz} unit={unit} polarity={polarity} />
        ))}
      </main>
      <footer className="flex justify-between text-xs text-night-soft">
        <span>Charge: signed, {unit}, at each sensor&apos;s calibrated distance · trends: last 15 minutes · states: ○ OK ▲ Near ◆ Over ◌ Silent ‖ Shelved</span>
        <span>Stillfield is a monitoring aid, not a safety system.</span>
      </footer>
    </div>
  );
}

function WallLine({
  line,
  now,
  timeZone,
  unit,
  polarity,
}: {
  line: LineView;
  now: number;
  timeZone: string;
  unit: "kV" | "V";
  polarity: { pos: string; neg: string } | null;
}) {
  const l = line.line;
  return (
    <section className="flex flex-1 flex-col rounded-card border border-night-line bg-night-raised/60 p-[0.8vw]" data-testid="wall-line" data-line-id={l.id}>
      <header className="mb-[0.8vh] flex flex-wrap items-baseline justify-between gap-3">
        <h2 className="text-[clamp(1.3rem,1.9vw,2.2rem)] font-semibold leading-tight">{l.name}</h2>
        <div className="flex items-center gap-5 text-[clamp(0.95rem,1.2vw,1.4rem)]">
          {l.openAlerts > 0 ? (
            <span className="num font-semibold text-over-bright">
              {l.openAlerts} open alert{l.openAlerts === 1 ? "" : "s"}
            </span>
          ) : null}
          <RunIndicator run={line.run} speedText={line.speedMpm !== null ? formatSpeed(line.speedMpm) : null} dark />
        </div>
      </header>
      {/* two columns on a phone, one column per point on a wall screen: a 4-point line's big values would not fit a phone's quarter width */}
      <div className="grid flex-1 grid-cols-2 gap-[0.8vw] lg:grid-cols-[var(--wall-cols)]" style={{ "--wall-cols": `repeat(${Math.max(2, line.points.length)}, minmax(0, 1fr))` } as React.CSSProperties}>
        {line.points.map((p) => (
          <WallPoint key={p.point.id} view={p} now={now} timeZone={timeZone} unit={unit} polarity={polarity} />
        ))}
      </div>
      {l.solventName ? (
        <SparkMargin
          variant="wall"
          className="mt-[0.6vh]"
          solventName={l.solventName}
          solventMieMj={l.solventMieMj}
          conductorCapacitancePf={l.conductorCapacitancePf}
          worstChargeKv={line.points.reduce<number | null>((w, p) => (p.value !== null && (w === null || Math.abs(p.value) > Math.abs(w)) ? p.value : w), null)}
        />
      ) : null}
    </section>
  );
}

function WallPoint({ view, now, timeZone, unit, polarity }: { view: PointView; now: number; timeZone: string; unit: "kV" | "V"; polarity: { pos: string; neg: string } | null }) {
  const p = view.point;
  const limit = p.limit?.limitKv ?? null;
  const pol = view.value !== null ? chargePolarity(view.value, unit) : "zero";
  const color = view.state === "over" || view.state === "near" || !polarity || pol === "zero" ? undefined : polarity[pol];
  return (
    <div
      className={clsx(
        "flex min-w-0 flex-col justify-between rounded-card border px-[0.9vw] py-[0.8vh]",
        view.state === "over" ? "border-over-bright bg-over/25" : view.state === "near" ? "border-near-bright/80 bg-near/15" : "border-night-line bg-night",
      )}
      data-testid="wall-point"
      data-point-id={p.id}
      data-state={view.state}
    >
      <div className="flex items-start justify-between gap-2">
        <span className="truncate text-[clamp(0.95rem,1.15vw,1.35rem)] text-night-soft">
          <span className="num mr-1.5 text-night-soft/70">{p.position}</span>
          <span className="text-night-ink">{p.name}</span>
        </span>
        <WallState state={view.state} />
      </div>
      {view.state === "silent" ? (
        <div className="py-2 text-[clamp(1rem,1.3vw,1.5rem)] text-night-soft">
          {view.ts ? `No readings since ${formatPlantSince(view.ts, now, timeZone)}` : "No readings yet"}
        </div>
      ) : (
        <div
          className={clsx(
            "num font-semibold leading-none tracking-tight",
            "text-[clamp(2.6rem,4.6vw,5.5rem)]",
            view.state === "over" ? "text-over-bright" : view.state === "near" ? "text-near-bright" : "text-night-ink",
          )}
          style={color ? { color } : undefined}
          data-testid="wall-value"
        >
          {view.value !== null ? formatCharge(view.value, unit) : "–"}
          <span className="ml-2 text-[0.4em] font-normal text-night-soft">{unit}</span>
        </div>
      )}
      <div className="mt-1">
        <Sparkline
          samples={view.trend}
          fromTs={now - TREND_MS}
          toTs={now}
          symmetricLimit={limit}
          height={40}
          strokeClassName={view.state === "over" ? "stroke-over-bright" : view.state === "near" ? "stroke-near-bright" : "stroke-night-soft"}
          label={`${p.name}, last 15 minutes`}
          dark
        />
        <div className="mt-0.5 text-xs text-night-soft">limit {limit !== null ? formatChargeLimit(limit, unit) : "none"}</div>
      </div>
    </div>
  );
}
