"use client";
// The alerts list's data: /api/alerts through react-query, refetched when the live stream
// (/api/live, the same SSE path as the charts) says an alert changed. While the stream is down
// the list polls every 5 s instead; while it is up, every 60 s as a safety net.
import { keepPreviousData, useQuery, useQueryClient } from "@tanstack/react-query";
import { useMemo, useRef } from "react";
import type { AlertDetail, AlertListItem } from "@/lib/views/alerts";
import { LiveStore } from "@/components/live/live-store";
import { useLiveStream, type StreamStatus } from "@/components/live/use-live-stream";
import type { AlertState } from "@/lib/vocabulary";

import type { AlertFilterState } from "./filters";
export type { AlertFilterState };

export type AlertsResponse = { alerts: AlertListItem[]; counts: Record<AlertState, number>; serverTs: number };

export function alertsQueryString(f: AlertFilterState, nowMs: number): string {
  const p = new URLSearchParams();
  if (f.area !== null) p.set("area", String(f.area));
  if (f.line !== null) p.set("line", String(f.line));
  if (f.state === "open") p.set("open", "1");
  else if (f.state !== "all") p.set("state", f.state);
  // whole minutes, so the query key does not change every render
  if (f.hours !== null) p.set("from", String(Math.floor((nowMs - f.hours * 3_600_000) / 60_000) * 60_000));
  p.set("limit", "300");
  return p.toString();
}

async function fetchJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) throw new Error(`Could not load alerts (HTTP ${res.status}).`);
  return (await res.json()) as T; // our own route's response
}

export function useAlerts(filters: AlertFilterState, initial: AlertsResponse | undefined) {
  const queryClient = useQueryClient();
  const store = useMemo(() => new LiveStore(1_000, 2), []);
  const stream = useLiveStream({ scope: "plant" }, store, {
    onAlert: () => void queryClient.invalidateQueries({ queryKey: ["alerts"] }),
    onReset: () => void queryClient.invalidateQueries({ queryKey: ["alerts"] }),
  });
  const live: boolean = stream.status === "live";
  // eslint-disable-next-line react-hooks/purity -- the query key changes once a minute on purpose, so time-relative filters move with the clock
  const minute = Math.floor(Date.now() / 60_000);
  const qs = alertsQueryString(filters, minute * 60_000);
  const firstKey = useRef(qs);
  const query = useQuery({
    queryKey: ["alerts", "list", qs],
    queryFn: () => fetchJson<AlertsResponse>(`/api/alerts?${qs}`),
    // eslint-disable-next-line react-hooks/refs -- the server-rendered page seeds only the query it was rendered for; the ref is set once and never changes
    initialData: qs === firstKey.current ? initial : undefined,
    // a new filter (or the minute rolling over) keeps the old rows on screen until the new ones arrive
    placeholderData: keepPreviousData,
    refetchInterval: live ? 60_000 : 5_000,
    staleTime: 2_000,
  });
  return { query, streamStatus: stream.status as StreamStatus, live };
}

export function useAlertDetail(id: number | null) {
  return useQuery({
    queryKey: ["alerts", "detail", id],
    queryFn: () => fetchJson<{ alert: AlertDetail }>(`/api/alerts/${id}`).then((r) => r.alert),
    enabled: id !== null,
    staleTime: 2_000,
  });
}
