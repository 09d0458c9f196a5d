"use client";
// react-query hook for the events on a line's time axis (/api/history/events): notes, alerts and planned work.
// Earlier data stay on screen while a new range loads. (The charts' history is fetched with
// useQueries in line-dashboard.tsx, one query per sensor channel.)
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { LineNote } from "@/lib/views/notes";
import type { TimelineAlert } from "@/lib/views/floor";
import type { MaintenanceWindowView } from "@/lib/views/maintenance";

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

export type LineEvents = { notes: LineNote[]; alerts: TimelineAlert[]; windows?: MaintenanceWindowView[] };

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
