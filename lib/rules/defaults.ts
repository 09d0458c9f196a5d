/**
 * Plant-wide default rules for the demo plant (Harrow Fen Packaging) and for a new install.
 * All scopes are plant-wide: engineers override them per area, line or point in the limits
 * editor (per kind and severity, see scope.ts).
 *
 * Every figure below is a plant setting chosen from common practice, from memory; none is a
 * published limit. Static limits depend on the material, the process and what the charge
 * upsets, and in solvent areas on a hazard assessment by a qualified person under NFPA 77,
 * IEC TS 60079-32-1 and local codes. Stillfield is a monitoring aid, not a safety system.
 */
import { ruleListSchema, type RuleDefinition, type RuleDefinitionInput } from "./types";

export const DEFAULT_RULE_INPUTS: readonly RuleDefinitionInput[] = [
  {
    // Common practice / plant setting, from memory: a few kV at a neutralized point is normal,
    // 10–15 kV on a film web starts to cause clinging, dust pick-up and misfeeds.
    id: 1,
    version: 1,
    kind: "charge_high",
    severity: "medium",
    scope: {},
    onDelayS: 10,
    offDelayS: 30,
    onlyWhileRunning: true,
    params: { limitKv: 12, clearKv: 10 },
  },
  {
    // Common practice / plant setting, from memory: around 20 kV shocks to people and sparks
    // become likely; high severity.
    id: 2,
    version: 1,
    kind: "charge_high",
    severity: "high",
    scope: {},
    onDelayS: 10,
    offDelayS: 30,
    onlyWhileRunning: true,
    params: { limitKv: 20, clearKv: 17 },
  },
  {
    // Plant setting, from memory: 3 kV/min sustained over 2 min means a neutralizer or the
    // material has changed for the worse, well before the magnitude limit is reached.
    id: 3,
    version: 1,
    kind: "charge_rate",
    severity: "medium",
    scope: {},
    onDelayS: 30,
    offDelayS: 60,
    onlyWhileRunning: true,
    params: { rateKvPerMin: 3, clearRateKvPerMin: 1.5, windowS: 120 },
  },
  {
    // Common practice, from memory: static problems multiply below about 30 % RH; clear at
    // 33 % so a hall hovering at the limit does not chatter.
    id: 4,
    version: 1,
    kind: "rh_low",
    severity: "medium",
    scope: {},
    onDelayS: 120,
    offDelayS: 300,
    onlyWhileRunning: false,
    params: { limitPct: 30, clearPct: 33 },
  },
  {
    // Plant setting, from memory: an hour's warning from a 30-minute trend gives the shift
    // time to start humidifiers or slow the line.
    id: 5,
    version: 1,
    kind: "rh_forecast",
    severity: "low",
    scope: {},
    onDelayS: 300,
    offDelayS: 600,
    onlyWhileRunning: false,
    params: { limitPct: 30, horizonMin: 60, windowMin: 30, clearMarginPct: 2 },
  },
  {
    // Plant setting, from memory: sensors report every few seconds; two minutes without data
    // is a fault, not a hiccup.
    id: 6,
    version: 1,
    kind: "sensor_silent",
    severity: "medium",
    scope: {},
    onDelayS: 0,
    offDelayS: 60,
    onlyWhileRunning: false,
    params: { silentS: 120 },
  },
  {
    // Plant setting, from memory: a field meter over a running web always varies by more than
    // 0.05 kV in 10 min; a flat one is stuck or disconnected. Only while running, because a
    // stopped web legitimately reads a steady near-zero.
    id: 7,
    version: 1,
    kind: "sensor_flat",
    severity: "low",
    scope: {},
    onDelayS: 0,
    offDelayS: 60,
    onlyWhileRunning: true,
    params: { channel: "charge_kv", windowS: 600, tolerance: 0.05 },
  },
  {
    // Plant setting, from memory: a clean neutralizer takes most of the charge off (about
    // 90 %); less than half over 5 min means it is fouled or its power unit is failing.
    // Off-delay 45 min: a stopped line counts as clear, and a fouled bar does not heal during a
    // job change (25 min) or a short stop, so the alert stays one alert across them (tuned with
    // npm run bench:alerts). Judged from 0.5 kV before the bar: a well-neutralized unwind in
    // normal humidity carries about 1 kV (simulators/plant-model.ts).
    id: 8,
    version: 1,
    kind: "effect_loss",
    severity: "medium",
    scope: {},
    onDelayS: 60,
    offDelayS: 2700,
    onlyWhileRunning: true,
    params: { minReductionFraction: 0.5, clearReductionFraction: 0.6, windowS: 300, minBeforeKv: 0.5 },
  },
];

/** The defaults, parsed (so any mistake here fails at import, not in the worker). */
export const DEFAULT_RULES: readonly RuleDefinition[] = ruleListSchema.parse(DEFAULT_RULE_INPUTS);
