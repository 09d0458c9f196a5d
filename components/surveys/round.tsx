"use client";
// The round on a phone: the plan's spots in web-path order, one reading each, judged as entered
// and kept on the phone (IndexedDB) until the server has them. The page says plainly what is
// waiting to be sent; the round goes out, once, when the network is there.
import { useEffect, useState } from "react";
import Link from "next/link";
import clsx from "clsx";
import { fmtKv, judgeSpot } from "@/lib/surveys/round-view";
import { toKv } from "@/lib/surveys/judge";
import type { RoundPlan, RoundSpot } from "@/lib/surveys/types";
import { StateBadge } from "@/components/ui/state-badge";
import { ReadingForm } from "./reading-form";
import type { StoredReading, StoredRound } from "./round-store";
import { useRound, type RoundSetup } from "./use-round";

const input = "block w-full rounded border border-paper-line bg-white px-3 py-2 text-base outline-none focus:border-brand";

export function Round({ plan, resurveyOfActionId, defaultMeter }: { plan: RoundPlan; resurveyOfActionId: number | null; defaultMeter: RoundSetup }) {
  const r = useRound(plan, resurveyOfActionId);
  const [open, setOpen] = useState<string | null>(null);
  const [note, setNote] = useState("");

  if (r.storageError) return <p className="rounded bg-over-soft p-3 text-over">This browser cannot keep readings on the phone ({r.storageError}). Use another browser or leave private mode.</p>;
  if (!r.loaded) return <p className="text-ink-faint">Opening the round…</p>;

  const round = r.round;
  const waiting = r.pending.readings;
  const status = !r.online ? `Offline · ${waiting} ${waiting === 1 ? "reading" : "readings"} waiting to be sent` : waiting ? `${waiting} ${waiting === 1 ? "reading" : "readings"} waiting to be sent` : "All readings sent";
  const nextKey = round ? plan.spots.find((s) => !round.readings[s.key])?.key ?? null : null;
  const openKey = open ?? nextKey;

  return (
    <div className="space-y-3">
      <div className={clsx("rounded-card border px-3 py-2 text-sm", !r.online || waiting ? "border-near/40 bg-near-soft/60" : "border-paper-line bg-paper-raised")} role="status" aria-live="polite">
        <p className="font-medium" data-testid="queue-status">
          {status}
        </p>
        {r.pending.photos ? <p className="text-ink-soft" data-testid="photo-queue">{r.pending.photos} {r.pending.photos === 1 ? "photo" : "photos"} waiting to be sent</p> : null}
        {r.refused ? <p className="mt-1 text-over" role="alert">The server refused this round: {r.refused}</p> : null}
        {!r.online ? <p className="text-ink-soft">Readings are kept on this phone and sent when the network is back.</p> : null}
      </div>

      {!round ? (
        <StartForm defaultMeter={defaultMeter} onStart={r.start} />
      ) : round.finishedTs !== null ? (
        <Finished round={round} onAnother={() => location.reload()} />
      ) : (
        <>
          <p className="text-xs text-ink-faint">
            Meter {round.meterLabel} · reads at {round.calibratedDistanceMm} mm · started {new Date(round.startedTs).toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" })}
          </p>
          <ol className="space-y-2" aria-label="Spots in web-path order">
            {plan.spots.map((spot, i) => (
              <SpotCard
                key={spot.key}
                spot={spot}
                reading={round.readings[spot.key] ?? null}
                previous={i > 0 ? (round.readings[plan.spots[i - 1].key] ?? null) : null}
                calibratedMm={round.calibratedDistanceMm}
                open={openKey === spot.key}
                online={r.online}
                onToggle={() => setOpen(openKey === spot.key ? "__none" : spot.key)}
                onSave={async (reading, photo) => {
                  await r.saveReading(reading, photo);
                  setOpen(null);
                }}
              />
            ))}
          </ol>
          <div className="rounded-card border border-paper-line bg-paper-raised p-3">
            <label className="block">
              <span className="text-xs font-medium text-ink-soft">Note on the round (optional)</span>
              <input className={clsx(input, "mt-1")} value={note} maxLength={1000} onChange={(e) => setNote(e.target.value)} aria-label="Round note" />
            </label>
            <button type="button" onClick={() => r.finish(note.trim() || null)} className="mt-3 w-full rounded border border-brand bg-paper-raised px-4 py-3 text-base font-medium text-brand hover:bg-brand-soft">
              Finish round ({Object.keys(round.readings).length} of {plan.spots.length} spots)
            </button>
          </div>
        </>
      )}
    </div>
  );
}

function StartForm({ defaultMeter, onStart }: { defaultMeter: RoundSetup; onStart: (s: RoundSetup) => Promise<void> }) {
  const [label, setLabel] = useState(defaultMeter.meterLabel);
  const [calOn, setCalOn] = useState(defaultMeter.meterCalibratedOn ?? "");
  const [dist, setDist] = useState(String(defaultMeter.calibratedDistanceMm));
  const d = Number(dist.replace(",", "."));
  const bad = !label.trim() ? "Name the meter you use." : !(d > 0 && d <= 500) ? "The meter's calibrated distance in mm, above 0 (usually 25)." : null;
  return (
    <div className="space-y-3 rounded-card border border-paper-line bg-paper-raised p-3">
      <label className="block">
        <span className="text-xs font-medium text-ink-soft">Handheld meter</span>
        <input className={clsx(input, "mt-1")} value={label} maxLength={120} onChange={(e) => setLabel(e.target.value)} aria-label="Meter" />
      </label>
      <div className="flex gap-3">
        <label className="block min-w-0 flex-1">
          <span className="text-xs font-medium text-ink-soft">Calibrated on</span>
          <input type="date" className={clsx(input, "mt-1")} value={calOn} onChange={(e) => setCalOn(e.target.value)} aria-label="Calibrated on" />
        </label>
        <label className="block w-28">
          <span className="text-xs font-medium text-ink-soft">Reads at, mm</span>
          <input inputMode="decimal" className={clsx(input, "num mt-1")} value={dist} onChange={(e) => setDist(e.target.value)} aria-label="Calibrated distance mm" />
        </label>
      </div>
      {bad ? <p className="text-sm text-over">{bad}</p> : null}
      <button type="button" disabled={!!bad} onClick={() => onStart({ meterLabel: label.trim(), meterCalibratedOn: /^\d{4}-\d{2}-\d{2}$/.test(calOn) ? calOn : null, calibratedDistanceMm: d })} className="w-full rounded bg-brand px-4 py-3 text-base font-medium text-white disabled:opacity-50">
        Start the round
      </button>
    </div>
  );
}

function SpotCard(props: {
  spot: RoundSpot;
  reading: StoredReading | null;
  previous: StoredReading | null;
  calibratedMm: number;
  open: boolean;
  online: boolean;
  onToggle: () => void;
  onSave: (r: Omit<StoredReading, "sent">, photo: File | null) => Promise<void>;
}) {
  const { spot, reading, previous, calibratedMm } = props;
  const prevKv = previous ? (toKv(previous.value, previous.unit) * previous.distanceMm) / calibratedMm : null;
  const j = reading ? judgeSpot({ readKv: toKv(reading.value, reading.unit), distanceMm: reading.distanceMm, calibratedMm, limitKv: spot.limitKv, last: spot.last, afterNeutralizer: spot.afterNeutralizer, previousKv: prevKv }) : null;
  return (
    <li className={clsx("rounded-card border bg-paper-raised", props.open ? "border-brand" : "border-paper-line")} data-testid="spot" data-spot={spot.key}>
      {spot.afterNeutralizer ? <p className="border-b border-dashed border-paper-line px-3 py-1 text-xs text-ink-soft">▮ after {spot.afterNeutralizer}</p> : null}
      <button type="button" onClick={props.onToggle} className="flex w-full items-center gap-2 px-3 py-2.5 text-left" aria-expanded={props.open}>
        <span className="num w-6 shrink-0 text-sm text-ink-faint">{spot.position}</span>
        <span className="min-w-0 flex-1">
          <span className="block truncate font-medium text-ink">{spot.name}</span>
          <span className="block text-xs text-ink-faint">
            {spot.limitKv !== null ? `limit ${spot.limitKv} kV` : "no limit set"}
            {spot.last ? ` · last ${fmtKv(spot.last.equivalentKv)}` : ""}
            {spot.fixedMeter ? ` · fixed meter ${spot.fixedMeter.code}` : ""}
          </span>
        </span>
        {j ? (
          <span className="shrink-0 text-right">
            <span className={clsx("num block font-semibold", j.equivalentKv >= 0 ? "text-pos" : "text-neg")}>{fmtKv(j.equivalentKv)}</span>
            <StateBadge state={j.state} />
          </span>
        ) : (
          <span className="shrink-0 text-xs text-ink-faint">to do</span>
        )}
      </button>
      {j && reading ? (
        <div className="space-y-0.5 border-t border-paper-line px-3 py-2 text-xs text-ink-soft" data-testid="spot-judgement">
          {j.reductionPct !== null ? <p className={j.reductionPct < 50 ? "font-medium text-over" : ""}>Reduction across {spot.afterNeutralizer}: {Math.round(j.reductionPct)} %</p> : null}
          {j.vsLast ? <p>{j.vsLast}</p> : null}
          {spot.fixedMeter ? <FixedValue deviceId={spot.fixedMeter.deviceId} code={spot.fixedMeter.code} ts={reading.ts} online={props.online} /> : null}
          <p>{reading.sent ? "Sent" : "Waiting to be sent"}</p>
        </div>
      ) : null}
      {props.open ? (
        <div className="border-t border-paper-line px-3 py-3">
          <ReadingForm key={reading?.ts ?? "new"} spotKey={spot.key} calibratedMm={calibratedMm} previous={reading} onSave={props.onSave} />
        </div>
      ) : null}
    </li>
  );
}

function FixedValue({ deviceId, code, ts, online }: { deviceId: number; code: string; ts: number; online: boolean }) {
  const [v, setV] = useState<{ meanKv: number | null } | null>(null);
  useEffect(() => {
    if (!online) return;
    let stop = false;
    fetch(`/api/surveys/fixed?deviceId=${deviceId}&ts=${ts}`)
      .then((res) => (res.ok ? res.json() : null))
      .then((d: { meanKv: number | null } | null) => {
        if (!stop && d) setV(d);
      })
      .catch(() => undefined);
    return () => {
      stop = true;
    };
  }, [deviceId, ts, online]);
  if (!v) return <p>Fixed meter {code}: {online ? "looking up…" : "looked up when the network is back"}</p>;
  return <p>Fixed meter {code} at the same moment: {v.meanKv === null ? "no readings" : fmtKv(v.meanKv)}</p>;
}

function Finished({ round, onAnother }: { round: StoredRound; onAnother: () => void }) {
  return (
    <div className="space-y-2 rounded-card border border-paper-line bg-paper-raised p-3" data-testid="round-finished">
      <p className="font-medium">Round finished with {Object.keys(round.readings).length} readings.</p>
      {round.finishedSent && round.surveyId ? (
        <Link href={`/surveys/${round.surveyId}`} className="block rounded bg-brand px-4 py-3 text-center font-medium text-white">
          Open the survey report
        </Link>
      ) : (
        <p className="text-ink-soft">It will be sent when the network is back; keep this page open or come back to it.</p>
      )}
      <button type="button" onClick={onAnother} className="w-full rounded border border-paper-line px-4 py-2 text-sm">
        Start another round
      </button>
    </div>
  );
}
