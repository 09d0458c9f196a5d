"use client";
// The Floor's and the wallboard's live data: the snapshot from /api/floor (structure, limits,
// open alerts, the last 15 minutes), kept current by the live stream. An alert change refetches
// the snapshot (debounced); a "reset" from the stream (too long a gap) reseeds the store.
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, useEffect, useMemo, useRef, useSyncExternalStore } from "react";
import type { FloorSnapshot } from "@/lib/views/floor";
import { LiveStore } from "@/components/live/live-store";
import { useLiveStream, type LiveStreamState } from "@/components/live/use-live-stream";
import { useNow } from "@/components/live/use-now";

export type FloorLive = {
  snapshot: FloorSnapshot;
  store: LiveStore;
  stream: LiveStreamState;
  now: number;
  /** bumps when the store changed (use as a memo dependency) */
  version: number;
};

async function fetchFloor(areaId?: number): Promise<FloorSnapshot> {
  const res = await fetch(areaId !== undefined ? `/api/floor?areaId=${areaId}` : "/api/floor", { cache: "no-store" });
  if (!res.ok) throw new Error(`The floor data could not be loaded (${res.status}).`);
  return (await res.json()) as FloorSnapshot;
}

export function useFloorLive(initial: FloorSnapshot, opts: { areaId?: number; refetchMs?: number } = {}): FloorLive {
  const queryClient = useQueryClient();
  const queryKey = useMemo(() => ["floor", opts.areaId ?? "all"], [opts.areaId]);
  const query = useQuery({
    queryKey,
    queryFn: () => fetchFloor(opts.areaId),
    initialData: initial,
    initialDataUpdatedAt: initial.nowTs,
    refetchInterval: opts.refetchMs ?? 60_000,
    staleTime: 5_000,
  });
  const snapshot = query.data;

  // one store per page; nothing to dispose (its only timer fires once and stops)
  const store = useMemo(() => new LiveStore(initial.trendMs, 2_000, 150), [initial.trendMs]);
  const seeded = useRef<FloorSnapshot | null>(null);
  const resetNext = useRef(false);
  // seeding during render is safe: the store is outside React state and idempotent for repeats
  /* eslint-disable react-hooks/refs -- the refs only remember which snapshot was fed to the store; nothing rendered reads them */
  if (seeded.current !== snapshot) {
    if (resetNext.current) store.reset(snapshot.series);
    else store.ingest(snapshot.series);
    resetNext.current = false;
    seeded.current = snapshot;
  }
  /* eslint-enable react-hooks/refs */

  const refetchTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const refetchSoon = useCallback(() => {
    if (refetchTimer.current) return;
    refetchTimer.current = setTimeout(() => {
      refetchTimer.current = null;
      void queryClient.invalidateQueries({ queryKey });
    }, 1_000);
  }, [queryClient, queryKey]);
  useEffect(() => () => {
    if (refetchTimer.current) clearTimeout(refetchTimer.current);
  }, []);

  const stream = useLiveStream(opts.areaId !== undefined ? { scope: "area", id: opts.areaId } : { scope: "plant" }, store, {
    onAlert: refetchSoon,
    onReset: () => {
      resetNext.current = true;
      refetchSoon();
    },
  });
  const version = useSyncExternalStore(store.subscribe, store.getVersion, store.getVersion);
  const now = useNow(1_000, stream.clockOffsetMs, initial.nowTs);
  return { snapshot, store, stream, now, version };
}
