// The two ways a message reaches a phone, each through the provider's own SDK:
// - texts with the SMS provider's official Node SDK (twilio), whose `httpClient` option is its
//   extension point: our RequestClient subclass sends every request to SMS_API_BASE (the local
//   fake in the demo and tests) instead of the provider's host, and nothing else changes;
// - browser push with web-push, signed with the install's VAPID keys (db/vapid-keys.ts) and
//   encrypted (aes128gcm) to the subscription's keys. A CA file can be given for a push service
//   with its own certificate (the local fake).
import https from "node:https";
import twilio from "twilio";
import type BaseRequestClient from "twilio/lib/base/RequestClient";
import webpush from "web-push";
import type { VapidKeys } from "../db/vapid-keys";

export type SmsResult = { sid: string; status: string };

/** A permanent refusal (bad number, bad account) is not retried; anything else is. */
export class SendError extends Error {
  constructor(
    message: string,
    readonly permanent: boolean,
    readonly status?: number,
  ) {
    super(message);
    this.name = "SendError";
  }
}

export function createSmsSender(opts: { accountSid: string; authToken: string; from: string; apiBase?: string; timeoutMs?: number }) {
  const base = opts.apiBase?.replace(/\/$/, "");
  class RedirectingClient extends twilio.RequestClient {
    request<TData>(req: BaseRequestClient.RequestOptions<TData>) {
      const uri = base ? req.uri.replace(/^https:\/\/[^/]+/, base) : req.uri;
      return super.request<TData>({ ...req, uri });
    }
  }
  const client = twilio(opts.accountSid, opts.authToken, { httpClient: new RedirectingClient({ timeout: opts.timeoutMs ?? 15_000 }) });
  return {
    async send(to: string, body: string): Promise<SmsResult> {
      try {
        const m = await client.messages.create({ to, from: opts.from, body });
        return { sid: m.sid, status: m.status };
      } catch (err) {
        const status = err && typeof err === "object" && "status" in err ? Number(err.status) : undefined;
        const message = err instanceof Error ? err.message : String(err);
        throw new SendError(message, status !== undefined && status >= 400 && status < 500 && status !== 429, status);
      }
    },
    async status(sid: string): Promise<string> {
      return (await client.messages(sid).fetch()).status;
    },
  };
}

export type PushPayload = { title: string; body: string; url: string | null; tag: string };

export function createPushSender(opts: { keys: VapidKeys; subject: string; ca?: string }) {
  const agent = opts.ca ? new https.Agent({ ca: opts.ca }) : undefined;
  return {
    async send(sub: { endpoint: string; p256dh: string; auth: string }, payload: PushPayload): Promise<{ statusCode: number }> {
      try {
        const res = await webpush.sendNotification({ endpoint: sub.endpoint, keys: { p256dh: sub.p256dh, auth: sub.auth } }, JSON.stringify(payload), {
          vapidDetails: { subject: opts.subject, publicKey: opts.keys.publicKey, privateKey: opts.keys.privateKey },
          contentEncoding: "aes128gcm",
          TTL: 3600,
          urgency: "high",
          timeout: 10_000,
          ...(agent ? { agent } : {}),
        });
        return { statusCode: res.statusCode };
      } catch (err) {
        const status = err && typeof err === "object" && "statusCode" in err ? Number(err.statusCode) : undefined;
        const message = err instanceof Error ? err.message : String(err);
        throw new SendError(message, status === 404 || status === 410 || status === 400 || status === 413, status);
      }
    },
  };
}
