// Alert-load figures (lib/alert-load.ts computeAlertLoad) on hand-built alert lists. The
// thresholds are the published alarm-management benchmarks (EEMUA 191 / ANSI/ISA-18.2, from
// memory; EEMUA Publication 191 3rd ed. 2013, ANSI/ISA-18.2-2016): flood = more than 10 alarms
// in 10 minutes; ~1 per 10 min "very likely acceptable", ~2 "manageable"; under 1 % of the
// time in flood; stale = standing more than 24 h.
import { describe, expect, it } from "vitest";
import {
  BENCHMARK_ACCEPTABLE_PER_10_MIN,
  BENCHMARK_FLOOD_TIME_FRACTION,
  BENCHMARK_MANAGEABLE_PER_10_MIN,
  BENCHMARK_ACCEPTABLE_PER_DAY,
  BENCHMARK_ACCEPTABLE_PER_HOUR,
  BENCHMARK_MANAGEABLE_PER_DAY,
  BENCHMARK_MANAGEABLE_PER_HOUR,
  CHATTER_RAISES,
  CHATTER_SPAN_MS,
  computeAlertLoad,
  findChattering,
  FLOOD_PER_10_MIN,
  judgeLoad,
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

  it("finds a flood in a sliding 10-minute window: 11 alerts within 10 minutes is a flood, 10 is not (EEMUA 191 / ISA-18.2-2016: more than 10 in 10 min)", () => {
    // 10 alerts over 4.5 min: no flood
    const ten = Array.from({ length: 10 }, (_, i) => alert(T0 + i * 30_000));
    expect(computeAlertLoad(ten, [], T0, T0 + 1440 * MIN, T0 + 1440 * MIN).floods).toEqual([]);
    // 11 alerts straddling a fixed 10-minute boundary (6 before 00:10, 5 after): fixed buckets
    // would see 6 and 5; the sliding window sees 11 within 5 minutes
    const eleven = Array.from({ length: 11 }, (_, i) => alert(T0 + 7 * MIN + i * 30_000));
    const load = computeAlertLoad(eleven, [], T0, T0 + 1440 * MIN, T0 + 1440 * MIN);
    expect(load.per10Min.slice(0, 2)).toEqual([6, 5]);
    // the flood starts at the 11th raise (T0 + 12 min) and ends when the first is 10 min old (T0 + 17 min)
    expect(load.floods).toEqual([{ startTs: T0 + 12 * MIN, endTs: T0 + 17 * MIN, count: 11 }]);
    expect(load.floodTimeFraction).toBeCloseTo(5 / 1440, 10);
  });

  it("joins overlapping flood spells into one flood", () => {
    const list = Array.from({ length: 24 }, (_, i) => alert(T0 + i * 50_000)); // 12 per 10 min for 20 min
    const load = computeAlertLoad(list, [], T0, T0 + 60 * MIN, T0 + 60 * MIN);
    expect(load.floods).toHaveLength(1);
    expect(load.floods[0].count).toBe(24);
    expect(load.floods[0].startTs).toBe(T0 + 10 * 50_000);
    expect(load.floods[0].endTs).toBe(T0 + 13 * 50_000 + 10 * MIN);
  });

  it("calls 5 % of the time in flood overloaded even when the average is low (ISA-18.2-2016: under 1 % in flood)", () => {
    // one flood of 11 alerts within 1 minute, once per day: about 10 min in flood a day = 0.7 %;
    // eight such floods spread over one day = 5.6 % of it, with an average well under 1 per 10 min
    const day = 1440 * MIN;
    const floods = Array.from({ length: 8 }, (_, f) => Array.from({ length: 11 }, (_, i) => alert(T0 + f * 3 * 60 * MIN + i * 5_000))).flat();
    const load = computeAlertLoad(floods, [], T0, T0 + day, T0 + day);
    expect(load.averagePer10Min).toBeLessThan(1); // 88 / 144 = 0.61
    expect(load.floodTimeFraction).toBeGreaterThan(0.05);
    expect(load.verdict).toBe("overloaded");
    expect(judgeLoad(0.61, 0.0099)).toBe("acceptable");
    expect(judgeLoad(0.61, 0.01)).toBe("overloaded");
  });

  it("judges the average rate against about 1 and 2 per 10 minutes (ISA-18.2-2016 / EEMUA 191)", () => {
    const span = 100 * MIN; // 10 windows
    const n = (count: number) => Array.from({ length: count }, (_, i) => alert(T0 + (i * span) / count));
    expect(computeAlertLoad(n(10), [], T0, T0 + span, T0 + span).verdict).toBe("acceptable"); // 1.0
    expect(computeAlertLoad(n(15), [], T0, T0 + span, T0 + span).verdict).toBe("manageable"); // 1.5
    expect(computeAlertLoad(n(20), [], T0, T0 + span, T0 + span).verdict).toBe("manageable"); // 2.0
    expect(computeAlertLoad(n(30), [], T0, T0 + span, T0 + span).verdict).toBe("overloaded"); // 3.0, no flood
  });

  it("gives per-hour and per-day figures beside the 10-minute ones, with the published ~6 / ~12 per hour and ~150 / ~300 per day (ISA-18.2-2016)", () => {
    expect([BENCHMARK_ACCEPTABLE_PER_HOUR, BENCHMARK_MANAGEABLE_PER_HOUR, BENCHMARK_ACCEPTABLE_PER_DAY, BENCHMARK_MANAGEABLE_PER_DAY]).toEqual([6, 12, 150, 300]);
    const list = [alert(T0 + MIN), alert(T0 + 2 * MIN), alert(T0 + 61 * MIN), alert(T0 + 25 * 60 * MIN)];
    const load = computeAlertLoad(list, [], T0, T0 + 2 * 1440 * MIN, T0 + 2 * 1440 * MIN);
    expect(load.perHour.length).toBe(48);
    expect(load.perHour.slice(0, 3)).toEqual([2, 1, 0]);
    expect(load.peakPerHour).toBe(2);
    expect(load.averagePerHour).toBeCloseTo(4 / 48, 10);
    expect(load.averagePerDay).toBeCloseTo(2, 10);
    expect(load.peakPerDay).toBe(3);
  });

  it("ranks the noisiest alerts by rule and subject, not by rule alone", () => {
    const list = [
      ...Array.from({ length: 6 }, (_, i) => alert(T0 + i * 11 * MIN, { ruleId: 3, ruleName: "Rate", subjectKey: "point:4" })),
      ...Array.from({ length: 3 }, (_, i) => alert(T0 + i * 11 * MIN, { ruleId: 3, ruleName: "Rate", subjectKey: "point:5" })),
      alert(T0, { ruleId: 9, ruleName: "Silent", kind: "sensor_silent", subjectKey: "sensor:fm-1" }),
    ];
    const load = computeAlertLoad(list, [], T0, T0 + 120 * MIN, T0 + 120 * MIN);
    expect(load.noisiest.map((r) => [r.ruleId, r.subjectKey, r.count, r.share])).toEqual([
      [3, "point:4", 6, 0.6],
      [3, "point:5", 3, 0.3],
      [9, "sensor:fm-1", 1, 0.1],
    ]);
  });

  it("flags chattering as 3 raises of one alert within 10 minutes, whatever its delays or its own chattering flag", () => {
    // a rule with a 5-minute on-delay re-raising every 4 min: the engine's 60 s flag never fires
    const hovering = [0, 4, 8].map((m) => alert(T0 + m * MIN, { ruleId: 4, kind: "rh_low", subjectKey: "area:1", chattering: false }));
    // twice within 10 min, then a third 11 min after the first: not chattering
    const spaced = [0, 5, 11].map((m) => alert(T0 + m * MIN, { ruleId: 1, subjectKey: "point:2", chattering: true }));
    const load = computeAlertLoad([...hovering, ...spaced], [], T0, T0 + 60 * MIN, T0 + 60 * MIN);
    expect([CHATTER_RAISES, CHATTER_SPAN_MS]).toEqual([3, 10 * MIN]);
    expect(load.chatteringRules).toEqual([{ ruleId: 4, ruleName: "Charge over limit", subjectKey: "area:1", count: 3 }]);
    expect(load.chatteringCount).toBe(3);
    expect(findChattering(spaced).size).toBe(0);
  });

  it("counts standing alerts older than 24 h", () => {
    const now = T0 + 30 * 60 * MIN;
    const standing = [alert(now - 25 * 60 * MIN, { state: "active_unacked", endTs: null, closedTs: null }), alert(now - 23 * 60 * MIN, { state: "active_acked", endTs: null, closedTs: null })];
    const load = computeAlertLoad([], standing, T0, T0 + 60 * MIN, now);
    expect(load.standing.map((s) => Math.round(s.hours))).toEqual([25]);
  });

  it("ignores alerts outside the span", () => {
    const load = computeAlertLoad([alert(T0 - 1), alert(T0 + 60 * MIN)], [], T0, T0 + 60 * MIN, T0 + 60 * MIN);
    expect(load.total).toBe(0);
  });
});
