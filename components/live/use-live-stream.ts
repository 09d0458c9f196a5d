"use client";
// Opens the live stream (/api/live) for the plant, a hall or a line and feeds a LiveStore.
// EventSource reconnects by itself after a dropped connection and sends Last-Event-ID, so the
// server back-fills the gap. When the browser gives up (an HTTP error, e.g. the app restarting)
// or the stream goes quiet for longer than three heartbeats, this hook opens a new one with
// `since` = the newest reading it has, backing off up to 30 s.
import { useEffect, useRef, useState } from "react";
import { z } from "zod";
import { liveSeriesSchema, liveSnapshotSchema } from "@/lib/live";
import type { LiveStore } from "./live-store";

export type StreamStatus = "connecting" | "live" | "reconnecting";

export type LiveScope = { scope: "plant" } | { scope: "area"; id: number } | { scope: "line"; id: number };

const backfillSchema = z.object({ series: z.array(liveSeriesSchema) });
const helloSchema = z.object({ serverTs: z.number(), broker: z.boolean() });
const pingSchema = z.object({ ts: z.number(), broker: z.boolean() });
const brokerSchema = z.object({ connected: z.boolean() });

const QUIET_LIMIT_MS = 50_000;

function parse<T>(schema: z.ZodType<T>, data: string): T | null {
  try {
    const r = schema.safeParse(JSON.parse(data));
    return r.success ? r.data : null;
  } catch {
    return null;
  }
}

export type LiveStreamState = {
  status: StreamStatus;
  /** the worker's broker link as the server last saw it */
  brokerConnected: boolean | null;
  /** server clock minus browser clock, ms (judging "silent" by the server's time) */
  clockOffsetMs: number;
};

export function useLiveStream(
  target: LiveScope,
  store: LiveStore,
  handlers: { onAlert?: () => void; onReset?: () => void } = {},
  /** back-fill from this time on the first connection (the end of history already loaded) */
  initialSince?: number,
): LiveStreamState {
  const [state, setState] = useState<LiveStreamState>({ status: "connecting", brokerConnected: null, clockOffsetMs: 0 });
  const handlersRef = useRef(handlers);
  // eslint-disable-next-line react-hooks/refs -- latest-handlers ref: the open stream calls the current handlers without reconnecting
  handlersRef.current = handlers;
  const scope = target.scope;
  const id = target.scope === "plant" ? undefined : target.id;

  useEffect(() => {
    let es: EventSource | null = null;
    let stopped = false;
    let lastId = initialSince ?? 0;
    let lastEventAt = Date.now();
    let backoffMs = 2_000;
    let retryTimer: ReturnType<typeof setTimeout> | null = null;

    const touch = () => {
      lastEventAt = Date.now();
    };

    const open = () => {
      if (stopped) return;
      const params = new URLSearchParams({ scope });
      if (id !== undefined) params.set("id", String(id));
      if (lastId > 0) params.set("since", String(lastId));
      es = new EventSource(`/api/live?${params}`);
      es.addEventListener("hello", (e) => {
        touch();
        backoffMs = 2_000;
        const h = parse(helloSchema, (e as MessageEvent<string>).data);
        setState((s) => ({ ...s, status: "live", brokerConnected: h?.broker ?? s.brokerConnected, clockOffsetMs: h ? h.serverTs - Date.now() : s.clockOffsetMs }));
      });
      es.addEventListener("live", (e) => {
        touch();
        const m = e as MessageEvent<string>;
        const snap = parse(liveSnapshotSchema, m.data);
        if (!snap) return;
        store.ingest(snap.series);
        const idNum = Number(m.lastEventId);
        if (idNum > lastId) lastId = idNum;
      });
      es.addEventListener("backfill", (e) => {
        touch();
        const m = e as MessageEvent<string>;
        const b = parse(backfillSchema, m.data);
        if (b) store.ingest(b.series);
        const idNum = Number(m.lastEventId);
        if (idNum > lastId) lastId = idNum;
      });
      es.addEventListener("reset", () => {
        touch();
        handlersRef.current.onReset?.();
      });
      es.addEventListener("alert", () => {
        touch();
        handlersRef.current.onAlert?.();
      });
      es.addEventListener("ping", (e) => {
        touch();
        const p = parse(pingSchema, (e as MessageEvent<string>).data);
        if (p) setState((s) => (s.brokerConnected === p.broker && s.status === "live" ? s : { ...s, status: "live", brokerConnected: p.broker }));
      });
      es.addEventListener("broker", (e) => {
        touch();
        const b = parse(brokerSchema, (e as MessageEvent<string>).data);
        if (b) setState((s) => ({ ...s, brokerConnected: b.connected }));
      });
      es.onerror = () => {
        setState((s) => (s.status === "reconnecting" ? s : { ...s, status: "reconnecting" }));
        if (es && es.readyState === EventSource.CLOSED) reopenLater();
      };
    };

    const reopenLater = () => {
      es?.close();
      es = null;
      if (stopped || retryTimer) return;
      retryTimer = setTimeout(() => {
        retryTimer = null;
        open();
      }, backoffMs);
      backoffMs = Math.min(backoffMs * 2, 30_000);
    };

    // a stream that went quiet (a proxy holding it, a sleeping laptop) is replaced
    const watchdog = setInterval(() => {
      if (Date.now() - lastEventAt > QUIET_LIMIT_MS) {
        touch();
        setState((s) => ({ ...s, status: "reconnecting" }));
        reopenLater();
      }
    }, 10_000);

    open();
    return () => {
      stopped = true;
      clearInterval(watchdog);
      if (retryTimer) clearTimeout(retryTimer);
      es?.close();
      es = null;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps -- a new initialSince only matters for a new stream (scope or store change)
  }, [scope, id, store]);

  return state;
}
