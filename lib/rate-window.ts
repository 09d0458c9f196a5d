// Events per second over the last minute, in six 10-second buckets (the worker's and the broker's
// readings/s and messages/s on the Health page). Pure: the caller passes the clock.
const BUCKET_MS = 10_000;
const BUCKETS = 6;

export class RateWindow {
  private readonly buckets = new Array<number>(BUCKETS).fill(0);
  private bucketStart: number;

  constructor(nowMs: number) {
    this.bucketStart = Math.floor(nowMs / BUCKET_MS) * BUCKET_MS;
  }

  private rotate(nowMs: number) {
    const start = Math.floor(nowMs / BUCKET_MS) * BUCKET_MS;
    const steps = Math.min(BUCKETS, Math.max(0, (start - this.bucketStart) / BUCKET_MS));
    for (let i = 0; i < steps; i++) {
      this.buckets.shift();
      this.buckets.push(0);
    }
    if (steps > 0) this.bucketStart = start;
  }

  add(n: number, nowMs: number) {
    this.rotate(nowMs);
    this.buckets[BUCKETS - 1] += n;
  }

  /** Mean rate over the full buckets of the last minute plus the open one, per second. */
  perSecond(nowMs: number, startedMs = 0): number {
    this.rotate(nowMs);
    const total = this.buckets.reduce((a, b) => a + b, 0);
    const windowStart = Math.max(this.bucketStart - (BUCKETS - 1) * BUCKET_MS, startedMs);
    const spanMs = Math.max(1_000, nowMs - windowStart);
    return Math.round((total * 1000) / spanMs * 10) / 10;
  }
}
