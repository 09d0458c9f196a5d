// The incidents a plant simulation plays: cold spells, humidifier failures, fouling bars,
// power-unit faults, silent sensors, dead gateways and speed-ups. The plant model
// (simulators/plant-model.ts) reads a plan; the demo's own plan (demoIncidentPlan) is the
// scenario described there, and `npm run bench:alerts` draws a seeded 30-day plan
// (simulators/incident-schedule.ts). Ground truth for either: simulators/ground-truth.ts.
import { fieldMeterCode } from "../lib/demo-plant";
import { DAY_MS as DAY } from "../lib/vocabulary/time";

const HOUR = 3_600_000;

export type ColdSpell = { startMs: number; rampInMs: number; endMs: number; rampOutMs: number; deltaTempC: number; outdoorRhPct: number };
export type HumidifierFailure = { areaSlug: string; startMs: number; endMs: number };
/** A bar cleaned at cleanedMs that then fouls with time constant tauDays until endMs (cleaned again; null: not in the span). */
export type FoulingBar = { lineSlug: string; pointSlug: string; cleanedMs: number; tauDays: number; endMs: number | null };
export type PowerFault = { lineSlug: string; pointSlug: string; startMs: number; endMs: number };
/** Devices that send nothing: one sensor, or every device behind a gateway. */
export type Silence = { codes: readonly string[]; startMs: number; endMs: number; gatewayKey?: string };
/** The line is run faster: speed ramps up to factor × nominal over rampMs, and down again by endMs. */
export type SpeedUp = { lineSlug: string; startMs: number; rampMs: number; factor: number; endMs: number };

export type IncidentPlan = {
  coldSpells: readonly ColdSpell[];
  humidifierFailures: readonly HumidifierFailure[];
  fouling: readonly FoulingBar[];
  powerFaults: readonly PowerFault[];
  silences: readonly Silence[];
  speedUps: readonly SpeedUp[];
};

export const EMPTY_PLAN: IncidentPlan = { coldSpells: [], humidifierFailures: [], fouling: [], powerFaults: [], silences: [], speedUps: [] };

/**
 * The demo's scenario relative to its anchor: a cold snap from 30 h before to 12 h after; the
 * infeed bar of Gravure Press 1 (with a meter before it, at the unwind, and after it) last cleaned
 * 6.5 days before and fouling fast (τ 3.5 d); a power-unit fault on Flexo Press 2 at the print
 * exit 6 h before (90 min) and again 40 min after the anchor (15 min); the knife-exit meter of
 * Slitter S1 silent 10 h before (2 h) and 25 min after (6 min).
 */
export function demoIncidentPlan(anchorMs: number): IncidentPlan {
  const at = (h: number) => anchorMs + h * HOUR;
  return {
    coldSpells: [{ startMs: at(-30), rampInMs: 6 * HOUR, endMs: at(12), rampOutMs: 10 * HOUR, deltaTempC: -14, outdoorRhPct: 76 }],
    humidifierFailures: [],
    fouling: [{ lineSlug: "gravure-1", pointSlug: "infeed", cleanedMs: anchorMs - 6.5 * DAY, tauDays: 3.5, endMs: null }],
    powerFaults: [
      { lineSlug: "flexo-2", pointSlug: "print-exit", startMs: at(-6), endMs: at(-6 + 1.5) },
      { lineSlug: "flexo-2", pointSlug: "print-exit", startMs: at(40 / 60), endMs: at(40 / 60 + 0.25) },
    ],
    silences: [
      { codes: [fieldMeterCode("slitter-1", "knife-exit")], startMs: at(-10), endMs: at(-8) },
      { codes: [fieldMeterCode("slitter-1", "knife-exit")], startMs: at(25 / 60), endMs: at(25 / 60 + 0.1) },
    ],
    speedUps: [],
  };
}

const smoothstep = (x: number) => (x <= 0 ? 0 : x >= 1 ? 1 : x * x * (3 - 2 * x));

/** The deepest cold spell at tMs: 0 outside, 1 at its depth, with its temperature drop and outdoor RH. */
export function coldSpellAt(plan: IncidentPlan, tMs: number): { depth: number; deltaTempC: number; outdoorRhPct: number } {
  let best = { depth: 0, deltaTempC: 0, outdoorRhPct: 80 };
  for (const s of plan.coldSpells) {
    const into = smoothstep((tMs - s.startMs) / s.rampInMs);
    const out = smoothstep((tMs - s.endMs) / s.rampOutMs);
    const depth = into * (1 - out);
    if (depth * Math.abs(s.deltaTempC) > best.depth * Math.abs(best.deltaTempC)) best = { depth, deltaTempC: s.deltaTempC, outdoorRhPct: s.outdoorRhPct };
  }
  return best;
}

export function humidifierFailed(plan: IncidentPlan, areaSlug: string, tMs: number): boolean {
  return plan.humidifierFailures.some((f) => f.areaSlug === areaSlug && tMs >= f.startMs && tMs < f.endMs);
}

export function powerFaultAt(plan: IncidentPlan, lineSlug: string, pointSlug: string, tMs: number): boolean {
  return plan.powerFaults.some((f) => f.lineSlug === lineSlug && f.pointSlug === pointSlug && tMs >= f.startMs && tMs < f.endMs);
}

/** The fouling of a bar at tMs (its own time constant), or null when no fouling incident covers it. */
export function foulingAt(plan: IncidentPlan, lineSlug: string, pointSlug: string, tMs: number): { ageDays: number; tauDays: number } | null {
  for (const f of plan.fouling) {
    if (f.lineSlug !== lineSlug || f.pointSlug !== pointSlug || tMs < f.cleanedMs || (f.endMs !== null && tMs >= f.endMs)) continue;
    return { ageDays: (tMs - f.cleanedMs) / DAY, tauDays: f.tauDays };
  }
  return null;
}

export function isSilentIn(plan: IncidentPlan, code: string, tMs: number): boolean {
  return plan.silences.some((s) => tMs >= s.startMs && tMs < s.endMs && s.codes.includes(code));
}

/** Speed multiplier of a line at tMs from speed-up incidents (1 when none). */
export function speedFactorAt(plan: IncidentPlan, lineSlug: string, tMs: number): number {
  let factor = 1;
  for (const s of plan.speedUps) {
    if (s.lineSlug !== lineSlug || tMs < s.startMs || tMs >= s.endMs) continue;
    // up over rampMs, and back down over rampMs before endMs
    const ramp = Math.min(1, (tMs - s.startMs) / s.rampMs, (s.endMs - tMs) / s.rampMs);
    factor = Math.max(factor, 1 + (s.factor - 1) * ramp);
  }
  return factor;
}
