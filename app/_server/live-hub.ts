// One MQTT subscription per app process, fanned out to every open live stream (SSE).
// The worker publishes a snapshot per line and per hall about once a second on internal topics
// that only the service account may read; this hub signs in with that account, parses each
// message once (lib/live.ts) and hands it to the listeners (one per open browser stream).
// Cached on globalThis so Next's hot reload and the many route-handler module instances share
// one connection. Nothing here is per-person: each stream checks its own session and filters.
import "server-only";
import mqtt, { type MqttClient } from "mqtt";
import { z } from "zod";
import { getEnv } from "@/db/env";
import { internalTopics } from "@/lib/contract/topics";
import { parseLiveSnapshot, type LiveSnapshot } from "@/lib/live";
import { SERVICE_ACCOUNTS } from "@/lib/settings";

/** Alert changes published by the alerts engine; streams forward them so pages refetch alerts. */
export const alertChangeSchema = z.object({
  alertId: z.number(),
  lineId: z.number().int().nullable().optional(),
  areaId: z.number().int().nullable().optional(),
  state: z.string().max(40),
  severity: z.string().max(20).optional(),
  ts: z.number(),
});
export type AlertChange = z.infer<typeof alertChangeSchema>;

export type HubEvent =
  | { type: "live"; snapshot: LiveSnapshot }
  | { type: "alert"; alert: AlertChange }
  | { type: "broker"; connected: boolean };

export type HubListener = (event: HubEvent) => void;

export type HubStats = {
  connected: boolean;
  listeners: number;
  messages: number;
  rejected: number;
  lastMessageTs: number | null;
};

export type BrokerAccount = { host: string; port: number; username: string; password: string };

export class LiveHub {
  private client: MqttClient | null = null;
  private readonly listeners = new Set<HubListener>();
  private connected = false;
  private messages = 0;
  private rejected = 0;
  private lastMessageTs: number | null = null;

  /** `account` defaults to the environment's broker and service account (db/env.ts). */
  constructor(private readonly account?: BrokerAccount) {}

  subscribe(listener: HubListener): () => void {
    this.listeners.add(listener);
    this.ensureClient();
    return () => {
      this.listeners.delete(listener);
    };
  }

  /** Ends the broker connection (tests; the app's hub lives as long as the process). */
  async close(): Promise<void> {
    const c = this.client;
    this.client = null;
    this.connected = false;
    if (c) await c.endAsync();
  }

  isConnected(): boolean {
    return this.connected;
  }

  stats(): HubStats {
    return { connected: this.connected, listeners: this.listeners.size, messages: this.messages, rejected: this.rejected, lastMessageTs: this.lastMessageTs };
  }

  private emit(event: HubEvent) {
    for (const listener of this.listeners) {
      try {
        listener(event);
      } catch (err) {
        // one broken stream must not starve the others
        console.error("live hub listener failed:", err);
      }
    }
  }

  private ensureClient() {
    if (this.client) return;
    const env = this.account ? null : getEnv();
    const account = this.account ?? { host: env!.MQTT_HOST, port: env!.MQTT_PORT, username: SERVICE_ACCOUNTS.app, password: env!.MQTT_APP_PASSWORD };
    const client = mqtt.connect({
      host: account.host,
      port: account.port,
      protocol: "mqtt",
      username: account.username,
      password: account.password,
      clientId: `stillfield-app-${process.pid}-${Math.random().toString(36).slice(2, 8)}`,
      clean: true,
      reconnectPeriod: 2_000,
      connectTimeout: 10_000,
      keepalive: 30,
    });
    this.client = client;
    client.on("connect", () => {
      client.subscribe([internalTopics.liveAll, internalTopics.alerts], { qos: 0 }, (err) => {
        if (err) console.error("live hub: subscribe failed:", err.message);
      });
      if (!this.connected) {
        this.connected = true;
        this.emit({ type: "broker", connected: true });
      }
    });
    const down = () => {
      if (this.connected) {
        this.connected = false;
        this.emit({ type: "broker", connected: false });
      }
    };
    client.on("close", down);
    client.on("offline", down);
    client.on("error", (err) => {
      // connection refused / not authorised: mqtt.js keeps retrying every reconnectPeriod
      console.error("live hub: broker error:", err.message);
    });
    client.on("message", (topic, payload) => {
      this.messages++;
      this.lastMessageTs = Date.now();
      if (topic === internalTopics.alerts) {
        const parsed = alertChangeSchema.safeParse(safeJson(payload));
        if (parsed.success) this.emit({ type: "alert", alert: parsed.data });
        else this.rejected++;
        return;
      }
      const snapshot = parseLiveSnapshot(payload);
      if (snapshot) this.emit({ type: "live", snapshot });
      else this.rejected++;
    });
  }
}

function safeJson(payload: Uint8Array): unknown {
  try {
    return JSON.parse(new TextDecoder().decode(payload));
  } catch {
    return null;
  }
}

const holder = globalThis as unknown as { __stillfieldLiveHub?: LiveHub };

export function getLiveHub(): LiveHub {
  holder.__stillfieldLiveHub ??= new LiveHub();
  return holder.__stillfieldLiveHub;
}

// ---- open streams: at most 20 per person and a ceiling per process ----------------------------

export const LIVE_STREAM_LIMITS = { perPerson: 20, perProcess: 400 };

export type StreamSlot = { ok: true; release: () => void } | { ok: false; reason: "person" | "process" };

/** Counts open live streams so one person (or a runaway page) cannot hold the process's sockets. */
export class StreamSlots {
  private readonly byPerson = new Map<number, number>();
  private total = 0;

  constructor(private readonly limits: { perPerson: number; perProcess: number } = LIVE_STREAM_LIMITS) {}

  acquire(personId: number): StreamSlot {
    const mine = this.byPerson.get(personId) ?? 0;
    if (mine >= this.limits.perPerson) return { ok: false, reason: "person" };
    if (this.total >= this.limits.perProcess) return { ok: false, reason: "process" };
    this.byPerson.set(personId, mine + 1);
    this.total++;
    let released = false;
    return {
      ok: true,
      release: () => {
        if (released) return;
        released = true;
        this.total--;
        const n = (this.byPerson.get(personId) ?? 1) - 1;
        if (n > 0) this.byPerson.set(personId, n);
        else this.byPerson.delete(personId);
      },
    };
  }

  openFor(personId: number): number {
    return this.byPerson.get(personId) ?? 0;
  }

  openTotal(): number {
    return this.total;
  }
}

const slotsHolder = globalThis as unknown as { __stillfieldStreamSlots?: StreamSlots };

export function getStreamSlots(): StreamSlots {
  slotsHolder.__stillfieldStreamSlots ??= new StreamSlots();
  return slotsHolder.__stillfieldStreamSlots;
}
