// Counters of the ingest worker, shown on /health and written to `ingest_status`.
import type { WorkerStats } from "../db/queries/ingest-diagnostics";
import type { RejectionReason } from "../lib/contract/readings-payload";
import type { WorkerAlertsRole } from "../lib/views/health";
import { RateWindow } from "../lib/rate-window";

/** Percentile of an unsorted sample by nearest rank (null when empty). */
export function percentile(values: ArrayLike<number>, p: number): number | null {
  if (values.length === 0) return null;
  const sorted = Float64Array.from(values).sort();
  const rank = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[rank];
}

/** A fixed-size ring of numbers (the newest `size` samples). */
class Ring {
  private readonly data: Float64Array;
  private next = 0;
  private filled = 0;
  constructor(size: number) {
    this.data = new Float64Array(size);
  }
  push(v: number) {
    this.data[this.next] = v;
    this.next = (this.next + 1) % this.data.length;
    if (this.filled < this.data.length) this.filled++;
  }
  values(): Float64Array {
    return this.data.subarray(0, this.filled);
  }
}

/** Publish-to-commit lag samples with their commit time, so a window can be asked for. */
class LagWindow {
  private readonly at: Float64Array;
  private readonly lag: Float32Array;
  private next = 0;
  private filled = 0;
  constructor(size: number) {
    this.at = new Float64Array(size);
    this.lag = new Float32Array(size);
  }
  push(commitTs: number, lagMs: number) {
    this.at[this.next] = commitTs;
    this.lag[this.next] = lagMs;
    this.next = (this.next + 1) % this.at.length;
    if (this.filled < this.at.length) this.filled++;
  }
  since(fromTs: number): number[] {
    const out: number[] = [];
    for (let i = 0; i < this.filled; i++) if (this.at[i] >= fromTs) out.push(this.lag[i]);
    return out;
  }
}

type DeviceCounters = { messages: number; readings: number; rejected: number; lastMessageTs: number | null; buckets: number[]; bucketStart: number };
const BUCKET_MS = 10_000;
const BUCKETS = 6;

export class WorkerCounters {
  readonly startedTs = Date.now();
  mqttConnected = false;
  dbHealthy = true;
  acceptedMessages = 0;
  acceptedReadings = 0;
  committedReadings = 0;
  duplicateReadings = 0;
  rejectedTotal = 0;
  readonly rejectedByReason: Partial<Record<RejectionReason, number>> = {};
  spilledReadings = 0;
  spillFiles = 0;
  spillPendingReadings = 0;
  replayedReadings = 0;
  flushes = 0;
  flushFailures = 0;
  lastFlushTs: number | null = null;
  lastFlushRows = 0;
  sinkErrors: Record<string, number> = {};
  sinkDropped: Record<string, number> = {};
  private readonly flushMs = new Ring(2000);
  private readonly lag = new LagWindow(250_000);
  private readonly devices = new Map<string, DeviceCounters>();
  private readonly committedRate = new RateWindow(Date.now());
  private readonly messageRate = new RateWindow(Date.now());

  /** alerts: the worker's part in alerting, for the Health page (the settings' default: local) */
  constructor(
    readonly workerId: string,
    readonly alerts: WorkerAlertsRole = "local",
  ) {}

  private device(code: string, now: number): DeviceCounters {
    let d = this.devices.get(code);
    if (!d) {
      d = { messages: 0, readings: 0, rejected: 0, lastMessageTs: null, buckets: new Array(BUCKETS).fill(0), bucketStart: Math.floor(now / BUCKET_MS) * BUCKET_MS };
      this.devices.set(code, d);
    }
    // rotate the one-minute message window
    const start = Math.floor(now / BUCKET_MS) * BUCKET_MS;
    const steps = Math.min(BUCKETS, Math.max(0, (start - d.bucketStart) / BUCKET_MS));
    for (let i = 0; i < steps; i++) {
      d.buckets.shift();
      d.buckets.push(0);
    }
    if (steps > 0) d.bucketStart = start;
    return d;
  }

  countMessage(code: string, readings: number, now: number) {
    this.acceptedMessages++;
    this.acceptedReadings += readings;
    this.messageRate.add(1, now);
    const d = this.device(code, now);
    d.messages++;
    d.readings += readings;
    d.lastMessageTs = now;
    d.buckets[BUCKETS - 1]++;
  }

  countRejection(code: string | null, reason: RejectionReason, now: number) {
    this.rejectedTotal++;
    this.rejectedByReason[reason] = (this.rejectedByReason[reason] ?? 0) + 1;
    if (code) {
      const d = this.device(code, now);
      d.rejected++;
      d.lastMessageTs = now;
    }
  }

  countFlush(rows: number, inserted: number, duplicates: number, ms: number, now: number) {
    this.flushes++;
    this.flushMs.push(ms);
    this.lastFlushTs = now;
    this.lastFlushRows = rows;
    this.committedReadings += inserted;
    this.committedRate.add(inserted, now);
    this.duplicateReadings += duplicates;
  }

  /** lag from reading time to commit, for readings stamped within the last minute (live data) */
  countLag(commitTs: number, readingTs: readonly number[]) {
    for (const ts of readingTs) {
      const lag = commitTs - ts;
      if (lag >= 0 && lag < 60_000) this.lag.push(commitTs, lag);
    }
  }

  snapshot(extra: { bufferedReadings: number; unackedMessages: number; lagSinceTs?: number }): WorkerStats & Record<string, unknown> {
    const now = Date.now();
    const flushValues = this.flushMs.values();
    const lag = this.lag.since(extra.lagSinceTs ?? now - 60_000);
    const devices: WorkerStats["devices"] = {};
    for (const code of [...this.devices.keys()].sort()) {
      const d = this.device(code, now);
      devices[code] = {
        messages: d.messages,
        readings: d.readings,
        rejected: d.rejected,
        messagesLastMinute: d.buckets.reduce((a, b) => a + b, 0),
        lastMessageTs: d.lastMessageTs,
      };
    }
    const mem = process.memoryUsage();
    return {
      kind: "worker",
      workerId: this.workerId,
      startedTs: this.startedTs,
      nowTs: now,
      mqttConnected: this.mqttConnected,
      dbHealthy: this.dbHealthy,
      alerts: this.alerts,
      accepted: { messages: this.acceptedMessages, readings: this.acceptedReadings },
      committed: { readings: this.committedReadings, duplicates: this.duplicateReadings },
      rejected: { total: this.rejectedTotal, byReason: { ...this.rejectedByReason } },
      buffered: { readings: extra.bufferedReadings, unackedMessages: extra.unackedMessages },
      spilled: {
        readings: this.spilledReadings,
        files: this.spillFiles,
        pendingReadings: this.spillPendingReadings,
        replayedReadings: this.replayedReadings,
      },
      batch: {
        flushes: this.flushes,
        failures: this.flushFailures,
        p50Ms: percentile(flushValues, 50),
        p95Ms: percentile(flushValues, 95),
        lastFlushTs: this.lastFlushTs,
        lastFlushRows: this.lastFlushRows,
      },
      freshness: { p50Ms: percentile(lag, 50), p95Ms: percentile(lag, 95), samples: lag.length },
      sinks: { errors: { ...this.sinkErrors }, dropped: { ...this.sinkDropped } },
      // over the last minute (the Health page)
      rates: { readingsPerS: this.committedRate.perSecond(now, this.startedTs), messagesPerS: this.messageRate.perSecond(now, this.startedTs) },
      memory: { rssMb: Math.round(mem.rss / 1048576), heapUsedMb: Math.round(mem.heapUsed / 1048576) },
      devices,
    };
  }
}
