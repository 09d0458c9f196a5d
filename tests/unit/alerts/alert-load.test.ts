// Alert-load figures (lib/alert-load.ts computeAlertLoad) on hand-built alert lists. The
// thresholds are the published alarm-management benchmarks (EEMUA 191 / ANSI/ISA-18.2, from
// memory): flood = more than 10 alarms in 10 minutes; ~1 per 10 min "very likely acceptable",
// ~2 "manageable"; under 1 % of the time in flood; stale = standing more than 24 h.
import { describe, expect, it } from "vitest";
import {
  BENCHMARK_ACCEPTABLE_PER_10_MIN,
  BENCHMARK_FLOOD_TIME_FRACTION,
  BENCHMARK_MANAGEABLE_PER_10_MIN,
  computeAlertLoad,
  FLOOD_PER_10_MIN,
  type LoadAlert,
} from "../../../lib/alert-load";

const MIN = 60_000;
const T0 = Date.UTC(2026, 0, 12, 0, 0);
let nextId = 1;
function alert(startTs: number, over: Partial<LoadAlert> = {}): LoadAlert {
  return { id: nextId++, ruleId: 1, ruleName: "Charge over limit", kind: "charge_high", severity: "medium", subjectKey: "point:1", startTs, endTs: startTs + MIN, closedTs: startTs + MIN, chattering: false, state: "closed", ...over };
}

describe("computeAlertLoad", () => {
  it("uses the published benchmark figures", () => {
    expect(FLOOD_PER_10_MIN).toBe(10);
    expect(BENCHMARK_ACCEPTABLE_PER_10_MIN).toBe(1);
    expect(BENCHMARK_MANAGEABLE_PER_10_MIN).toBe(2);
    expect(BENCHMARK_FLOOD_TIME_FRACTION).toBe(0.01);
  });

  it("counts alerts per 10 minutes and per day from the span's start", () => {
    const list = [alert(T0 + 1 * MIN), alert(T0 + 9 * MIN), alert(T0 + 10 * MIN), alert(T0 + 25 * 60 * MIN)];
    const load = computeAlertLoad(list, [], T0, T0 + 2 * 1440 * MIN, T0 + 2 * 1440 * MIN);
    expect(load.total).toBe(4);
    expect(load.per10Min.length).toBe(288); // 2 days × 144 ten-minute windows
    expect(load.per10Min.slice(0, 3)).toEqual([2, 1, 0]);
    expect(load.perDay.map((d) => d.count)).toEqual([3, 1]);
    expect(load.averagePer10Min).toBeCloseTo(4 / 288, 10);
    expect(load.verdict).toBe("acceptable");
  });

  it("finds a flood: 11 alerts in one 10-minute window is a flood, 10 is not", () => {
    const ten = Array.from({ length: 10 }, (_, i) => alert(T0 + i * 30_000));
    const eleven = Array.from({ length: 11 }, (_, i) => alert(T0 + 10 * MIN + i * 30_000));
    const load = computeAlertLoad([...ten, ...eleven], [], T0, T0 + 1440 * MIN, T0 + 1440 * MIN);
    expect(load.floodBuckets).toBe(1);
    expect(load.floods).toEqual([{ startTs: T0 + 10 * MIN, endTs: T0 + 20 * MIN, count: 11 }]);
    expect(load.peakPer10Min).toBe(11);
    // 1 of 144 windows = 0.69 % of the time: under the 1 % target
    expect(load.floodTimeFraction).toBeCloseTo(1 / 144, 10);
  });

  it("joins consecutive flood windows into one flood", () => {
    const list = Array.from({ length: 24 }, (_, i) => alert(T0 + i * 50_000)); // 12 per window for 20 min
    const load = computeAlertLoad(list, [], T0, T0 + 60 * MIN, T0 + 60 * MIN);
    expect(load.floods).toEqual([{ startTs: T0, endTs: T0 + 20 * MIN, count: 24 }]);
  });

  it("judges the average rate against 1 and 2 per 10 minutes", () => {
    const span = 100 * MIN; // 10 windows
    const n = (count: number) => Array.from({ length: count }, (_, i) => alert(T0 + (i * span) / count));
    expect(computeAlertLoad(n(10), [], T0, T0 + span, T0 + span).verdict).toBe("acceptable"); // 1.0
    expect(computeAlertLoad(n(15), [], T0, T0 + span, T0 + span).verdict).toBe("manageable"); // 1.5
    expect(computeAlertLoad(n(20), [], T0, T0 + span, T0 + span).verdict).toBe("manageable"); // 2.0
    expect(computeAlertLoad(n(30), [], T0, T0 + span, T0 + span).verdict).toBe("demanding"); // 3.0, no flood
  });

  it("ranks the noisiest rules with their share of the total", () => {
    const list = [
      ...Array.from({ length: 6 }, (_, i) => alert(T0 + i * MIN, { ruleId: 3, ruleName: "Rate" })),
      ...Array.from({ length: 3 }, (_, i) => alert(T0 + i * MIN, { ruleId: 1 })),
      alert(T0, { ruleId: 9, ruleName: "Silent", kind: "sensor_silent" }),
    ];
    const load = computeAlertLoad(list, [], T0, T0 + 60 * MIN, T0 + 60 * MIN);
    expect(load.noisiest.map((r) => [r.ruleId, r.count, r.share])).toEqual([
      [3, 6, 0.6],
      [1, 3, 0.3],
      [9, 1, 0.1],
    ]);
  });

  it("counts chattering alerts per rule and place, and standing alerts older than 24 h", () => {
    const list = [alert(T0, { chattering: true, subjectKey: "point:2" }), alert(T0 + MIN, { chattering: true, subjectKey: "point:2" }), alert(T0 + 2 * MIN)];
    const now = T0 + 30 * 60 * MIN;
    const standing = [alert(now - 25 * 60 * MIN, { state: "active_unacked", endTs: null, closedTs: null }), alert(now - 23 * 60 * MIN, { state: "active_acked", endTs: null, closedTs: null })];
    const load = computeAlertLoad(list, standing, T0, T0 + 60 * MIN, now);
    expect(load.chatteringCount).toBe(2);
    expect(load.chatteringRules).toEqual([{ ruleId: 1, ruleName: "Charge over limit", subjectKey: "point:2", count: 2 }]);
    expect(load.standing.map((s) => Math.round(s.hours))).toEqual([25]);
  });

  it("ignores alerts outside the span", () => {
    const load = computeAlertLoad([alert(T0 - 1), alert(T0 + 60 * MIN)], [], T0, T0 + 60 * MIN, T0 + 60 * MIN);
    expect(load.total).toBe(0);
  });
});
