// The pipeline the worker, the backfill and the alert bench share (lib/alerts/alert-pipeline.ts):
// one excursion at one point past the 12 kV and then the 20 kV limit is one alert, raised and
// then escalated; when one reading both moves the milder rule's peak a quarter past the one last
// told and raises the severer rule, one "escalate" goes out, not a "worse" beside it.
import { describe, expect, it } from "vitest";
import { createAlertPipeline } from "../../../lib/alerts/alert-pipeline";
import { chargeHighRule, PLANT, S, T0, repeat, series } from "../rules/fixtures";

describe("alert pipeline", () => {
  it("one excursion past two limits: raise, then one escalation (no separate 'worse' at the same moment)", () => {
    // the default rules' on-delays (lib/rules/defaults.ts: 10 s each)
    const rules = [chargeHighRule(1, { limitKv: 12, clearKv: 10 }, { onDelayS: 10 }), chargeHighRule(2, { limitKv: 20, clearKv: 17 }, { severity: "high", onDelayS: 10 })];
    const pipeline = createAlertPipeline({ rules, topology: PLANT });
    // 14 kV for 60 s (raised at 10 s), then 23 kV for 20 s: the 20 kV rule raises at 70 s after its
    // on-delay, and at that same reading the 12 kV rule may report its peak again (at most once a
    // minute after its raise, lib/rules/hysteresis.ts), now 23 kV: more than a quarter past 14
    const readings = series("fm-gp-unwind", "charge_kv", T0, S, [...repeat(14, 60), ...repeat(23, 20), ...repeat(5, 3)]);
    const events = readings.flatMap((r) => pipeline.push(r));
    const told = events.filter((e) => e.notify).map((e) => [e.type, e.severity, (e.ts - T0) / S]);
    expect(told).toEqual([
      ["raise", "medium", 10],
      ["escalate", "high", 70],
    ]);
    // one alert throughout: the same identity (the 12 kV rule, raised at 0 s)
    expect(new Set(events.map((e) => `${e.ruleId}|${e.raisedTs}`))).toEqual(new Set([`1|${T0 + 10 * S}`]));
    expect(events.filter((e) => e.type === "worse")).toEqual([]);
    // the charge falls to 5 kV, under both clear levels on one reading (no off-delay): one clear, no ease between
    expect(events.filter((e) => e.type === "ease" || e.type === "clear").map((e) => [e.type, (e.ts - T0) / S])).toEqual([["clear", 80]]);
  });
});
