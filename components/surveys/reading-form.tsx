"use client";
// Entry of one spot's reading on the phone: sign and magnitude (phones' number pads often have no
// minus key), unit, distance, running or stopped with the speed, an optional photo from the
// camera and a note. Judged as it is typed: refused beyond the air-breakdown ceiling or at a
// distance ≤ 0, warned off the calibrated distance with the flat-surface equivalent.
import { useMemo, useState } from "react";
import clsx from "clsx";
import { checkReading, EQUIVALENCE_FORMULA, EQUIVALENCE_LIMITS, type MeterUnit } from "@/lib/surveys/judge";
import type { StoredReading } from "./round-store";

const base = "block rounded border border-paper-line bg-white px-3 py-2 text-base outline-none focus:border-brand focus:ring-2 focus:ring-brand-soft";
const input = `${base} w-full`;

export function ReadingForm({
  spotKey,
  calibratedMm,
  previous,
  onSave,
}: {
  spotKey: string;
  calibratedMm: number;
  previous: StoredReading | null;
  onSave: (r: Omit<StoredReading, "sent">, photo: File | null) => Promise<void>;
}) {
  const [sign, setSign] = useState<1 | -1>(previous && previous.value > 0 ? 1 : -1);
  const [magnitude, setMagnitude] = useState(previous ? String(Math.abs(previous.value)) : "");
  const [unit, setUnit] = useState<MeterUnit>(previous?.unit ?? "kV");
  const [distance, setDistance] = useState(String(previous?.distanceMm ?? calibratedMm));
  const [running, setRunning] = useState(previous?.running ?? true);
  const [speed, setSpeed] = useState(previous?.speedMpm != null ? String(previous.speedMpm) : "");
  const [note, setNote] = useState(previous?.note ?? "");
  const [photo, setPhoto] = useState<File | null>(null);
  const [photoError, setPhotoError] = useState<string | null>(null);
  const [tried, setTried] = useState(false);
  const [saving, setSaving] = useState(false);

  const parsed = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".").replace("−", "-")));
  const value = sign * parsed(magnitude);
  const distanceMm = parsed(distance);
  const check = useMemo(() => checkReading({ value, unit, distanceMm, calibratedMm }), [value, unit, distanceMm, calibratedMm]);
  const speedValue = speed.trim() === "" ? null : parsed(speed);
  const speedBad = speedValue !== null && (!Number.isFinite(speedValue) || speedValue < 0 || speedValue > 5000);

  const save = async () => {
    setTried(true);
    if (!check.ok || speedBad || photoError) return;
    setSaving(true);
    try {
      await onSave({ spotKey, ts: Date.now(), value, unit, distanceMm, running, speedMpm: running ? speedValue : 0, note: note.trim() || null }, photo);
    } finally {
      setSaving(false);
    }
  };

  const err = (field: "value" | "distanceMm") => (tried || (field === "value" ? magnitude : distance) !== "") && !check.ok && check.field === field ? check.reason : null;

  return (
    <div className="space-y-3" data-testid="reading-form">
      <div>
        <span className="text-xs font-medium text-ink-soft">Reading</span>
        <div className="mt-1 flex gap-2">
          <div className="flex shrink-0 overflow-hidden rounded border border-paper-line" role="group" aria-label="Polarity">
            {([1, -1] as const).map((s) => (
              <button key={s} type="button" aria-pressed={sign === s} onClick={() => setSign(s)} className={clsx("w-11 py-2 text-lg font-semibold", sign === s ? (s > 0 ? "bg-pos text-white" : "bg-neg text-white") : "bg-white text-ink-soft")}>
                {s > 0 ? "+" : "−"}
              </button>
            ))}
          </div>
          <input aria-label="Reading magnitude" inputMode="decimal" className={clsx(base, "num w-0 min-w-0 flex-1")} value={magnitude} onChange={(e) => setMagnitude(e.target.value)} placeholder="e.g. 12.5" />
          <select aria-label="Unit" className={clsx(base, "w-20 shrink-0 px-2")} value={unit} onChange={(e) => setUnit(e.target.value === "V" ? "V" : "kV")}>
            <option value="kV">kV</option>
            <option value="V">V</option>
          </select>
        </div>
        {err("value") ? <p className="mt-1 text-sm text-over" role="alert" data-testid="reading-refused">{err("value")}</p> : null}
      </div>
      <label className="block">
        <span className="text-xs font-medium text-ink-soft">Distance from the meter to the web, mm</span>
        <input aria-label="Distance mm" inputMode="decimal" className={clsx(input, "num mt-1")} value={distance} onChange={(e) => setDistance(e.target.value)} />
        {err("distanceMm") ? <p className="mt-1 text-sm text-over" role="alert" data-testid="distance-refused">{err("distanceMm")}</p> : null}
      </label>
      {check.ok && check.warnings.length ? (
        <div className="rounded border border-near/40 bg-near-soft/60 px-3 py-2 text-sm text-ink" data-testid="distance-warning">
          <p className="font-medium text-near">▲ Not at the calibrated distance</p>
          <p className="mt-0.5">{check.warnings[0]}</p>
          <details className="mt-1 text-xs text-ink-soft">
            <summary>Formula and its limits</summary>
            <p className="mt-1">{EQUIVALENCE_FORMULA}. {EQUIVALENCE_LIMITS}</p>
          </details>
        </div>
      ) : null}
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex overflow-hidden rounded border border-paper-line" role="group" aria-label="Line">
          {[true, false].map((r) => (
            <button key={String(r)} type="button" aria-pressed={running === r} onClick={() => setRunning(r)} className={clsx("px-3 py-2 text-sm", running === r ? "bg-brand text-white" : "bg-white text-ink-soft")}>
              {r ? "Running" : "Stopped"}
            </button>
          ))}
        </div>
        {running ? (
          <label className="block min-w-0 flex-1">
            <span className="text-xs font-medium text-ink-soft">Speed, m/min</span>
            <input aria-label="Speed m/min" inputMode="decimal" className={clsx(input, "num mt-1")} value={speed} onChange={(e) => setSpeed(e.target.value)} />
          </label>
        ) : null}
      </div>
      {speedBad ? <p className="text-sm text-over">Speed in m/min, 0–5000.</p> : null}
      <label className="block">
        <span className="text-xs font-medium text-ink-soft">Photo (optional)</span>
        <input
          aria-label="Photo"
          type="file"
          accept="image/jpeg,image/png,image/webp"
          capture="environment"
          className="mt-1 block w-full text-sm"
          onChange={(e) => {
            const f = e.target.files?.[0] ?? null;
            setPhotoError(f && !/^image\/(jpeg|png|webp)$/.test(f.type) ? "Only a photo (JPEG, PNG or WebP) can be attached." : null);
            setPhoto(f);
          }}
        />
        {photoError ? <p className="mt-1 text-sm text-over" role="alert">{photoError}</p> : null}
      </label>
      <label className="block">
        <span className="text-xs font-medium text-ink-soft">Note</span>
        <input aria-label="Note" className={clsx(input, "mt-1")} value={note} maxLength={500} onChange={(e) => setNote(e.target.value)} placeholder="e.g. bar fouled with ink mist" />
      </label>
      <button type="button" onClick={save} disabled={saving} className="w-full rounded bg-brand px-4 py-3 text-base font-medium text-white hover:bg-brand-deep disabled:opacity-50">
        {previous ? "Save the new reading" : "Save reading"}
      </button>
    </div>
  );
}
