"use client";
// The "My notifications" form (mobile number, severities by text and by push) and the button
// that lets this phone receive push: it asks for permission, subscribes with the install's VAPID
// public key (GET /api/me/push) through the service worker (public/sw.js) and saves the
// subscription (POST /api/me/push).
import { useState } from "react";
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import { SEVERITIES, SEVERITY_WORDS, type Severity } from "@/lib/vocabulary";
import { saveMyNotifications } from "./actions";

function SeverityBoxes({ name, legend, checked }: { name: string; legend: string; checked: readonly Severity[] }) {
  return (
    <fieldset className="space-y-1">
      <legend className="text-sm font-medium text-ink">{legend}</legend>
      <div className="flex flex-wrap gap-4">
        {[...SEVERITIES].reverse().map((s) => (
          <label key={s} className="flex min-h-11 items-center gap-2 text-sm text-ink">
            <input type="checkbox" name={name} value={s} defaultChecked={checked.includes(s)} className="size-5" />
            {SEVERITY_WORDS[s]}
          </label>
        ))}
      </div>
    </fieldset>
  );
}

export function NotificationSettingsForm({ personId, phone, smsSeverities, pushSeverities }: { personId: number; phone: string; smsSeverities: Severity[]; pushSeverities: Severity[] }) {
  return (
    <ActionForm action={saveMyNotifications} className="space-y-4" successMessage="Saved.">
      <input type="hidden" name="personId" value={personId} />
      <Field label="Mobile number" name="phone" hint="With the country code, e.g. +44 7700 900123. Leave empty for no texts.">
        <input name="phone" type="tel" autoComplete="tel" maxLength={40} className={inputClass} defaultValue={phone} />
      </Field>
      <SeverityBoxes name="smsSeverities" legend="Text me alerts of severity" checked={smsSeverities} />
      <SeverityBoxes name="pushSeverities" legend="Push to my phone alerts of severity" checked={pushSeverities} />
      <SubmitButton>Save</SubmitButton>
    </ActionForm>
  );
}

function urlBase64ToBytes(b64: string): Uint8Array<ArrayBuffer> {
  const pad = "=".repeat((4 - (b64.length % 4)) % 4);
  const raw = atob((b64 + pad).replace(/-/g, "+").replace(/_/g, "/"));
  const out = new Uint8Array(new ArrayBuffer(raw.length));
  for (let i = 0; i < raw.length; i++) out[i] = raw.charCodeAt(i);
  return out;
}

export function AllowPushButton() {
  const [status, setStatus] = useState<string>("");
  async function allow() {
    try {
      if (!("serviceWorker" in navigator) || !("PushManager" in window)) return setStatus("This browser cannot receive push notifications.");
      if ((await Notification.requestPermission()) !== "granted") return setStatus("Notifications are not allowed in this browser's settings.");
      const reg = await navigator.serviceWorker.ready;
      const { publicKey } = (await (await fetch("/api/me/push")).json()) as { publicKey: string };
      const sub = (await reg.pushManager.getSubscription()) ?? (await reg.pushManager.subscribe({ userVisibleOnly: true, applicationServerKey: urlBase64ToBytes(publicKey) }));
      const res = await fetch("/api/me/push", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(sub.toJSON()) });
      setStatus(res.ok ? "This phone will get push notifications." : "The server did not keep this phone's subscription; try again.");
    } catch {
      setStatus("Could not set up push on this phone.");
    }
  }
  return (
    <div className="space-y-2">
      <button type="button" onClick={allow} className="min-h-11 rounded border border-paper-line px-3 text-sm text-ink hover:bg-paper-sunk">
        Allow push on this phone
      </button>
      <p role="status" className="text-sm text-ink-soft" data-testid="push-status">
        {status}
      </p>
    </div>
  );
}
