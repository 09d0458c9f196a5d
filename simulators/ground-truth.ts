// Ground truth: for every incident a simulation plays, a record of what happened, where, when it
// started, when it would have caused trouble and when it ended. The trouble moment comes from the
// plant model itself (noise-free), not from any rule, so `npm run bench:alerts` can score the
// rules against it.
//
// Trouble, per kind (plant settings, from memory / common practice):
// - humidity drop: the hall's RH passes the jam-risk level, JAM_RISK_RH_PCT (30 %: static
//   problems multiply below about 30 % RH, lib/rules/defaults.ts);
// - fouling bar: the bar has lost most of its effect, η below FOULED_EFFECT (a charged-plate
//   check fails, the web leaves it barely neutralized);
// - power-unit fault, silent sensor, dead gateway: they act at once, so trouble is when they
//   have gone unseen for UNSEEN_MS (the web or the plant's view of it unguarded for ten minutes);
// - speed-up: charge at a point of the line passes the nuisance level, NUISANCE_KV (15 kV:
//   clinging, dust pick-up and misfeeds on film webs above 10–15 kV).
import { DEMO_AREAS, DEMO_LINES } from "../lib/demo-plant";
import type { IncidentPlan } from "./incident-plan";
import { CLEAN_EFFECT, lineState, planOf, PlantModel, type Scenario } from "./plant-model";
import { DAY_MS as DAY } from "../lib/vocabulary/time";

const MIN = 60_000;

export const JAM_RISK_RH_PCT = 30;
/** RH back above this ends a humidity incident (the hall is out of the jam-risk band with margin). */
export const HUMIDITY_RECOVERED_PCT = 33;
export const FOULED_EFFECT = 0.3;
export const UNSEEN_MS = 10 * MIN;
export const NUISANCE_KV = 15;

export const INCIDENT_KINDS = ["humidity_drop", "fouling_bar", "power_unit_fault", "silent_sensor", "dead_gateway", "speed_up"] as const;
export type IncidentKind = (typeof INCIDENT_KINDS)[number];

export type IncidentWhere = { areaSlug?: string; lineSlug?: string; pointSlug?: string; deviceCodes?: readonly string[]; gatewayKey?: string };

export type GroundTruthIncident = {
  id: string;
  kind: IncidentKind;
  what: string;
  where: IncidentWhere;
  startMs: number;
  /** When it would cause trouble; null when it ended (or the span did) before it did. */
  troubleMs: number | null;
  endMs: number;
};

function lineOf(slug: string) {
  const lineIndex = DEMO_LINES.findIndex((l) => l.slug === slug);
  return { line: DEMO_LINES[lineIndex], lineIndex };
}

/** Humidity incidents: each spell of a hall's (noise-free) RH under the jam-risk level, with its cause's start. */
function humidityIncidents(model: PlantModel, plan: IncidentPlan, fromMs: number, toMs: number): GroundTruthIncident[] {
  const out: GroundTruthIncident[] = [];
  for (const area of DEMO_AREAS) {
    let troubleMs: number | null = null;
    let lastNormalMs = fromMs;
    for (let t = Math.ceil(fromMs / MIN) * MIN; t < toMs; t += MIN) {
      const rh = model.climate.at(area, t).rhPct;
      if (troubleMs === null) {
        if (rh >= HUMIDITY_RECOVERED_PCT + 3) lastNormalMs = t;
        if (rh < JAM_RISK_RH_PCT) troubleMs = t;
        continue;
      }
      if (rh > HUMIDITY_RECOVERED_PCT || t + MIN >= toMs) {
        const trouble: number = troubleMs;
        const causes = [
          ...plan.coldSpells.filter((s) => s.startMs <= trouble && s.endMs + s.rampOutMs >= trouble).map((s) => s.startMs),
          ...plan.humidifierFailures.filter((f) => f.areaSlug === area.slug && f.startMs <= trouble && f.endMs >= trouble - 6 * 3_600_000).map((f) => f.startMs),
        ];
        const startMs = Math.max(lastNormalMs, ...causes);
        out.push({ id: `humidity:${area.slug}:${trouble}`, kind: "humidity_drop", what: `Humidity drop toward jam risk in ${area.name}`, where: { areaSlug: area.slug }, startMs, troubleMs: trouble, endMs: t });
        troubleMs = null;
        lastNormalMs = t;
      }
    }
  }
  return out;
}

/** Every incident of the scenario's plan within [fromMs, toMs). */
export function groundTruth(sc: Scenario, fromMs: number, toMs: number): GroundTruthIncident[] {
  const plan = planOf(sc);
  const model = new PlantModel(sc);
  const out: GroundTruthIncident[] = humidityIncidents(model, plan, fromMs, toMs);
  const within = (s: number, e: number) => e > fromMs && s < toMs;
  for (const f of plan.fouling) {
    const endMs = Math.min(f.endMs ?? toMs, toMs);
    if (!within(f.cleanedMs, endMs)) continue;
    const troubleAt = f.cleanedMs + f.tauDays * Math.log(CLEAN_EFFECT / FOULED_EFFECT) * DAY;
    out.push({
      id: `fouling:${f.lineSlug}:${f.pointSlug}:${f.cleanedMs}`,
      kind: "fouling_bar",
      what: `Bar fouling at ${lineOf(f.lineSlug).line.name} ${f.pointSlug}`,
      where: { lineSlug: f.lineSlug, pointSlug: f.pointSlug },
      startMs: f.cleanedMs,
      troubleMs: troubleAt < endMs ? troubleAt : null,
      endMs,
    });
  }
  for (const f of plan.powerFaults) {
    if (!within(f.startMs, f.endMs)) continue;
    out.push({
      id: `power:${f.lineSlug}:${f.pointSlug}:${f.startMs}`,
      kind: "power_unit_fault",
      what: `Power-unit fault at ${lineOf(f.lineSlug).line.name} ${f.pointSlug}`,
      where: { lineSlug: f.lineSlug, pointSlug: f.pointSlug },
      startMs: f.startMs,
      troubleMs: f.startMs + UNSEEN_MS < f.endMs ? f.startMs + UNSEEN_MS : null,
      endMs: f.endMs,
    });
  }
  for (const s of plan.silences) {
    if (!within(s.startMs, s.endMs)) continue;
    const gateway = s.gatewayKey !== undefined;
    out.push({
      id: `${gateway ? "gateway" : "silent"}:${s.gatewayKey ?? s.codes.join(",")}:${s.startMs}`,
      kind: gateway ? "dead_gateway" : "silent_sensor",
      what: gateway ? `Gateway ${s.gatewayKey} dead (${s.codes.length} devices)` : `Sensor ${s.codes.join(", ")} silent`,
      where: { deviceCodes: s.codes, ...(gateway ? { gatewayKey: s.gatewayKey } : {}) },
      startMs: s.startMs,
      troubleMs: s.startMs + UNSEEN_MS < s.endMs ? s.startMs + UNSEEN_MS : null,
      endMs: s.endMs,
    });
  }
  for (const s of plan.speedUps) {
    if (!within(s.startMs, s.endMs)) continue;
    const { line, lineIndex } = lineOf(s.lineSlug);
    let troubleMs: number | null = null;
    for (let t = s.startMs; t < s.endMs && troubleMs === null; t += 10_000) {
      if (!lineState(sc, line, lineIndex, t).running) continue;
      if (model.lineCharges(line, lineIndex, t).some((q) => Math.abs(q) > NUISANCE_KV)) troubleMs = t;
    }
    out.push({ id: `speed:${s.lineSlug}:${s.startMs}`, kind: "speed_up", what: `${line.name} run at ×${s.factor.toFixed(2)} speed`, where: { lineSlug: s.lineSlug }, startMs: s.startMs, troubleMs, endMs: s.endMs });
  }
  return out.sort((a, b) => a.startMs - b.startMs);
}
