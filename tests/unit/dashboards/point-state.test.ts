// Point states against limits (lib/point-state.ts). The 80 % "near" band is Stillfield's own
// display convention (common practice for early-warning bands on operator screens), not a standard.
import { describe, expect, it } from "vitest";
import { limitRatio, pointState, valueState } from "@/lib/point-state";
import { worstState } from "@/lib/vocabulary";

const now = 1_767_225_600_000;
const high = { direction: "high" as const, limit: 12 };
const low = { direction: "low" as const, limit: 30 };

describe("charge against a magnitude limit", () => {
  it("is normal below 80 % of the limit, near from 80 %, over past the limit — for both signs", () => {
    expect(valueState(9.5, high)).toBe("normal");
    expect(valueState(9.6, high)).toBe("near"); // 0.8 × 12
    expect(valueState(-9.6, high)).toBe("near");
    expect(valueState(12, high)).toBe("near"); // at the limit is not yet over
    expect(valueState(12.01, high)).toBe("over");
    expect(valueState(-30, high)).toBe("over");
  });
  it("has no state but normal without a limit", () => {
    expect(valueState(150, null)).toBe("normal");
  });
});

describe("humidity against a low limit", () => {
  it("is near when the limit is 80 % of the value or more, over below the limit", () => {
    expect(valueState(38, low)).toBe("normal");
    expect(valueState(37.5, low)).toBe("near"); // 30 / 0.8
    expect(valueState(30, low)).toBe("near");
    expect(valueState(29.9, low)).toBe("over");
    expect(limitRatio(0, low)).toBe(Number.POSITIVE_INFINITY);
  });
});

describe("silent and shelved", () => {
  it("is silent with no reading or none for longer than the silence time", () => {
    expect(pointState({ value: null, lastTs: null, nowMs: now, limit: high })).toBe("silent");
    expect(pointState({ value: 3, lastTs: now - 121_000, nowMs: now, limit: high })).toBe("silent");
    expect(pointState({ value: 3, lastTs: now - 119_000, nowMs: now, limit: high })).toBe("normal");
    expect(pointState({ value: 3, lastTs: now - 20_000, nowMs: now, limit: high, silentAfterMs: 10_000 })).toBe("silent");
  });
  it("shows shelved before anything else", () => {
    expect(pointState({ value: 40, lastTs: now, nowMs: now, limit: high, shelved: true })).toBe("shelved");
  });
  it("summarises several points by the worst", () => {
    expect(worstState([])).toBe("normal");
    expect(worstState(["normal", "silent", "near"])).toBe("near");
    expect(worstState(["shelved", "over", "near"])).toBe("over");
    expect(worstState(["normal", "shelved"])).toBe("shelved");
  });
});
