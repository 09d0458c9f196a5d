// Findings at the end of a survey and the fixed-meter cross-check.
import { describe, expect, it } from "vitest";
import { crossCheckFixedMeter } from "@/lib/surveys/crosscheck";
import { surveyFindings } from "@/lib/surveys/findings";

const spot = (key: string, kv: number | null, extra: Partial<{ afterNeutralizer: string; limitKv: number }> = {}) => ({
  key,
  name: key,
  afterNeutralizer: extra.afterNeutralizer ?? null,
  limitKv: extra.limitKv ?? 12,
  equivalentKv: kv,
});

describe("survey findings", () => {
  it("finds a point over its limit, a low reduction and charge building up", () => {
    const f = surveyFindings([
      spot("unwind", -30),
      spot("after-bar", -20, { afterNeutralizer: "Bar U1" }), // 33 % reduction (< 50 %, the effect-loss default)
      spot("idlers", -4),
      spot("knife", -11), // +7 kV and +175 %: charge builds
    ]);
    expect(f.map((x) => [x.kind, x.spotKey])).toEqual([
      ["over_limit", "unwind"],
      ["over_limit", "after-bar"],
      ["low_reduction", "after-bar"],
      ["charge_build", "knife"],
    ]);
    expect(f[2].reductionPct).toBeCloseTo(100 / 3, 6);
  });

  it("says nothing about a good bar, small rises or spots not measured", () => {
    expect(surveyFindings([spot("a", -10), spot("b", -1, { afterNeutralizer: "Bar" }), spot("c", -2.5), spot("d", null), spot("e", 8)])).toEqual([]);
  });
});

describe("fixed-meter cross-check", () => {
  it("flags a meter more than 20 % away from the handheld, while the line runs steadily", () => {
    // 20 % is the default share (plant setting). Fixed mean −12.5 kV vs handheld −10 kV → 25 %.
    const r = crossCheckFixedMeter({ handheldKv: -10, fixedKv: [-12.4, -12.5, -12.6], running: true });
    expect(r.judged && r.flagged).toBe(true);
    expect(r.judged && r.diffShare).toBeCloseTo(0.25, 6);
    const ok = crossCheckFixedMeter({ handheldKv: -10, fixedKv: [-10.9, -11, -11.1], running: true });
    expect(ok.judged && ok.flagged).toBe(false);
  });

  it("does not judge a stopped line, an unsteady one or too few readings", () => {
    expect(crossCheckFixedMeter({ handheldKv: -10, fixedKv: [-12, -12, -12], running: false }).judged).toBe(false);
    expect(crossCheckFixedMeter({ handheldKv: -10, fixedKv: [-4, -12, -20], running: true }).judged).toBe(false);
    expect(crossCheckFixedMeter({ handheldKv: -10, fixedKv: [-12], running: true }).judged).toBe(false);
  });
});
