// Live stream limits: open streams per person and per process, and a bounded SSE queue that
// coalesces for a slow client (app/_server/live-hub.ts, app/_server/sse-stream.ts).
import { describe, expect, it } from "vitest";
import { LIVE_STREAM_LIMITS, StreamSlots } from "@/app/_server/live-hub";
import { SseStream } from "@/app/_server/sse-stream";

async function readAll(sse: SseStream): Promise<string> {
  const reader = sse.stream.getReader();
  let text = "";
  const decoder = new TextDecoder();
  for (;;) {
    const { done, value } = await Promise.race([reader.read(), new Promise<{ done: true; value: undefined }>((r) => setTimeout(() => r({ done: true, value: undefined }), 50))]);
    if (done) break;
    text += decoder.decode(value);
  }
  return text;
}

describe("open live streams", () => {
  it("a person's 21st stream is refused; closing one frees a place", () => {
    const slots = new StreamSlots();
    const held = Array.from({ length: LIVE_STREAM_LIMITS.perPerson }, () => slots.acquire(7));
    expect(held.every((s) => s.ok)).toBe(true);
    expect(slots.acquire(7)).toEqual({ ok: false, reason: "person" });
    // someone else is not affected
    expect(slots.acquire(8).ok).toBe(true);
    const first = held[0];
    if (first.ok) first.release();
    if (first.ok) first.release(); // releasing twice frees one place only
    expect(slots.acquire(7).ok).toBe(true);
    expect(slots.acquire(7).ok).toBe(false);
  });

  it("the process has its own ceiling", () => {
    const slots = new StreamSlots({ perPerson: 20, perProcess: 3 });
    expect([1, 2, 3].map((p) => slots.acquire(p).ok)).toEqual([true, true, true]);
    expect(slots.acquire(4)).toEqual({ ok: false, reason: "process" });
  });
});

describe("a slow client", () => {
  it("gets the newest snapshot per line and a reset, not a backlog", async () => {
    const sse = new SseStream({ highWaterMark: 4 });
    // nobody reads while 3 lines publish 100 snapshots each
    for (let i = 0; i < 100; i++) for (const line of [1, 2, 3]) sse.event("live", { line, i }, { coalesceKey: `line:${line}` });
    const text = await readAll(sse);
    const live = text.split("\n\n").filter((e) => e.startsWith("event: live"));
    expect(live.length).toBeLessThanOrEqual(4 + 3);
    for (const line of [1, 2, 3]) expect(text).toContain(`"line":${line},"i":99`);
    expect(text).toContain("event: reset");
    expect(sse.skipped).toBeGreaterThan(280);
  });

  it("keyless events are bounded too", async () => {
    const sse = new SseStream({ highWaterMark: 2, maxQueued: 10 });
    for (let i = 0; i < 1000; i++) sse.event("note", { i });
    const text = await readAll(sse);
    expect(text.split("\n\n").filter((e) => e.startsWith("event: note")).length).toBeLessThanOrEqual(12);
    expect(text).toContain('"i":999');
  });

  it("a client that keeps up receives everything, in order", async () => {
    const sse = new SseStream({ highWaterMark: 4 });
    const reader = sse.stream.getReader();
    const got: string[] = [];
    for (let i = 0; i < 50; i++) {
      sse.event("live", { i }, { coalesceKey: "line:1" });
      got.push(new TextDecoder().decode((await reader.read()).value));
    }
    expect(got.map((t) => JSON.parse(t.split("data: ")[1]).i)).toEqual(Array.from({ length: 50 }, (_, i) => i));
    expect(sse.skipped).toBe(0);
  });
});
