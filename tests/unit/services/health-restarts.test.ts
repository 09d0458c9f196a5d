// When the Health page marks a process as started again (lib/health-verdict.ts).
import { describe, expect, it } from "vitest";
import { RESTART_SHOWN_MS, restartedLately } from "../../../lib/health-verdict";

const t0 = Date.UTC(2026, 11, 2, 6, 0, 0);
const min = 60_000;

describe("restartedLately", () => {
  it("marks a worker started 2 h after the broker, for ten minutes", () => {
    const started = t0 + 120 * min;
    expect(restartedLately(started, t0, started + 5 * min)).toBe(true);
    expect(restartedLately(started, t0, started + RESTART_SHOWN_MS - 1)).toBe(true);
    expect(restartedLately(started, t0, started + RESTART_SHOWN_MS)).toBe(false);
  });

  it("marks nothing when the whole stack started together, even right after", () => {
    expect(restartedLately(t0 + 20_000, t0, t0 + 30_000)).toBe(false);
    expect(restartedLately(t0, t0, t0 + 1000)).toBe(false);
  });

  it("marks nothing it cannot know", () => {
    expect(restartedLately(null, t0, t0 + 5 * min)).toBe(false);
    expect(restartedLately(t0 + 5 * min, null, t0 + 6 * min)).toBe(false);
  });
});
