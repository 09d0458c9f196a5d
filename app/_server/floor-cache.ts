// The Floor's snapshot, shared by every screen this app process serves: built at most once per
// FLOOR_CACHE_MS (per hall, or the whole plant) and serialised and encoded once, so fifty open Floors and
// wallboards cost one set of queries a second instead of fifty. Once it has aged past
// FLOOR_CACHE_MS, one request starts the next build and every request meanwhile is answered at
// once with the one before (stale while it is rebuilt), as long as that one is under
// STALE_SERVE_FACTOR × FLOOR_CACHE_MS old; only a first build, or one that fell too far behind,
// is waited for (by every request at once, one build). The Floor's live stream keeps values
// current between snapshots anyway. Each app instance keeps its own (several may run side by
// side); nothing in it is per-person — the permission is checked by the caller before asking.
import "server-only";
import { getDb, getReadDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { getFloorSnapshot } from "@/db/queries/floor";
import type { FloorSnapshot } from "@/lib/views/floor";

/** The snapshot and its JSON, encoded once: every screen gets the same bytes. */
export type CachedFloor = { snapshot: FloorSnapshot; body: Uint8Array<ArrayBuffer> };

/** How much older than FLOOR_CACHE_MS a snapshot may be served while the next is built. */
const STALE_SERVE_FACTOR = 3;
const MAX_ENTRIES = 200;

type Entry = { last: CachedFloor | null; lastTs: number; pending: Promise<CachedFloor> | null };

const holder = globalThis as unknown as { __stillfieldFloorCache?: Map<string, Entry> };

async function build(areaId: number | undefined): Promise<CachedFloor> {
  const snapshot = await getFloorSnapshot(getDb(), { areaId, trendDb: await getReadDb() });
  return { snapshot, body: new TextEncoder().encode(JSON.stringify(snapshot)) };
}

/** The Floor's snapshot for the whole plant (no areaId) or one hall, at most FLOOR_CACHE_MS old (or being rebuilt). */
export function getCachedFloor(areaId?: number): Promise<CachedFloor> {
  const ttlMs = getEnv().FLOOR_CACHE_MS;
  if (ttlMs === 0) return build(areaId);
  const cache = (holder.__stillfieldFloorCache ??= new Map());
  const key = areaId === undefined ? "all" : String(areaId);
  const now = Date.now();
  let e = cache.get(key);
  if (!e) {
    if (cache.size >= MAX_ENTRIES) for (const [k, old] of cache) if (!old.pending && now - old.lastTs > ttlMs * STALE_SERVE_FACTOR) cache.delete(k);
    e = { last: null, lastTs: 0, pending: null };
    cache.set(key, e);
  }
  const entry = e;
  if (entry.last && now - entry.lastTs < ttlMs) return Promise.resolve(entry.last);
  if (!entry.pending) {
    const startedTs = now;
    // a failed build is not kept: the next request tries again
    entry.pending = build(areaId).then(
      (value) => {
        entry.last = value;
        entry.lastTs = startedTs;
        entry.pending = null;
        return value;
      },
      (err: unknown) => {
        entry.pending = null;
        throw err;
      },
    );
  }
  if (entry.last && now - entry.lastTs < ttlMs * STALE_SERVE_FACTOR) {
    entry.pending.catch(() => undefined); // its failure is the next request's to see
    return Promise.resolve(entry.last);
  }
  return entry.pending;
}
