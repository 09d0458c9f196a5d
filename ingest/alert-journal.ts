// The alert owner's reader of `reading_journal` (one row per writer transaction, written with
// the readings it inserted; db/queries/readings-write.ts). Ids come from AUTO_INCREMENT, so a
// transaction that took a lower id may commit after a higher one: the reader takes every id
// above its floor it has not read yet, remembers those (seenAbove), and moves the floor up only
// over ids it has read. A missing id is waited for GAP_GIVE_UP_MS (a rolled-back transaction
// leaves a hole for ever). Floor and seenAbove are saved with the engine's rows, so a new owner
// reads exactly what the old one had not.
import { readJournalAfter, type JournalEntry } from "../db/queries/alert-owner";
import type { Db } from "../db/client";
import { CHANNELS } from "../lib/contract/readings-payload";

export const GAP_GIVE_UP_MS = 60_000;
const CHANNEL_SET: ReadonlySet<string> = new Set(CHANNELS);

export type JournalReading = { deviceId: number; channel: string; ts: number; value: number; historical: boolean };

export function decodeJournal(body: string): JournalReading[] {
  const out: JournalReading[] = [];
  for (const line of body.split("\n")) {
    const [d, channel, ts, value, flag] = line.split(",");
    const deviceId = Number(d);
    const tsNum = Number(ts);
    const v = Number(value);
    if (!Number.isInteger(deviceId) || !CHANNEL_SET.has(channel) || !Number.isFinite(tsNum) || !Number.isFinite(v)) continue;
    out.push({ deviceId, channel, ts: tsNum, value: v, historical: flag === "h" });
  }
  return out;
}

export type JournalPosition = { floor: number; seenAbove: number[] };

export class JournalReader {
  private floor: number;
  private readonly seen: Set<number>;
  private readonly gapSince = new Map<number, number>();

  constructor(
    private readonly db: Db,
    start: JournalPosition,
  ) {
    this.floor = start.floor;
    this.seen = new Set(start.seenAbove.filter((id) => id > start.floor));
  }

  position(): JournalPosition {
    return { floor: this.floor, seenAbove: [...this.seen].sort((a, b) => a - b) };
  }

  /** The next unread entries (in id order), marked read; the caller feeds them on at once. */
  async next(limit = 200, nowMs = Date.now()): Promise<JournalEntry[]> {
    const rows = await readJournalAfter(this.db, this.floor, limit + this.seen.size);
    const fresh = rows.filter((r) => !this.seen.has(r.id)).slice(0, limit);
    for (const r of fresh) this.seen.add(r.id);
    this.advance(nowMs);
    return fresh;
  }

  private advance(nowMs: number): void {
    if (this.seen.size === 0) return;
    const top = Math.max(...this.seen);
    for (let id = this.floor + 1; id <= top; id++) {
      if (this.seen.has(id)) {
        if (id === this.floor + 1) {
          this.floor = id;
          this.seen.delete(id);
        }
        continue;
      }
      // a hole: in flight or rolled back
      const since = this.gapSince.get(id) ?? nowMs;
      this.gapSince.set(id, since);
      if (id === this.floor + 1 && nowMs - since >= GAP_GIVE_UP_MS) {
        this.floor = id;
        this.gapSince.delete(id);
        continue;
      }
      if (id > this.floor + 1 && this.gapSince.size > 10_000) break;
    }
    for (const id of this.gapSince.keys()) if (id <= this.floor) this.gapSince.delete(id);
  }
}
