// Batches accepted readings into multi-row transactions (flush by size or after INGEST_FLUSH_MS,
// whichever comes first), retries with backoff while the database is away, spills to files past
// the memory bound, replays the spill files when the database is back, and acknowledges each
// MQTT message only after its readings are committed or spilled.
//
// Readings are split over a few lanes by device id; each lane commits one batch at a time, so
// a device's batches commit in arrival order and two lanes never touch the same rollup rows.
import type mysql from "mysql2/promise";
import { writeReadings, type ReadingRow } from "../db/queries/readings-write";
import type { AckToken } from "./deferred-acks";
import type { Logger } from "./log";
import { describeError } from "./log";
import type { SpillStore } from "./spill";
import type { WorkerCounters } from "./stats";

export type WriterOptions = {
  flushMs: number;
  flushRows: number;
  lanes: number;
  memoryMaxReadings: number;
  maxUnacked: number;
  retryMaxMs: number;
};

export type WriterHooks = {
  ack(tokens: ReadonlyArray<AckToken | null>): void;
  committed(rows: ReadingRow[], source: "live" | "replay"): void;
  log: Logger;
  counters: WorkerCounters;
};

type Lane = {
  index: number;
  rows: ReadingRow[];
  acks: Array<AckToken | null>;
  firstRowTs: number | null;
  timer: NodeJS.Timeout | null;
  running: boolean;
  again: boolean;
  inFlightRows: number;
  inFlightAcks: number;
  backoffMs: number;
  wake: (() => void) | null;
};

const REPLAY_CHUNK = 10_000;

export class ReadingWriter {
  private readonly lanes: Lane[];
  private spilling = false;
  private replaying = false;
  private closing = false;
  private replayTimer: NodeJS.Timeout | null = null;
  private lastFailureLog = 0;

  constructor(
    private readonly pool: mysql.Pool,
    private readonly spill: SpillStore,
    private readonly opts: WriterOptions,
    private readonly hooks: WriterHooks,
  ) {
    this.lanes = Array.from({ length: opts.lanes }, (_, index) => ({
      index,
      rows: [],
      acks: [],
      firstRowTs: null,
      timer: null,
      running: false,
      again: false,
      inFlightRows: 0,
      inFlightAcks: 0,
      backoffMs: 0,
      wake: null,
    }));
    hooks.counters.spillPendingReadings = spill.pendingRows();
  }

  get bufferedReadings(): number {
    let n = 0;
    for (const l of this.lanes) n += l.rows.length + l.inFlightRows;
    return n;
  }

  get unackedMessages(): number {
    let n = 0;
    for (const l of this.lanes) n += l.acks.length + l.inFlightAcks;
    return n;
  }

  /** Takes one message's accepted readings (all of one device) and its acknowledgement. */
  add(deviceId: number, rows: readonly ReadingRow[], ack: AckToken | null): void {
    const lane = this.lanes[deviceId % this.lanes.length];
    for (const r of rows) lane.rows.push(r);
    lane.acks.push(ack);
    if (lane.firstRowTs === null) lane.firstRowTs = Date.now();
    if (lane.rows.length >= this.opts.flushRows) this.kick(lane);
    else if (!lane.running && !lane.timer) lane.timer = setTimeout(() => this.onTimer(lane), this.opts.flushMs);
    if (this.bufferedReadings >= this.opts.memoryMaxReadings || this.unackedMessages >= this.opts.maxUnacked) void this.spillBuffers();
  }

  private onTimer(lane: Lane) {
    lane.timer = null;
    this.kick(lane);
  }

  private kick(lane: Lane) {
    if (this.closing) return;
    if (lane.running) {
      lane.again = true;
      return;
    }
    if (lane.timer) {
      clearTimeout(lane.timer);
      lane.timer = null;
    }
    void this.runLane(lane);
  }

  private sleep(lane: Lane, ms: number): Promise<void> {
    return new Promise((resolve) => {
      const t = setTimeout(() => {
        lane.wake = null;
        resolve();
      }, ms);
      lane.wake = () => {
        clearTimeout(t);
        lane.wake = null;
        resolve();
      };
    });
  }

  private async runLane(lane: Lane): Promise<void> {
    lane.running = true;
    try {
      while (lane.rows.length > 0 && !this.closing) {
        const rows = lane.rows;
        const acks = lane.acks;
        const firstRowTs = lane.firstRowTs;
        lane.rows = [];
        lane.acks = [];
        lane.firstRowTs = null;
        lane.inFlightRows = rows.length;
        lane.inFlightAcks = acks.length;
        lane.again = false;
        const ok = await this.commit(rows, acks, "live");
        lane.inFlightRows = 0;
        lane.inFlightAcks = 0;
        if (!ok) {
          // back in front of anything that arrived meanwhile, then wait and try again
          lane.rows = rows.concat(lane.rows);
          lane.acks = acks.concat(lane.acks);
          lane.firstRowTs = firstRowTs ?? lane.firstRowTs;
          if (this.bufferedReadings >= this.opts.memoryMaxReadings || this.unackedMessages >= this.opts.maxUnacked) {
            await this.spillBuffers();
          }
          if (this.closing) break;
          lane.backoffMs = Math.min(this.opts.retryMaxMs, Math.max(100, lane.backoffMs * 2));
          await this.sleep(lane, lane.backoffMs);
          continue;
        }
        lane.backoffMs = 0;
        // keep going at once only when a full batch is waiting (or the timer fired meanwhile)
        if (lane.rows.length < this.opts.flushRows && !lane.again) break;
      }
    } finally {
      lane.running = false;
      if (lane.rows.length > 0 && !this.closing && !lane.timer) {
        const due = (lane.firstRowTs ?? Date.now()) + this.opts.flushMs - Date.now();
        lane.timer = setTimeout(() => this.onTimer(lane), Math.max(0, due));
      }
    }
  }

  /** One transaction; true when committed (and acknowledged). */
  private async commit(rows: ReadingRow[], acks: ReadonlyArray<AckToken | null>, source: "live" | "replay"): Promise<boolean> {
    const c = this.hooks.counters;
    const t0 = performance.now();
    try {
      const res = await writeReadings(this.pool, rows);
      const now = Date.now();
      c.countFlush(rows.length, res.inserted.length, res.duplicates, performance.now() - t0, now);
      if (source === "live") {
        const ts = new Array<number>(rows.length);
        for (let i = 0; i < rows.length; i++) ts[i] = rows[i].ts;
        c.countLag(now, ts);
      }
      if (!c.dbHealthy) this.hooks.log.info("database is back; writing again");
      c.dbHealthy = true;
      this.hooks.ack(acks);
      if (res.inserted.length > 0) this.hooks.committed(res.inserted, source);
      if (source === "live" && !this.replaying && c.spillPendingReadings > 0) void this.replay();
      return true;
    } catch (err) {
      c.flushFailures++;
      c.dbHealthy = false;
      const now = Date.now();
      if (now - this.lastFailureLog > 5000) {
        this.lastFailureLog = now;
        this.hooks.log.warn("could not write readings; keeping them and retrying", {
          error: describeError(err),
          buffered: this.bufferedReadings,
          spilled: c.spilledReadings,
        });
      }
      return false;
    }
  }

  /** Moves every buffered (not in-flight) reading to a spill file, then acknowledges them. */
  private async spillBuffers(): Promise<void> {
    if (this.spilling) return;
    const rows: ReadingRow[] = [];
    const acks: Array<AckToken | null> = [];
    const taken: Array<{ lane: Lane; rows: ReadingRow[]; acks: Array<AckToken | null>; firstRowTs: number | null }> = [];
    for (const lane of this.lanes) {
      if (lane.rows.length === 0) continue;
      taken.push({ lane, rows: lane.rows, acks: lane.acks, firstRowTs: lane.firstRowTs });
      for (const r of lane.rows) rows.push(r);
      for (const a of lane.acks) acks.push(a);
      lane.rows = [];
      lane.acks = [];
      lane.firstRowTs = null;
    }
    if (rows.length === 0) return;
    this.spilling = true;
    const c = this.hooks.counters;
    try {
      const file = await this.spill.write(rows);
      c.spilledReadings += rows.length;
      c.spillFiles++;
      c.spillPendingReadings += rows.length;
      this.hooks.ack(acks);
      this.hooks.log.info("spilled readings to a file", { readings: rows.length, file });
    } catch (err) {
      this.hooks.log.error("could not spill readings to a file; keeping them in memory", { error: describeError(err) });
      for (const t of taken) {
        t.lane.rows = t.rows.concat(t.lane.rows);
        t.lane.acks = t.acks.concat(t.lane.acks);
        t.lane.firstRowTs = t.firstRowTs ?? t.lane.firstRowTs;
      }
    } finally {
      this.spilling = false;
    }
  }

  /** Writes spill files back, oldest first; retried later if the database fails again. */
  async replay(): Promise<void> {
    if (this.replaying || this.closing) return;
    this.replaying = true;
    const c = this.hooks.counters;
    try {
      for (;;) {
        const files = this.spill.list();
        if (files.length === 0) break;
        for (const file of files) {
          const { rows, bad } = await this.spill.read(file);
          if (bad > 0) this.hooks.log.warn("skipped unreadable lines in a spill file", { file, bad });
          for (let i = 0; i < rows.length; i += REPLAY_CHUNK) {
            if (this.closing) return;
            const chunk = rows.slice(i, i + REPLAY_CHUNK);
            if (!(await this.commit(chunk, [], "replay"))) throw new Error("database unavailable during replay");
            c.replayedReadings += chunk.length;
          }
          await this.spill.remove(file);
          c.spillPendingReadings = this.spill.pendingRows();
          this.hooks.log.info("replayed a spill file", { file, readings: rows.length });
        }
      }
      c.spillPendingReadings = 0;
    } catch (err) {
      this.hooks.log.warn("spill replay paused", { error: describeError(err) });
      if (!this.closing && !this.replayTimer) {
        this.replayTimer = setTimeout(() => {
          this.replayTimer = null;
          void this.replay();
        }, this.opts.retryMaxMs);
      }
    } finally {
      this.replaying = false;
    }
  }

  /**
   * Stops batching and makes everything buffered safe: one last commit, or a spill file when
   * the database is away. In-flight batches are awaited until the deadline; whatever is still
   * unacknowledged then is re-sent by the broker to the next worker session.
   */
  async drain(timeoutMs: number): Promise<void> {
    this.closing = true;
    const deadline = Date.now() + timeoutMs;
    if (this.replayTimer) clearTimeout(this.replayTimer);
    for (const lane of this.lanes) {
      if (lane.timer) clearTimeout(lane.timer);
      lane.timer = null;
      lane.wake?.();
    }
    while ((this.lanes.some((l) => l.running) || this.replaying || this.spilling) && Date.now() < deadline) {
      await new Promise((r) => setTimeout(r, 20));
    }
    const rows: ReadingRow[] = [];
    const acks: Array<AckToken | null> = [];
    for (const lane of this.lanes) {
      for (const r of lane.rows) rows.push(r);
      for (const a of lane.acks) acks.push(a);
      lane.rows = [];
      lane.acks = [];
    }
    if (rows.length === 0) return;
    const remaining = Math.max(500, deadline - Date.now());
    const committed = await Promise.race([
      this.commit(rows, acks, "live"),
      new Promise<false>((r) => setTimeout(() => r(false), remaining).unref()),
    ]);
    if (committed) return;
    try {
      await this.spill.write(rows);
      this.hooks.counters.spilledReadings += rows.length;
      this.hooks.ack(acks);
      this.hooks.log.info("spilled the remaining readings before exit", { readings: rows.length });
    } catch (err) {
      this.hooks.log.error("could not spill before exit; the broker will re-send what was not acknowledged", { error: describeError(err) });
    }
  }
}
