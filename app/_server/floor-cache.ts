// The Floor's snapshot, shared by every screen this app process serves: built at most once per
// FLOOR_CACHE_MS (per hall, or the whole plant) and serialised once, so fifty open Floors and
// wallboards cost one set of queries a second instead of fifty. Requests that arrive while it is
// being built wait for the same build. Each app instance keeps its own (several may run side by
// side); nothing in it is per-person — the permission is checked by the caller before asking.
import "server-only";
import { getDb, getReadDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { getFloorSnapshot } from "@/db/queries/floor";
import type { FloorSnapshot } from "@/lib/views/floor";

export type CachedFloor = { snapshot: FloorSnapshot; json: string };

type Entry = { expiresTs: number; value: Promise<CachedFloor> };

const holder = globalThis as unknown as { __stillfieldFloorCache?: Map<string, Entry> };

async function build(areaId: number | undefined): Promise<CachedFloor> {
  const snapshot = await getFloorSnapshot(getDb(), { areaId, trendDb: await getReadDb() });
  return { snapshot, json: JSON.stringify(snapshot) };
}

/** The Floor's snapshot for the whole plant (no areaId) or one hall, at most FLOOR_CACHE_MS old. */
export function getCachedFloor(areaId?: number): Promise<CachedFloor> {
  const ttlMs = getEnv().FLOOR_CACHE_MS;
  if (ttlMs === 0) return build(areaId);
  const cache = (holder.__stillfieldFloorCache ??= new Map());
  const key = areaId === undefined ? "all" : String(areaId);
  const now = Date.now();
  const hit = cache.get(key);
  if (hit && hit.expiresTs > now) return hit.value;
  const value = build(areaId);
  // an area id that does not exist is cached too (briefly); a failed build is not kept
  cache.set(key, { expiresTs: now + ttlMs, value });
  value.catch(() => {
    if (cache.get(key)?.value === value) cache.delete(key);
  });
  if (cache.size > 200) for (const [k, e] of cache) if (e.expiresTs <= now) cache.delete(k);
  return value;
}
