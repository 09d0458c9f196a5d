// Batches accepted readings into multi-row transactions (flush by size or after INGEST_FLUSH_MS,
// whichever comes first), retries with backoff while the database is away, spills to files past
// the memory bound, replays the spill files when the database is back, and acknowledges each
// MQTT message only after its readings are committed or spilled.
//
// Readings are split over a few lanes by device id; each lane commits one batch at a time, so
// a device's batches commit in arrival order and two lanes never touch the same rollup rows.
import type mysql from "mysql2/promise";
import { writeReadings, type ReadingRow, type WriteResult } from "../db/queries/readings-write";
import type { AckToken } from "./deferred-acks";
import type { Logger } from "./log";
import { describeError } from "./log";
import type { SpillStore } from "./spill";
import type { WorkerCounters } from "./stats";

/**
 * What the writer hands back once a message's readings are safe: an MQTT acknowledgement, or a
 * share of one (a Sparkplug message whose metrics feed several devices, hence several lanes,
 * is acknowledged when its last share is released).
 */
export type WriterAck = AckToken | { release(): void } | null;

export type WriterOptions = {
  flushMs: number;
  flushRows: number;
  lanes: number;
  memoryMaxReadings: number;
  maxUnacked: number;
  retryMaxMs: number;
  /** note committed rows in the reading journal for the alert owner (ALERTS_OWNER=lease) */
  journal?: boolean;
};

export type WriterHooks = {
  ack(tokens: ReadonlyArray<WriterAck>): void;
  committed(rows: ReadingRow[], source: "live" | "replay"): void;
  log: Logger;
  counters: WorkerCounters;
};

type Lane = {
  index: number;
  rows: ReadingRow[];
  acks: Array<WriterAck>;
  /** rows of each buffered message, parallel to acks (a message is committed whole) */
  msgRows: number[];
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
/** transactions a lane may have in flight at once */
const LANE_PIPELINE = 2;

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
      msgRows: [],
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
    // a message split into shares counts once, not once per share (per device it feeds)
    return Math.max(this.shareGroups, n - this.openShares + this.shareGroups);
  }

  /** shares handed out and not yet released, and the messages they belong to */
  private openShares = 0;
  private shareGroups = 0;

  /**
   * Splits one message's acknowledgement into `parts` shares, one per device its readings feed
   * (hence possibly several lanes); `done` runs when the last share is released, i.e. when every
   * part is committed or spilled.
   */
  shareAck(parts: number, done: () => void): Array<{ release(): void }> {
    let left = parts;
    this.openShares += parts;
    this.shareGroups++;
    const share = {
      release: () => {
        this.openShares--;
        if (--left === 0) {
          this.shareGroups--;
          done();
        }
      },
    };
    return Array.from({ length: parts }, () => share);
  }

  /** Takes one message's accepted readings (all of one device) and its acknowledgement. */
  add(deviceId: number, rows: readonly ReadingRow[], ack: WriterAck): void {
    const lane = this.lanes[deviceId % this.lanes.length];
    for (const r of rows) lane.rows.push(r);
    lane.acks.push(ack);
    lane.msgRows.push(rows.length);
    if (lane.firstRowTs === null) lane.firstRowTs = Date.now();
    if (lane.rows.length >= this.opts.flushRows) this.kick(lane);
    else if (!lane.running && !lane.timer) lane.timer = setTimeout(() => this.onTimer(lane), this.opts.flushMs);
    // past the memory bound: spill when the database is away (or the backlog is twice the
    // bound); while it is merely slow the worker pauses reading instead (see waitForRoom)
    if (this.overBound(1) && (!this.hooks.counters.dbHealthy || this.overBound(2))) void this.spillBuffers();
  }

  /** Whether more than `factor` times the memory bound is held unacknowledged. */
  overBound(factor = 1): boolean {
    return this.bufferedReadings >= this.opts.memoryMaxReadings * factor || this.unackedMessages >= this.opts.maxUnacked * factor;
  }

  /**
   * Resolves when there is room below the memory bound again, when the database turns out to be
   * away (then spilling takes over), or after `maxWaitMs` (the broker drops a client that stops
   * reading for a minute). The worker waits on this before taking the next message.
   */
  waitForRoom(maxWaitMs: number): Promise<void> {
    if (!this.overBound(1) || !this.hooks.counters.dbHealthy) return Promise.resolve();
    return new Promise((resolve) => {
      const waiter = () => {
        clearTimeout(timer);
        resolve();
      };
      const timer = setTimeout(() => {
        this.roomWaiters = this.roomWaiters.filter((w) => w !== waiter);
        resolve();
      }, maxWaitMs);
      this.roomWaiters.push(waiter);
    });
  }

  private roomWaiters: Array<() => void> = [];

  private releaseWaiters(): void {
    if (this.roomWaiters.length === 0) return;
    if (this.overBound(0.5) && this.hooks.counters.dbHealthy && !this.closing) return;
    for (const w of this.roomWaiters.splice(0)) w();
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
    type Job = { rows: ReadingRow[]; acks: Array<WriterAck>; msgRows: number[]; firstRowTs: number | null; result: Promise<WriteResult | null> };
    const pending: Job[] = [];
    const start = () => {
      // at most about two batches per transaction: a backlog is written in steady steps
      const chunk = this.takeChunk(lane, this.opts.flushRows * 2);
      const firstRowTs = lane.firstRowTs;
      lane.firstRowTs = lane.rows.length > 0 ? Date.now() : null;
      lane.inFlightRows += chunk.rows.length;
      lane.inFlightAcks += chunk.acks.length;
      pending.push({ ...chunk, firstRowTs, result: this.write(chunk.rows, "live") });
    };
    try {
      for (;;) {
        // the first write as soon as rows wait; a second one alongside only for a full batch, so
        // building the next statement overlaps the database's work on the previous one
        lane.again = false;
        while (!this.closing && pending.length < LANE_PIPELINE && lane.rows.length > 0 && (pending.length === 0 || lane.rows.length >= this.opts.flushRows)) {
          start();
        }
        if (pending.length === 0) break;
        // results are taken in the order the writes started: acknowledgements and sinks see a
        // device's readings in order
        const job = pending.shift()!;
        const res = await job.result;
        lane.inFlightRows -= job.rows.length;
        lane.inFlightAcks -= job.acks.length;
        if (res) {
          this.deliver(res, job.acks, "live");
          lane.backoffMs = 0;
          if (pending.length === 0 && lane.rows.length < this.opts.flushRows && !lane.again) break;
          continue;
        }
        // failed: settle the others, keep what committed, put the rest back in front in order
        const failed = [job];
        for (const other of pending.splice(0)) {
          const r = await other.result;
          lane.inFlightRows -= other.rows.length;
          lane.inFlightAcks -= other.acks.length;
          if (r) this.deliver(r, other.acks, "live");
          else failed.push(other);
        }
        lane.rows = failed.flatMap((f) => f.rows).concat(lane.rows);
        lane.acks = failed.flatMap((f) => f.acks).concat(lane.acks);
        lane.msgRows = failed.flatMap((f) => f.msgRows).concat(lane.msgRows);
        lane.firstRowTs = failed[0].firstRowTs ?? lane.firstRowTs;
        if (this.overBound(1)) await this.spillBuffers();
        if (this.closing) break;
        lane.backoffMs = Math.min(this.opts.retryMaxMs, Math.max(100, lane.backoffMs * 2));
        await this.sleep(lane, lane.backoffMs);
      }
    } finally {
      lane.running = false;
      if (lane.rows.length > 0 && !this.closing && !lane.timer) {
        const due = (lane.firstRowTs ?? Date.now()) + this.opts.flushMs - Date.now();
        lane.timer = setTimeout(() => this.onTimer(lane), Math.max(0, due));
      }
    }
  }

  /** Takes whole messages from the front of the lane until about `maxRows` rows. */
  private takeChunk(lane: Lane, maxRows: number): { rows: ReadingRow[]; acks: Array<WriterAck>; msgRows: number[] } {
    if (lane.rows.length <= maxRows) {
      const taken = { rows: lane.rows, acks: lane.acks, msgRows: lane.msgRows };
      lane.rows = [];
      lane.acks = [];
      lane.msgRows = [];
      return taken;
    }
    let n = 0;
    let m = 0;
    while (m < lane.msgRows.length && n < maxRows) n += lane.msgRows[m++];
    const taken = { rows: lane.rows.slice(0, n), acks: lane.acks.slice(0, m), msgRows: lane.msgRows.slice(0, m) };
    lane.rows = lane.rows.slice(n);
    lane.acks = lane.acks.slice(m);
    lane.msgRows = lane.msgRows.slice(m);
    return taken;
  }

  /** One transaction; true when committed (and acknowledged). */
  private async commit(rows: ReadingRow[], acks: ReadonlyArray<WriterAck>, source: "live" | "replay"): Promise<boolean> {
    const res = await this.write(rows, source);
    if (res) this.deliver(res, acks, source);
    return res !== null;
  }

  /** Writes rows in one transaction; the result, or null when the database failed. */
  private async write(rows: ReadingRow[], source: "live" | "replay"): Promise<WriteResult | null> {
    const c = this.hooks.counters;
    const t0 = performance.now();
    try {
      const res = await writeReadings(this.pool, rows, { journal: this.opts.journal });
      const now = Date.now();
      c.countFlush(rows.length, res.inserted.length, res.duplicates, performance.now() - t0, now);
      if (source === "live") {
        const ts = new Array<number>(rows.length);
        for (let i = 0; i < rows.length; i++) ts[i] = rows[i].ts;
        c.countLag(now, ts);
      }
      if (!c.dbHealthy) this.hooks.log.info("database is back; writing again");
      c.dbHealthy = true;
      return res;
    } catch (err) {
      c.flushFailures++;
      c.dbHealthy = false;
      this.releaseWaiters();
      const now = Date.now();
      if (now - this.lastFailureLog > 5000) {
        this.lastFailureLog = now;
        this.hooks.log.warn("could not write readings; keeping them and retrying", {
          error: describeError(err),
          buffered: this.bufferedReadings,
          spilled: c.spilledReadings,
        });
      }
      return null;
    }
  }

  /** After a commit: acknowledge its messages, then hand the new rows on. */
  private deliver(res: WriteResult, acks: ReadonlyArray<WriterAck>, source: "live" | "replay"): void {
    this.hooks.ack(acks);
    this.releaseWaiters();
    if (res.inserted.length > 0) this.hooks.committed(res.inserted, source);
    if (source === "live" && !this.replaying && this.hooks.counters.spillPendingReadings > 0) void this.replay();
  }

  /** Moves every buffered (not in-flight) reading to a spill file, then acknowledges them. */
  private async spillBuffers(): Promise<void> {
    if (this.spilling) return;
    const rows: ReadingRow[] = [];
    const acks: Array<WriterAck> = [];
    const taken: Array<{ lane: Lane; rows: ReadingRow[]; acks: Array<WriterAck>; msgRows: number[]; firstRowTs: number | null }> = [];
    for (const lane of this.lanes) {
      if (lane.rows.length === 0) continue;
      taken.push({ lane, rows: lane.rows, acks: lane.acks, msgRows: lane.msgRows, firstRowTs: lane.firstRowTs });
      for (const r of lane.rows) rows.push(r);
      for (const a of lane.acks) acks.push(a);
      lane.rows = [];
      lane.acks = [];
      lane.msgRows = [];
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
      this.releaseWaiters();
      this.hooks.log.info("spilled readings to a file", { readings: rows.length, file });
    } catch (err) {
      this.hooks.log.error("could not spill readings to a file; keeping them in memory", { error: describeError(err) });
      for (const t of taken) {
        t.lane.rows = t.rows.concat(t.lane.rows);
        t.lane.acks = t.acks.concat(t.lane.acks);
        t.lane.msgRows = t.msgRows.concat(t.lane.msgRows);
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
    for (const w of this.roomWaiters.splice(0)) w();
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
    const acks: Array<WriterAck> = [];
    for (const lane of this.lanes) {
      for (const r of lane.rows) rows.push(r);
      for (const a of lane.acks) acks.push(a);
      lane.rows = [];
      lane.acks = [];
      lane.msgRows = [];
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
