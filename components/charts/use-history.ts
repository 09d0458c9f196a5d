"use client";
// react-query hooks for the line page: one channel's history (/api/history) and the events on
// the line's time axis (/api/history/events). Earlier data stay on screen while a new range loads.
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { HistoryResult } from "@/db/queries/history";
import type { LineNote } from "@/db/queries/notes";
import type { TimelineAlert } from "@/db/queries/floor";

export type HistoryQuery = { deviceId: number; channel: string; fromTs: number; toTs: number; maxPoints?: number };

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) {
    let reason = `${res.status}`;
    try {
      const body = (await res.json()) as { error?: string };
      if (body.error) reason = body.error;
    } catch {
      /* not JSON */
    }
    throw new Error(reason);
  }
  return (await res.json()) as T;
}

export function historyKey(q: HistoryQuery) {
  return ["history", q.deviceId, q.channel, q.fromTs, q.toTs, q.maxPoints ?? 1000] as const;
}

export function useHistory(q: HistoryQuery | null, opts: { refetchMs?: number | false } = {}) {
  return useQuery({
    queryKey: q ? historyKey(q) : ["history", "none"],
    queryFn: () => {
      const p = new URLSearchParams({ deviceId: String(q!.deviceId), channel: q!.channel, from: String(q!.fromTs), to: String(q!.toTs), maxPoints: String(q!.maxPoints ?? 1000) });
      return getJson<HistoryResult>(`/api/history?${p}`);
    },
    enabled: q !== null,
    placeholderData: keepPreviousData,
    staleTime: 30_000,
    refetchInterval: opts.refetchMs ?? false,
  });
}

export type LineEvents = { notes: LineNote[]; alerts: TimelineAlert[] };

export function eventsKey(lineId: number) {
  return ["line-events", lineId] as const;
}

export function useLineEvents(lineId: number, fromTs: number, toTs: number) {
  return useQuery({
    queryKey: [...eventsKey(lineId), fromTs, toTs],
    queryFn: () => getJson<LineEvents>(`/api/history/events?${new URLSearchParams({ lineId: String(lineId), from: String(fromTs), to: String(toTs) })}`),
    placeholderData: keepPreviousData,
    staleTime: 15_000,
    refetchInterval: 60_000,
  });
}
