"use client";
// Device forms. A new or rotated secret is shown here exactly once: it lives only in this
// component's state (the action's answer) and is gone on reload; the database keeps its hash.
import { useState } from "react";
import { ActionForm, Field, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import { deviceWarnings, type DeviceSettings, type EquipmentWarning } from "@/lib/equipment-warnings";
import { createDevice, rotateDeviceSecret, setDeviceEnabled, updateDevice } from "../actions";

type Places = {
  areas: { id: number; name: string }[];
  lines: { id: number; areaId: number; name: string }[];
  points: { id: number; lineId: number; label: string }[];
};

const KINDS: Array<[DeviceSettings["kind"], string]> = [
  ["field_meter", "Field meter"],
  ["th_logger", "Temperature/humidity logger"],
  ["speed_gateway", "Line-speed gateway"],
];

function isSecretResult(r: FormResult): r is { ok: true; data: { code: string; secret: string } } {
  if (!r || !r.ok || typeof r.data !== "object" || r.data === null) return false;
  return "secret" in r.data && typeof r.data.secret === "string" && "code" in r.data && typeof r.data.code === "string";
}

function SecretOnce({ code, secret, onDone }: { code: string; secret: string; onDone: () => void }) {
  const [copied, setCopied] = useState(false);
  return (
    <div role="status" className="rounded-card border-2 border-brand bg-brand-soft/60 px-4 py-3" data-testid="device-secret-panel">
      <p className="text-sm font-semibold text-brand-deep">Secret for {code} — shown only now</p>
      <p className="mt-1 text-xs text-ink-soft">Copy it into the device&apos;s settings. Stillfield keeps only a hash of it; if it is lost, issue a new one.</p>
      <code className="mt-2 block select-all break-all rounded border border-paper-line bg-white px-2 py-1.5 font-mono text-sm text-ink" data-testid="device-secret">
        {secret}
      </code>
      <div className="mt-2 flex gap-2">
        <button
          type="button"
          className="rounded border border-paper-line bg-paper-raised px-3 py-1 text-sm hover:bg-paper-sunk"
          onClick={async () => {
            await navigator.clipboard?.writeText(secret).catch(() => undefined);
            setCopied(true);
          }}
        >
          {copied ? "Copied" : "Copy"}
        </button>
        <button type="button" className="rounded bg-brand px-3 py-1 text-sm font-medium text-white hover:bg-brand-deep" onClick={onDone}>
          I have stored it
        </button>
      </div>
    </div>
  );
}

function PlacementFields({ places, initial }: { places: Places; initial?: { pointId: number | null; lineId: number | null; areaId: number | null } }) {
  return (
    <div className="grid gap-3 sm:grid-cols-3">
      <Field label="Point (field meter)" name="pointId">
        <select name="pointId" className={inputClass} defaultValue={initial?.pointId ?? ""}>
          <option value="">—</option>
          {places.points.map((p) => (
            <option key={p.id} value={p.id}>
              {p.label}
            </option>
          ))}
        </select>
      </Field>
      <Field label="Line (gateway)" name="lineId">
        <select name="lineId" className={inputClass} defaultValue={initial?.pointId ? "" : (initial?.lineId ?? "")}>
          <option value="">—</option>
          {places.lines.map((l) => (
            <option key={l.id} value={l.id}>
              {l.name}
            </option>
          ))}
        </select>
      </Field>
      <Field label="Hall (logger)" name="areaId">
        <select name="areaId" className={inputClass} defaultValue={initial?.pointId || initial?.lineId ? "" : (initial?.areaId ?? "")}>
          <option value="">—</option>
          {places.areas.map((a) => (
            <option key={a.id} value={a.id}>
              {a.name}
            </option>
          ))}
        </select>
      </Field>
    </div>
  );
}

const num = (v: FormDataEntryValue | null) => (typeof v === "string" && v.trim() !== "" && Number.isFinite(Number(v)) ? Number(v) : null);
const id = num;

function liveWarnings(form: HTMLFormElement, kind: DeviceSettings["kind"], today: string): EquipmentWarning[] {
  const fd = new FormData(form);
  const k = KINDS.find(([x]) => x === fd.get("kind"))?.[0] ?? kind;
  const calibrationDue = fd.get("calibrationDue");
  return deviceWarnings(
    {
      kind: k,
      calibratedDistanceMm: num(fd.get("calibratedDistanceMm")),
      mountingDistanceMm: num(fd.get("mountingDistanceMm")),
      calibrationDue: typeof calibrationDue === "string" && calibrationDue ? calibrationDue : null,
      pointId: id(fd.get("pointId")),
      lineId: id(fd.get("lineId")) ?? (id(fd.get("pointId")) !== null ? 0 : null),
      areaId: id(fd.get("areaId")) ?? (id(fd.get("pointId")) !== null || id(fd.get("lineId")) !== null ? 0 : null),
    },
    today,
  );
}

function WarningList({ warnings }: { warnings: EquipmentWarning[] }) {
  if (!warnings.length) return null;
  return (
    <ul className="space-y-1 rounded border border-near/40 bg-near-soft/60 px-3 py-2 text-xs text-ink" data-testid="equipment-warnings">
      {warnings.map((w) => (
        <li key={w.code}>
          ▲ {w.message} <span className="text-ink-faint">({w.source})</span>
        </li>
      ))}
    </ul>
  );
}

export function AddDeviceForm({ places, today }: { places: Places; today: string }) {
  const [secret, setSecret] = useState<{ code: string; secret: string } | null>(null);
  const [warnings, setWarnings] = useState<EquipmentWarning[]>([]);
  return (
    <div className="space-y-3">
      {secret ? <SecretOnce code={secret.code} secret={secret.secret} onDone={() => setSecret(null)} /> : null}
      <div onChange={(e) => {
        const form = (e.target as HTMLElement).closest("form");
        if (form) setWarnings(liveWarnings(form, "field_meter", today));
      }}>
        <ActionForm
          action={createDevice}
          className="grid gap-3 lg:grid-cols-2"
          resetOnSuccess
          onSuccess={(r) => {
            if (isSecretResult(r)) setSecret({ code: r.data.code, secret: r.data.secret });
            setWarnings([]);
          }}
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <Field label="Device id (code)" name="code">
              <input name="code" className={inputClass} required maxLength={64} autoComplete="off" placeholder="e.g. fm-gravure-1-unwind" />
            </Field>
            <Field label="Kind" name="kind">
              <select name="kind" className={inputClass} defaultValue="field_meter">
                {KINDS.map(([k, label]) => (
                  <option key={k} value={k}>
                    {label}
                  </option>
                ))}
              </select>
            </Field>
          </div>
          <Field label="Name" name="label">
            <input name="label" className={inputClass} required maxLength={120} />
          </Field>
          <PlacementFields places={places} />
          <div className="grid gap-3 sm:grid-cols-3">
            <Field label="Calibrated for, mm" name="calibratedDistanceMm">
              <input name="calibratedDistanceMm" inputMode="decimal" className={inputClass} />
            </Field>
            <Field label="Mounted at, mm" name="mountingDistanceMm">
              <input name="mountingDistanceMm" inputMode="decimal" className={inputClass} />
            </Field>
            <Field label="Calibration due" name="calibrationDue">
              <input name="calibrationDue" type="date" className={inputClass} />
            </Field>
          </div>
          <div className="space-y-3 lg:col-span-2">
            <WarningList warnings={warnings} />
            <SubmitButton>Add device and issue its secret</SubmitButton>
          </div>
        </ActionForm>
      </div>
    </div>
  );
}

export type EditableDevice = {
  id: number;
  kind: DeviceSettings["kind"];
  label: string;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  calibratedDistanceMm: number | null;
  mountingDistanceMm: number | null;
  calibrationDue: string | null;
};

export function EditDeviceForm({ device, places, today }: { device: EditableDevice; places: Places; today: string }) {
  const [warnings, setWarnings] = useState<EquipmentWarning[]>(() => deviceWarnings(device, today));
  return (
    <div onChange={(e) => {
      const form = (e.target as HTMLElement).closest("form");
      if (form) setWarnings(liveWarnings(form, device.kind, today));
    }}>
      <ActionForm action={updateDevice} className="space-y-3" successMessage="Saved.">
        <input type="hidden" name="id" value={device.id} />
        <input type="hidden" name="kind" value={device.kind} />
        <Field label="Name" name="label">
          <input name="label" className={inputClass} defaultValue={device.label} required maxLength={120} />
        </Field>
        <PlacementFields places={places} initial={device} />
        <div className="grid gap-3 sm:grid-cols-3">
          <Field label="Calibrated for, mm" name="calibratedDistanceMm">
            <input name="calibratedDistanceMm" inputMode="decimal" className={inputClass} defaultValue={device.calibratedDistanceMm ?? ""} />
          </Field>
          <Field label="Mounted at, mm" name="mountingDistanceMm">
            <input name="mountingDistanceMm" inputMode="decimal" className={inputClass} defaultValue={device.mountingDistanceMm ?? ""} />
          </Field>
          <Field label="Calibration due" name="calibrationDue">
            <input name="calibrationDue" type="date" className={inputClass} defaultValue={device.calibrationDue ?? ""} />
          </Field>
        </div>
        <WarningList warnings={warnings} />
        <SubmitButton>Save changes</SubmitButton>
      </ActionForm>
    </div>
  );
}

export function RotateSecretForm({ id: deviceId, code }: { id: number; code: string }) {
  const [secret, setSecret] = useState<string | null>(null);
  return (
    <div className="space-y-2">
      {secret ? <SecretOnce code={code} secret={secret} onDone={() => setSecret(null)} /> : null}
      <ActionForm
        action={rotateDeviceSecret}
        onSuccess={(r) => {
          if (isSecretResult(r)) setSecret(r.data.secret);
        }}
      >
        <input type="hidden" name="id" value={deviceId} />
        <p className="mb-2 text-xs text-ink-soft">The old secret stops working: the device cannot sign in until it has the new one.</p>
        <SubmitButton variant="danger">Issue a new secret</SubmitButton>
      </ActionForm>
    </div>
  );
}

export function EnableForm({ id: deviceId, enabled }: { id: number; enabled: boolean }) {
  return (
    <ActionForm action={setDeviceEnabled}>
      <input type="hidden" name="id" value={deviceId} />
      <input type="hidden" name="enabled" value={enabled ? "false" : "true"} />
      <SubmitButton variant={enabled ? "danger" : "quiet"}>{enabled ? "Disable device" : "Enable device"}</SubmitButton>
    </ActionForm>
  );
}
