// Reading sinks run in order, one call at a time, and a failing sink never stops the others
// (or ingest): its errors are counted.
import { describe, expect, it } from "vitest";
import { SinkRunner } from "@/ingest/sink-runner";
import { WorkerCounters } from "@/ingest/stats";
import { createLogger } from "@/ingest/log";
import type { CommittedReading } from "@/ingest/sinks";

const reading = (ts: number): CommittedReading => ({ deviceId: 1, deviceCode: "fm-x", channel: "charge_kv", ts, value: 1 });
const quietLog = { ...createLogger("test"), error: () => undefined };

describe("SinkRunner", () => {
  it("delivers batches and ticks in order, one at a time", async () => {
    const seen: string[] = [];
    let active = 0;
    let maxActive = 0;
    const runner = new SinkRunner(
      {
        name: "order",
        async onCommitted(rs) {
          active++;
          maxActive = Math.max(maxActive, active);
          await new Promise((r) => setTimeout(r, 5));
          seen.push(`batch:${rs.map((r) => r.ts).join(",")}`);
          active--;
        },
        async onTick(now) {
          seen.push(`tick:${now}`);
        },
      },
      quietLog,
      new WorkerCounters("t"),
    );
    runner.pushBatch([reading(1), reading(2)]);
    runner.pushTick(100);
    runner.pushBatch([reading(3)]);
    await runner.close(1000);
    expect(seen).toEqual(["batch:1,2", "tick:100", "batch:3"]);
    expect(maxActive).toBe(1);
  });

  it("counts a failing sink's errors and keeps calling it", async () => {
    const counters = new WorkerCounters("t");
    let calls = 0;
    const runner = new SinkRunner(
      {
        name: "flaky",
        async onCommitted() {
          calls++;
          if (calls === 1) throw new Error("boom");
        },
      },
      quietLog,
      counters,
    );
    runner.pushBatch([reading(1)]);
    runner.pushBatch([reading(2)]);
    await runner.close(1000);
    expect(calls).toBe(2);
    expect(counters.sinkErrors.flaky).toBe(1);
  });

  it("drops the oldest batches of a sink that falls too far behind, and counts them", async () => {
    const counters = new WorkerCounters("t");
    let release: () => void = () => undefined;
    const gate = new Promise<void>((r) => (release = r));
    const got: number[] = [];
    const runner = new SinkRunner(
      {
        name: "slow",
        async onCommitted(rs) {
          await gate;
          got.push(...rs.map((r) => r.ts));
        },
      },
      quietLog,
      counters,
      2,
    );
    runner.pushBatch([reading(1)]); // taken at once, waits on the gate
    runner.pushBatch([reading(2)]);
    runner.pushBatch([reading(3)]);
    runner.pushBatch([reading(4)]); // over the bound of 2 queued: batch 2 is dropped
    release();
    await runner.close(1000);
    expect(got).toEqual([1, 3, 4]);
    expect(counters.sinkDropped.slow).toBe(1);
  });
});
