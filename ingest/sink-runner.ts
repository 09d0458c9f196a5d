// Runs one sink: its calls go through a queue so they happen one at a time and in order
// (committed batches and ticks interleaved as they occurred). A sink that falls too far behind
// loses its oldest batches (counted) rather than growing the worker's memory without bound.
import type { CommittedReading, ReadingSink } from "./sinks";
import type { Logger } from "./log";
import { describeError } from "./log";
import type { WorkerCounters } from "./stats";

type Job = { kind: "batch"; readings: CommittedReading[] } | { kind: "tick"; nowMs: number };

export class SinkRunner {
  private queue: Job[] = [];
  private queuedReadings = 0;
  private running = false;
  private idleWaiters: Array<() => void> = [];

  constructor(
    readonly sink: ReadingSink,
    private readonly log: Logger,
    private readonly counters: WorkerCounters,
    private readonly maxQueuedReadings = 200_000,
  ) {}

  pushBatch(readings: CommittedReading[]): void {
    this.queue.push({ kind: "batch", readings });
    this.queuedReadings += readings.length;
    while (this.queuedReadings > this.maxQueuedReadings) {
      const i = this.queue.findIndex((j) => j.kind === "batch");
      if (i < 0) break;
      const [dropped] = this.queue.splice(i, 1);
      if (dropped.kind === "batch") {
        this.queuedReadings -= dropped.readings.length;
        this.counters.sinkDropped[this.sink.name] = (this.counters.sinkDropped[this.sink.name] ?? 0) + dropped.readings.length;
      }
    }
    void this.run();
  }

  pushTick(nowMs: number): void {
    if (!this.sink.onTick) return;
    // one pending tick is enough
    if (this.queue.some((j) => j.kind === "tick")) return;
    this.queue.push({ kind: "tick", nowMs });
    void this.run();
  }

  private async run(): Promise<void> {
    if (this.running) return;
    this.running = true;
    try {
      while (this.queue.length > 0) {
        const job = this.queue.shift()!;
        try {
          if (job.kind === "batch") {
            this.queuedReadings -= job.readings.length;
            await this.sink.onCommitted(job.readings);
          } else {
            await this.sink.onTick?.(job.nowMs);
          }
        } catch (err) {
          this.counters.sinkErrors[this.sink.name] = (this.counters.sinkErrors[this.sink.name] ?? 0) + 1;
          this.log.error(`sink ${this.sink.name} failed`, { error: describeError(err), job: job.kind });
        }
      }
    } finally {
      this.running = false;
      for (const w of this.idleWaiters.splice(0)) w();
    }
  }

  /** Waits until the queue is empty (or the timeout), then closes the sink. */
  async close(timeoutMs: number): Promise<void> {
    if (this.running || this.queue.length > 0) {
      await Promise.race([
        new Promise<void>((r) => this.idleWaiters.push(r)),
        new Promise<void>((r) => setTimeout(r, timeoutMs).unref()),
      ]);
    }
    try {
      await this.sink.close?.();
    } catch (err) {
      this.log.error(`sink ${this.sink.name} failed to close`, { error: describeError(err) });
    }
  }
}
