"use client";
// Gateway forms: map one metric (device + channel + conversion, suggested from the birth's
// unit), register an edge node (its secret shown once), and a device's time source.
import { useState } from "react";
import { ActionForm, Field, FieldError, inputClass, SubmitButton, type FormResult } from "@/components/forms/action-form";
import { CHANNEL_UNITS, CONVERSION_LABELS, CONVERSIONS, suggestConversion, type Conversion } from "@/lib/sparkplug/metrics";
import type { GatewayMetricView, MappingTarget } from "@/lib/sparkplug/view";
import type { Channel } from "@/lib/contract/readings-payload";
import { TIME_SOURCE_LABELS, TIME_SOURCES, type TimeSource } from "@/lib/clock-skew";
import { createEdgeNode, saveMetricMapping, setDeviceTimeSource } from "../actions";

export function MappingForm({ metric, targets }: { metric: GatewayMetricView; targets: MappingTarget[] }) {
  const [deviceId, setDeviceId] = useState<string>(metric.targetDeviceId ? String(metric.targetDeviceId) : "");
  const target = targets.find((t) => String(t.deviceId) === deviceId);
  const [channel, setChannel] = useState<string>(metric.targetChannel ?? "");
  const [conversion, setConversion] = useState<Conversion>(metric.conversion);
  const pickChannel = (c: string) => {
    setChannel(c);
    const s = c ? suggestConversion(metric.unit, c as Channel) : null;
    if (s) setConversion(s);
  };
  return (
    <ActionForm action={saveMetricMapping} className="flex flex-wrap items-end gap-2" successMessage="Saved">
      <input type="hidden" name="metricId" value={metric.id} />
      <label className="min-w-[12rem] flex-1">
        <span className="sr-only">Stillfield device for {metric.name}</span>
        <select
          name="targetDeviceId"
          className={inputClass}
          value={deviceId}
          aria-label={`Device for ${metric.deviceName || "node"} ${metric.name}`}
          onChange={(e) => {
            setDeviceId(e.target.value);
            const t = targets.find((x) => String(x.deviceId) === e.target.value);
            pickChannel(t && t.channels.length === 1 ? t.channels[0] : "");
          }}
        >
          <option value="">Not mapped</option>
          {targets.map((t) => (
            <option key={t.deviceId} value={t.deviceId}>
              {t.place} — {t.code}
            </option>
          ))}
        </select>
      </label>
      <label>
        <span className="sr-only">Channel</span>
        <select name="channel" className={inputClass} value={channel} aria-label={`Channel for ${metric.name}`} onChange={(e) => pickChannel(e.target.value)} disabled={!target}>
          <option value="">—</option>
          {(target?.channels ?? []).map((c) => (
            <option key={c} value={c}>
              {c} ({CHANNEL_UNITS[c]})
            </option>
          ))}
        </select>
      </label>
      <label>
        <span className="sr-only">Conversion</span>
        <select name="conversion" className={inputClass} value={conversion} aria-label={`Conversion for ${metric.name}`} onChange={(e) => setConversion(e.target.value as Conversion)}>
          {CONVERSIONS.map((c) => (
            <option key={c} value={c}>
              {CONVERSION_LABELS[c]}
            </option>
          ))}
        </select>
      </label>
      <SubmitButton variant="quiet">Save</SubmitButton>
      <div className="w-full text-xs">
        <FieldError name="channel" />
        <FieldError name="conversion" />
        <FieldError name="metricId" />
      </div>
    </ActionForm>
  );
}

function isSecret(r: FormResult): r is { ok: true; data: { code: string; secret: string } } {
  return Boolean(r && r.ok && typeof r.data === "object" && r.data !== null && "secret" in r.data && "code" in r.data);
}

export function AddEdgeNodeForm() {
  const [issued, setIssued] = useState<{ code: string; secret: string } | null>(null);
  if (issued) {
    return (
      <div role="status" className="rounded-card border-2 border-brand bg-brand-soft/60 px-4 py-3" data-testid="edge-secret-panel">
        <p className="text-sm font-semibold text-brand-deep">Secret for {issued.code} — shown only now</p>
        <code className="mt-2 block select-all break-all rounded border border-paper-line bg-white px-2 py-1.5 font-mono text-sm">{issued.secret}</code>
        <button type="button" className="mt-2 rounded bg-brand px-3 py-1 text-sm font-medium text-white" onClick={() => setIssued(null)}>
          I have stored it
        </button>
      </div>
    );
  }
  return (
    <ActionForm action={createEdgeNode} resetOnSuccess onSuccess={(r) => isSecret(r) && setIssued(r.data)} className="grid gap-3 sm:grid-cols-4">
      <Field label="Sign-in name (MQTT user and client id)" name="code">
        <input name="code" className={inputClass} required maxLength={64} placeholder="spb-press-hall-1" />
      </Field>
      <Field label="Group id" name="groupId">
        <input name="groupId" className={inputClass} required maxLength={64} placeholder="harrow-fen" />
      </Field>
      <Field label="Edge node id" name="nodeId">
        <input name="nodeId" className={inputClass} required maxLength={64} placeholder="press-hall-gw" />
      </Field>
      <Field label="Name" name="label">
        <input name="label" className={inputClass} required maxLength={120} placeholder="Press Hall PLC gateway" />
      </Field>
      <div className="sm:col-span-4">
        <SubmitButton>Register edge node</SubmitButton>
      </div>
    </ActionForm>
  );
}

export function TimeSourceForm({ deviceId, value }: { deviceId: number; value: TimeSource }) {
  return (
    <ActionForm action={setDeviceTimeSource} className="flex items-center gap-2" successMessage="Saved">
      <input type="hidden" name="deviceId" value={deviceId} />
      <select name="timeSource" defaultValue={value} className={inputClass} aria-label="Time kept for readings">
        {TIME_SOURCES.map((s) => (
          <option key={s} value={s}>
            {TIME_SOURCE_LABELS[s]}
          </option>
        ))}
      </select>
      <SubmitButton variant="quiet">Save</SubmitButton>
    </ActionForm>
  );
}
