// The alert owner's engine state (an EngineStateStore for ingest/alerts-runner.ts):
// - save: inside the transaction that writes the alert transitions, checks the fencing token
//   (a stale owner's writes are refused), writes the rows of the rules and subjects whose
//   hysteresis changed since the last committed save (phase, delays, the open alert; a few
//   hundred bytes each, instead of the whole engine), and the journal position the engine has
//   read up to. All or nothing, so the rows and the position always agree.
// - load: a new owner rebuilds the windows by replaying the journal of the last ALERTS_WARMUP_MS
//   up to the saved position (transitions ignored), then lays the saved rows over the result.
//   It then reads on from that position, so what the old owner had not saved is evaluated again
//   from the same state (the engine works on reading time) and what it had saved is not. With no
//   saved position (no owner has saved yet, e.g. the first one was killed within its first
//   second) it reads the whole journal kept.
import type { Db } from "../db/client";
import { assertLeaseHeld, loadEngineRows, journalStartFloor, readJournalForWarmUp, readProgress, writeEngineRows, writeProgress, type EngineRow } from "../db/queries/alert-owner";
import { CHANNELS, createRuleEngine, type Channel, type RuleEngine } from "../lib/rules";
import { hysteresisStateSchema } from "../lib/rules/engine-state";
import type { EngineStateStore } from "./alerts-runner";
import { decodeJournal, type JournalPosition } from "./alert-journal";
import type { Logger } from "./log";

export const OWNER_LEASE = "alerts";
const WARM_UP_MAX_ENTRIES = 20_000;
const CHANNEL_SET: ReadonlySet<string> = new Set(CHANNELS);
const isChannel = (c: string): c is Channel => CHANNEL_SET.has(c);
const rowKey = (ruleId: number, subjectKey: string) => `${ruleId}|${subjectKey}`;

export type StoreDeps = {
  db: Db;
  log: Logger;
  token: number;
  warmUpMs: number;
  /** the journal position the engine has read up to, right now */
  position(): JournalPosition & { readingTs: number };
  codeOf(deviceId: number): string | undefined;
};

export class AlertEngineRows implements EngineStateStore {
  private committed = new Map<string, string>();
  private attempt: { stamp: number; rows: Map<string, string> } | null = null;
  private lastStamp = 0;
  /** where the engine starts reading (set by load) */
  start: JournalPosition & { readingTs: number } = { floor: 0, seenAbove: [], readingTs: 0 };

  constructor(private readonly deps: StoreDeps) {}

  async load({ rules, topology }: Parameters<EngineStateStore["load"]>[0]): Promise<unknown> {
    const { db, log } = this.deps;
    const [rows, progress] = await Promise.all([loadEngineRows(db), readProgress(db, OWNER_LEASE)]);
    this.lastStamp = progress?.updatedTs ?? 0;
    const seenAbove = progress ? parseIds(progress.seenAbove) : [];
    // no owner has saved a position yet: nobody has evaluated what the journal holds, so the
    // engine reads all of it (in reading time, raising what it finds) rather than warming up on it
    this.start = progress
      ? { floor: progress.journalId, seenAbove, readingTs: progress.readingTs }
      : { floor: await journalStartFloor(db), seenAbove: [], readingTs: 0 };

    // windows: replay the recent journal the previous owner had read (transitions ignored)
    const engine = createRuleEngine({ rules, topology });
    const sinceTs = Date.now() - this.deps.warmUpMs;
    const entries = this.deps.warmUpMs > 0 ? await readJournalForWarmUp(db, sinceTs, this.start.floor, this.start.seenAbove, WARM_UP_MAX_ENTRIES) : [];
    const readings = entries.flatMap((e) => decodeJournal(e.body)).filter((r) => !r.historical);
    readings.sort((a, b) => a.ts - b.ts);
    for (const r of readings) {
      const code = this.deps.codeOf(r.deviceId);
      if (code && isChannel(r.channel)) engine.push({ sensorKey: code, channel: r.channel, ts: r.ts, value: r.value });
    }
    const state = engine.snapshot();

    // hysteresis: the saved rows win
    const saved = new Map(rows.map((r) => [rowKey(r.ruleId, r.subjectKey), r]));
    let laid = 0;
    for (const ev of state.evaluators) {
      const row = saved.get(rowKey(ev.ruleId, ev.subjectKey));
      if (!row || row.ruleVersion !== ev.ruleVersion) continue;
      const h = hysteresisStateSchema.safeParse(JSON.parse(row.state));
      if (!h.success) continue;
      ev.h = h.data;
      laid++;
      this.committed.set(rowKey(ev.ruleId, ev.subjectKey), row.state);
    }
    log.info("alert owner rebuilt the engine", { warmUpReadings: readings.length, savedRows: rows.length, rowsApplied: laid, journalFrom: this.start.floor });
    return state;
  }

  async save(tx: Parameters<EngineStateStore["save"]>[0], engine: RuleEngine, nowMs: number): Promise<void> {
    await assertLeaseHeld(tx, OWNER_LEASE, this.deps.token);
    // did the previous save commit? (its stamp is in the progress row only if it did)
    const progress = await readProgress(tx, OWNER_LEASE);
    if (this.attempt && progress?.updatedTs === this.attempt.stamp) for (const [k, v] of this.attempt.rows) this.committed.set(k, v);
    this.attempt = null;

    const changed: EngineRow[] = [];
    const rows = new Map<string, string>();
    for (const ev of engine.snapshot().evaluators) {
      const key = rowKey(ev.ruleId, ev.subjectKey);
      const state = JSON.stringify(ev.h);
      if (this.committed.get(key) === state) continue;
      changed.push({ ruleId: ev.ruleId, subjectKey: ev.subjectKey, ruleVersion: ev.ruleVersion, state });
      rows.set(key, state);
    }
    if (changed.length) await writeEngineRows(tx, changed, this.deps.token, nowMs);
    const stamp = Math.max(nowMs, this.lastStamp + 1, (progress?.updatedTs ?? 0) + 1);
    this.lastStamp = stamp;
    const pos = this.deps.position();
    await writeProgress(tx, OWNER_LEASE, { journalId: pos.floor, seenAbove: JSON.stringify(pos.seenAbove), readingTs: pos.readingTs, updatedTs: stamp, token: this.deps.token });
    this.attempt = { stamp, rows };
  }
}

function parseIds(text: string): number[] {
  try {
    const v: unknown = JSON.parse(text);
    return Array.isArray(v) ? v.filter((x): x is number => Number.isInteger(x)) : [];
  } catch {
    return [];
  }
}
