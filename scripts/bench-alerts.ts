// npm run bench:alerts — are the default rules right, once and early?
//
// Plays 30 simulated days of the demo plant with a fixed seed and a seeded plan of incidents
// (simulators/incident-schedule.ts: several cold spells, fouling bars, power-unit faults,
// silent sensors, dead gateways and speed-ups), in reading time and as fast as the engine
// goes, through the real alert pipeline (lib/alerts/alert-pipeline.ts: rules engine, one alert
// per condition, gateway holding) and the default rules (lib/rules/defaults.ts). Scores the
// alerts people would have been told of against the ground truth (simulators/ground-truth.ts,
// lib/alerts/alert-scoring.ts), and measures the engine with 500 rules in the same run.
//
//   npm run bench:alerts -- [--days 30] [--seed 14] [--meter-period-s 5] [--json out.json]
// The ground truth is written to DATA_DIR/bench/ground-truth-<seed>.json (or .data/bench).
import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import { createAlertPipeline } from "../lib/alerts/alert-pipeline";
import type { ConditionEvent } from "../lib/alerts/condition-merge";
import { scoreAlerts, type ScoredAlert } from "../lib/alerts/alert-scoring";
import { CHANNELS, type Reading, type RuleDefinitionInput } from "../lib/rules/types";
import { DEFAULT_RULE_INPUTS } from "../lib/rules/defaults";
import { buildDemoTopology } from "../simulators/demo-topology";
import { groundTruth, type GroundTruthIncident } from "../simulators/ground-truth";
import { scheduleIncidents } from "../simulators/incident-schedule";
import { PlantModel, type Scenario } from "../simulators/plant-model";
import { measureRulesThroughput } from "./rules-throughput";
import { DAY_MS as DAY } from "../lib/vocabulary/time";

const TICK_MS = 10_000;

export type BenchRun = { incidents: GroundTruthIncident[]; events: ConditionEvent[]; readings: number; wallS: number };

/** Plays the scenario over [fromMs, fromMs + days) through the pipeline; returns every pipeline event. */
export function playScenario(sc: Scenario, fromMs: number, days: number, rules: readonly RuleDefinitionInput[], meterPeriodMs: number): BenchRun {
  const demo = buildDemoTopology();
  const model = new PlantModel(sc);
  const pipeline = createAlertPipeline({ rules, topology: demo.topology, parents: demo.parents });
  const periodOf = (kind: string) => (kind === "field_meter" ? meterPeriodMs : kind === "speed_gateway" ? 2 * meterPeriodMs : 60_000);
  const toMs = fromMs + days * DAY;
  const events: ConditionEvent[] = [];
  let readings = 0;
  const started = performance.now();
  const chunkMs = 10 * 60_000;
  let nextTick = Math.ceil(fromMs / TICK_MS) * TICK_MS;
  for (let c = fromMs; c < toMs; c += chunkMs) {
    const batch: Reading[] = [];
    for (const d of model.devices) {
      const period = periodOf(d.kind);
      for (let t = Math.ceil(c / period) * period; t < c + chunkMs; t += period) {
        const values = model.valuesAt(d, t);
        if (!values) continue;
        for (const channel of CHANNELS) {
          const value = values[channel];
          if (value !== undefined) batch.push({ sensorKey: d.code, channel, ts: t, value });
        }
      }
    }
    batch.sort((a, b) => a.ts - b.ts);
    for (const r of batch) {
      while (nextTick <= r.ts) {
        for (const e of pipeline.tick(nextTick)) events.push(e);
        nextTick += TICK_MS;
      }
      for (const e of pipeline.push(r)) events.push(e);
    }
    readings += batch.length;
  }
  for (const e of pipeline.tick(toMs)) events.push(e);
  return { incidents: groundTruth(sc, fromMs, toMs), events, readings, wallS: (performance.now() - started) / 1000 };
}

function main() {
  const { values } = parseArgs({
    options: {
      days: { type: "string", default: "30" },
      seed: { type: "string", default: "14" },
      "meter-period-s": { type: "string", default: "5" },
      json: { type: "string" },
      verbose: { type: "boolean", default: false },
    },
  });
  const days = Number(values.days);
  const seed = Number(values.seed);
  const fromMs = Date.UTC(2026, 0, 5);
  const plan = scheduleIncidents(seed, fromMs, days);
  const sc: Scenario = { anchorMs: fromMs + days * DAY, seed, incidents: plan };
  const demo = buildDemoTopology();
  const run = playScenario(sc, fromMs, days, DEFAULT_RULE_INPUTS, Number(values["meter-period-s"]) * 1000);
  const raised: ScoredAlert[] = run.events.filter((e) => e.type === "raise").map((e) => ({ subjectKey: e.subjectKey, raisedTs: e.raisedTs }));
  const score = scoreAlerts(
    run.incidents.map((i) => ({ ...i, subjectKeys: demo.subjectsOf(i) })),
    raised,
    demo.lineCount,
    days * DAY,
  );
  const dir = path.join(process.env.DATA_DIR ?? ".data", "bench");
  fs.mkdirSync(dir, { recursive: true });
  fs.writeFileSync(path.join(dir, `ground-truth-${seed}.json`), JSON.stringify(run.incidents, null, 1));
  console.log(`${days} days, seed ${seed}: ${run.readings} readings in ${run.wallS.toFixed(1)} s (${Math.round(run.readings / run.wallS)} readings/s including the plant model)`);
  console.log(`incidents: ${score.incidents} (${score.withTrouble} reached trouble); alerts raised: ${raised.length}; escalations: ${run.events.filter((e) => e.type === "escalate").length}`);
  for (const o of score.outcomes) {
    const inc = run.incidents.find((i) => i.id === o.id)!;
    if (values.verbose || !o.intime || o.alerts > 1) console.log(`  ${o.troubleMs === null ? "no trouble" : o.intime ? "in time" : "MISSED"}: ${inc.what}: ${o.alerts} alert(s), lead ${o.leadMin === null ? "–" : o.leadMin.toFixed(0) + " min"}`);
  }
  for (const a of score.unmatched.slice(0, 15)) console.log(`  false: ${a.subjectKey} at ${new Date(a.raisedTs).toISOString()}`);
  console.log(`median lead by kind (min): ${Object.entries(score.medianLeadMinByKind).map(([k, v]) => `${k} ${v === null ? "–" : v.toFixed(0)}`).join(", ")}`);
  const engine = measureRulesThroughput();
  if (values.json) fs.writeFileSync(values.json, JSON.stringify({ score, engine }, null, 1));
  const lead = score.medianLeadMinByKind.humidity_drop;
  console.log(
    `alerts: recall ${score.recall.toFixed(2)}, lead ${lead === null || lead === undefined ? "–" : lead.toFixed(0)} min, false ${score.falsePerLineWeek.toFixed(2)} per line-week, per incident ${score.alertsPerIncident.toFixed(2)}, floods ${score.floods}, engine ${Math.round(engine.readingsPerS)} readings/s with ${engine.rules} rules`,
  );
}

if (process.argv[1] && import.meta.url.endsWith(path.basename(process.argv[1]))) main();
