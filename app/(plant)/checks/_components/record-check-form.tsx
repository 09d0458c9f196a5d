"use client";
// The technician's check form: readings of a charged-plate test (or a periodic check), judged
// on the server against the limits of the neutralizer's kind; photos and printouts are attached
// to the new check afterwards through /api/uploads (they can be larger than a form post).
import { useRef, useState } from "react";
import { useRouter } from "next/navigation";
import { inputClass } from "@/components/forms/action-form";
import { StateBadge } from "@/components/ui/state-badge";
import { MinRoleSelect, postUpload } from "../../equipment/_components/upload-form";
import { recordCheck } from "../actions";
import { CHECK_STANDARD_EDITIONS, STANDARD_PLATE } from "@/lib/physics/neutralizer";

type Option = { id: number; tag: string; group: string };
type Result = Awaited<ReturnType<typeof recordCheck>>;

function Label({ text, name, errors, children, hint }: { text: string; name: string; errors?: Record<string, string[]>; children: React.ReactNode; hint?: string }) {
  const e = errors?.[name]?.[0];
  return (
    <label className="block">
      <span className="text-xs font-medium text-ink-soft">{text}</span>
      <span className="mt-1 block">{children}</span>
      {hint ? <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span> : null}
      {e ? <span className="mt-0.5 block text-xs text-over">{e}</span> : null}
    </label>
  );
}

export function RecordCheckForm({ options, preselect, nowLocal }: { options: Option[]; preselect: number | null; nowLocal: string }) {
  const router = useRouter();
  const ref = useRef<HTMLFormElement>(null);
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<Result | null>(null);
  const [uploadErrors, setUploadErrors] = useState<string[]>([]);
  const [uploaded, setUploaded] = useState(0);
  const groups = [...new Set(options.map((o) => o.group))];
  const errors = result && !result.ok ? result.fieldErrors : undefined;

  return (
    <form
      ref={ref}
      className="space-y-3"
      aria-busy={busy}
      data-testid="record-check-form"
      onSubmit={async (e) => {
        e.preventDefault();
        setBusy(true);
        setUploadErrors([]);
        setUploaded(0);
        const fd = new FormData(e.currentTarget);
        const files = fd.getAll("files").filter((f): f is File => f instanceof File && f.size > 0);
        const minRole = String(fd.get("minRole") ?? "viewer");
        fd.delete("files");
        fd.delete("minRole");
        const r = await recordCheck(null, fd);
        setResult(r);
        if (r.ok && r.data) {
          const failed = (await Promise.all(files.map((f) => postUpload(f, "check", r.data!.id, minRole)))).filter((x): x is string => x !== null);
          setUploadErrors(failed);
          setUploaded(files.length - failed.length);
          const form = ref.current;
          if (form) {
            for (const name of ["decayPosS", "decayNegS", "offsetV", "notes", "files"]) {
              const el = form.elements.namedItem(name);
              if (el instanceof HTMLInputElement || el instanceof HTMLTextAreaElement) el.value = "";
            }
          }
          router.refresh();
        }
        setBusy(false);
      }}
    >
      <fieldset disabled={busy} className="contents">
        <Label text="Neutralizer" name="neutralizerId" errors={errors}>
          <select name="neutralizerId" className={inputClass} defaultValue={preselect ?? ""} required>
            <option value="" disabled>
              Choose…
            </option>
            {groups.map((g) => (
              <optgroup key={g} label={g}>
                {options
                  .filter((o) => o.group === g)
                  .map((o) => (
                    <option key={o.id} value={o.id}>
                      {o.tag}
                    </option>
                  ))}
              </optgroup>
            ))}
          </select>
        </Label>
        <div className="grid grid-cols-2 gap-3">
          <Label text="Checked at" name="checkedAt" errors={errors}>
            <input type="datetime-local" name="checkedAt" defaultValue={nowLocal} className={inputClass} required />
          </Label>
          <Label text="Method" name="method" errors={errors}>
            <select name="method" className={inputClass} defaultValue="charged_plate">
              <option value="charged_plate">Charged plate ({CHECK_STANDARD_EDITIONS.testMethodAnsi})</option>
              <option value="periodic">Periodic check ({CHECK_STANDARD_EDITIONS.periodic})</option>
            </select>
          </Label>
        </div>
        <div className="grid grid-cols-3 gap-3">
          <Label text="Decay + (s)" name="decayPosS" errors={errors} hint="+1000 → +100 V">
            <input name="decayPosS" inputMode="decimal" className={inputClass} required />
          </Label>
          <Label text="Decay − (s)" name="decayNegS" errors={errors} hint="−1000 → −100 V">
            <input name="decayNegS" inputMode="decimal" className={inputClass} required />
          </Label>
          <Label text="Offset (V)" name="offsetV" errors={errors} hint="balance, signed">
            <input name="offsetV" inputMode="decimal" className={inputClass} required />
          </Label>
        </div>
        <Label text="Instrument" name="instrument" errors={errors}>
          <input name="instrument" className={inputClass} maxLength={120} placeholder="model and serial number" />
        </Label>
        <Label text="Instrument calibrated on" name="instrumentCalibratedOn" errors={errors}>
          <input name="instrumentCalibratedOn" type="date" className={inputClass} />
        </Label>
        <fieldset className="rounded border border-paper-line px-3 pb-3 pt-1" data-testid="plate-fields">
          <legend className="px-1 text-xs font-medium text-ink-soft">Plate and test distance</legend>
          <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
            <Label text="Plate (pF)" name="plateCapacitancePf" errors={errors}>
              <input name="plateCapacitancePf" inputMode="decimal" defaultValue={STANDARD_PLATE.capacitancePf} className={inputClass} />
            </Label>
            <Label text="Width (mm)" name="plateWidthMm" errors={errors}>
              <input name="plateWidthMm" inputMode="decimal" defaultValue={STANDARD_PLATE.widthMm} className={inputClass} />
            </Label>
            <Label text="Length (mm)" name="plateLengthMm" errors={errors}>
              <input name="plateLengthMm" inputMode="decimal" defaultValue={STANDARD_PLATE.lengthMm} className={inputClass} />
            </Label>
            <Label text="Test distance (mm)" name="plateDistanceMm" errors={errors}>
              <input name="plateDistanceMm" inputMode="decimal" className={inputClass} placeholder="e.g. 300" />
            </Label>
          </div>
          <p className="mt-1.5 text-xs text-ink-faint">
            20 pF on 150 × 150 mm is the plate of {CHECK_STANDARD_EDITIONS.testMethodAnsi} and {CHECK_STANDARD_EDITIONS.testMethodIec}. Test distance: neutralizer to plate, at its working distance; times from another plate or distance are not comparable.
          </p>
        </fieldset>
        <Label text="Notes" name="notes" errors={errors}>
          <textarea name="notes" rows={2} className={inputClass} maxLength={2000} />
        </Label>
        <div className="rounded border border-dashed border-paper-line px-3 py-2">
          <span className="text-xs font-medium text-ink-soft">Photos or printout (optional)</span>
          <input
            type="file"
            name="files"
            multiple
            accept="image/jpeg,image/png,image/webp,application/pdf"
            aria-label="Photos or printout of the check"
            className="mt-1 block w-full text-sm text-ink-soft file:mr-3 file:rounded file:border file:border-paper-line file:bg-paper-raised file:px-3 file:py-1 file:text-sm file:text-ink"
          />
          <div className="mt-2">
            <MinRoleSelect />
          </div>
        </div>
        <button type="submit" className="rounded bg-brand px-4 py-1.5 text-sm font-medium text-white hover:bg-brand-deep disabled:opacity-50">
          {busy ? "Saving…" : "Record check"}
        </button>
      </fieldset>

      {result && !result.ok ? (
        <p role="alert" className="rounded bg-over-soft px-3 py-1.5 text-sm text-over" data-testid="form-error">
          {result.message}
        </p>
      ) : null}
      {result?.ok && result.data ? (
        <div role="status" className={`rounded-card border px-3 py-2.5 ${result.data.passed ? "border-paper-line bg-paper" : "border-over/40 bg-over-soft/60"}`} data-testid="check-result">
          <div className="flex items-center gap-2">
            <StateBadge state={result.data.passed ? "normal" : "over"} label={result.data.passed ? "Pass" : "Fail"} className="text-sm" />
            <span className="text-sm font-medium">{result.data.tag}</span>
          </div>
          <ul className="mt-2 space-y-0.5 text-sm">
            {result.data.parts.map((p) => (
              <li key={p.label} className={p.pass ? "text-ink-soft" : "font-medium text-over"}>
                {p.pass ? "○" : "◆"} {p.reason}
              </li>
            ))}
          </ul>
          <p className="mt-2 text-xs text-ink-faint">
            Limits for this kind: decay ≤ {result.data.limits.maxDecayS} s, offset within ±{result.data.limits.maxOffsetAbsV} V ({result.data.limits.source === "plant" ? "plant setting" : "default"}).
          </p>
          {result.data.slowdown?.warn ? (
            <p className="mt-1 text-sm font-medium text-near" data-testid="check-slowdown">
              ▲ Slower than its own baseline by ×{result.data.slowdown.factor.toFixed(1)}: {result.data.slowdown.currentS.toFixed(1)} s against {result.data.slowdown.baselineS.toFixed(1)} s from its earlier checks.
            </p>
          ) : null}
          {result.data.plateNonStandard ? <p className="mt-1 text-sm text-near">Not the standard 20 pF, 150 × 150 mm plate: compare these times only with checks on the same plate.</p> : null}
          {result.data.stateChanged ? <p className="mt-1 text-sm text-near">Marked as needing cleaning; it is on the due list now.</p> : null}
          {result.data.instrumentCalibrationOld ? <p className="mt-1 text-sm text-near">The instrument&apos;s calibration is more than a year old.</p> : null}
          {uploaded ? <p className="mt-1 text-sm text-ink-soft">{uploaded} file{uploaded === 1 ? "" : "s"} attached.</p> : null}
          {uploadErrors.map((m) => (
            <p key={m} role="alert" className="mt-1 text-sm text-over">
              {m}
            </p>
          ))}
        </div>
      ) : null}
    </form>
  );
}
