// The scorer of npm run bench:alerts (lib/alerts/alert-scoring.ts) and the play-through it
// scores (scripts/bench-alerts.ts): it counts only alerts at the incident's place and before its
// trouble, so it cannot be fooled: rules told to ignore an incident lower recall.
import { describe, expect, it } from "vitest";
import { scoreAlerts } from "../../../lib/alerts/alert-scoring";
import { DEFAULT_RULE_INPUTS } from "../../../lib/rules/defaults";
import type { RuleDefinitionInput } from "../../../lib/rules/types";
import { playScenario } from "../../../scripts/bench-alerts";
import { buildDemoTopology } from "../../../simulators/demo-topology";
import { EMPTY_PLAN, type IncidentPlan } from "../../../simulators/incident-plan";

const T0 = Date.UTC(2026, 0, 12, 0, 0);
const MIN = 60_000;
const H = 60 * MIN;
const DAY = 24 * H;
const WEEK = 7 * DAY;

describe("scoreAlerts", () => {
  const incident = { id: "i1", kind: "power_unit_fault", subjectKeys: ["neutralizer:2", "point:2"], startMs: T0, troubleMs: T0 + 10 * MIN, endMs: T0 + H };

  it("counts an alert at the place before the trouble moment, with its lead", () => {
    const s = scoreAlerts([incident], [{ subjectKey: "neutralizer:2", raisedTs: T0 + 4 * MIN }], 6, WEEK);
    expect(s).toMatchObject({ recall: 1, medianLeadMin: 6, falseAlerts: 0, alertsPerIncident: 1, floods: 0 });
  });

  it("does not count an alert elsewhere, or one after the trouble, and calls the stray one false", () => {
    const late = scoreAlerts([incident], [{ subjectKey: "point:2", raisedTs: T0 + 11 * MIN }], 6, WEEK);
    expect(late.recall).toBe(0);
    expect(late.falseAlerts).toBe(0); // it belongs to the incident, just too late
    const elsewhere = scoreAlerts([incident], [{ subjectKey: "point:9", raisedTs: T0 + 4 * MIN }], 6, WEEK);
    expect(elsewhere.recall).toBe(0);
    expect(elsewhere.falseAlerts).toBe(1);
    expect(elsewhere.falsePerLineWeek).toBeCloseTo(1 / 6, 10);
  });

  it("counts repeated alerts per incident and floods of more than 10 in 10 minutes", () => {
    const many = Array.from({ length: 11 }, (_, i) => ({ subjectKey: "point:2", raisedTs: T0 + i * 20_000 }));
    const s = scoreAlerts([incident], many, 6, WEEK);
    expect(s.alertsPerIncident).toBe(11);
    expect(s.floods).toBe(1);
  });
});

describe("bench play-through", () => {
  const plan: IncidentPlan = {
    ...EMPTY_PLAN,
    powerFaults: [{ lineSlug: "flexo-2", pointSlug: "print-exit", startMs: T0 + 6 * H, endMs: T0 + 7 * H }],
    silences: [{ codes: ["fm-slitter-1-rewind"], startMs: T0 + 10 * H, endMs: T0 + 10.5 * H }],
  };
  const sc = { anchorMs: T0 + DAY, seed: 5, incidents: plan };
  const demo = buildDemoTopology();
  const score = (rules: readonly RuleDefinitionInput[]) => {
    const run = playScenario(sc, T0, 0.5, rules, 5000);
    const alerts = run.events.filter((e) => e.type === "raise").map((e) => ({ subjectKey: e.subjectKey, raisedTs: e.raisedTs }));
    return scoreAlerts(run.incidents.map((i) => ({ ...i, subjectKeys: demo.subjectsOf(i) })), alerts, demo.lineCount, 0.5 * DAY);
  };

  it("catches both incidents with the default rules, and loses one when the rules are told to ignore it", { timeout: 120_000 }, () => {
    const fine = score(DEFAULT_RULE_INPUTS);
    expect(fine.withTrouble).toBe(2);
    expect(fine.recall).toBe(1);
    // exempt the faulty bar from the effect rule: a disabled rule of the same kind and severity
    // scoped to the point it serves takes precedence over the plant-wide default
    const point = demo.pointId("flexo-2", "print-exit");
    const ignoring: RuleDefinitionInput[] = [
      ...DEFAULT_RULE_INPUTS,
      { id: 900, version: 1, kind: "effect_loss", severity: "medium", scope: { pointId: point }, enabled: false, onDelayS: 60, offDelayS: 300, onlyWhileRunning: true, params: { minReductionFraction: 0.5, windowS: 300 } },
    ];
    const blind = score(ignoring);
    expect(blind.recall).toBe(0.5);
    expect(blind.outcomes.find((o) => o.kind === "power_unit_fault")?.intime).toBe(false);
  });
});
