// The demo plant's physics and scenario (plant in lib/demo-plant.ts), as pure functions of time: the same
// seed, anchor and instant always give the same reading, so the live simulator and the backfill
// produce identical data, restarts change nothing, and tests can reason about the output.
//
// Hall humidity (psychrometrics from lib/physics, ASHRAE Fundamentals ch. 1):
//   outdoor air (temperature with a daily cycle and slow weather swings, RH over water as
//   weather services report it) is heated to the hall's temperature without added moisture, so
//   its humidity ratio W is kept; people and process add a little water; the humidifier adds up
//   to its capacity to reach the hall's lower RH limit + 5 %. That gives the hall's equilibrium
//   W_eq(t); the hall follows it with a first-order lag (air-change time constant HALL_TAU_MIN),
//   computed as an exponentially weighted mean of W_eq over the past 6 h, so it stays a pure
//   function of time. RH = RH(T_hall, W).
//   Cold snap: outdoor temperature falls by the spell's deltaTempC over rampInH and the air is
//   drier; the heated halls dry out over hours (typ. 43 % → under 20 %).
// Charge at a measuring point (common-practice model):
//   fresh charge g = polarity · baseKv · (speed / nominal)^0.7 · f(RH) at each point's process;
//   after a bar, q = before · (1 − η) + PICKUP · g, where "before" is the charge the web carries
//   into the bar (the previous point's meter reading; the unwind's own fresh charge for the
//   first point) and PICKUP · g what the web picks up on the rollers between bar and meter. So a
//   healthy bar shows its real reduction between the meters before and after it.
//   f(RH) = 10^(−(RH − 20)/40): tenfold less from 20 % to 60 % RH (published tables of generated
//   voltages at 10–20 % vs 65–90 % RH show ratios of 10–40; from memory, common practice).
//   η is the effect of the point's neutralizer: 0.92 clean, decaying as exp(−age/τ) as it
//   fouls (τ shorter on solvent presses, where ink mist builds up), restored by each cleaning;
//   a power-unit fault sets η = 0 at once. A bar's ion output is fixed, so above nominal speed
//   it neutralizes less of a faster web: η × √(nominal / speed) (a simulator assumption: fewer
//   ions per metre of web, partly made up by the stronger field of a more charged web).
//   A stopped web carries almost no fresh charge.
//   Readings are clipped to 95 % of what air breakdown allows at 25 mm (lib/physics).
// Scenario, relative to the anchor (the moment the demo first started, "now" for a fresh demo),
// unless the scenario carries its own incident plan (simulators/incident-plan.ts):
//   cold snap from 30 h before to 12 h after; the infeed neutralizer of Gravure Press 1 last
//   cleaned 6.5 days before, then skipped, fouling fast (τ 3.5 d) until it has lost most of its
//   effect (η 0.92 → 0.14 at the anchor; the charge after it approaches the charge before it); a
//   power-unit fault on Flexo Press 2 at the print exit 6 h before (90 min) and again 40 min
//   after the anchor (15 min); the knife-exit field meter of Slitter S1 silent 10 h before (2 h)
//   and 25 min after (6 min). The live simulator also sends the odd malformed message.
import {
  DEMO_AREAS,
  DEMO_LINES,
  fieldMeterCode,
  loggerCode,
  speedGatewayCode,
  type DemoArea,
  type DemoLine,
} from "../lib/demo-plant";
import { maxReadingKv } from "../lib/physics/electrostatics";
import { dryAirMassFlowKgPerH, humidityRatioKgPerKg, rhFromHumidityRatioPct } from "../lib/physics/psychrometrics";
import type { Channel, DeviceKind } from "../lib/contract/readings-payload";
import {
  coldSpellAt,
  demoIncidentPlan,
  foulingAt,
  humidifierFailed,
  isSilentIn,
  powerFaultAt,
  speedFactorAt,
  type IncidentPlan,
} from "./incident-plan";
import { DAY_MS as DAY } from "../lib/vocabulary/time";

const MIN = 60_000;
const HOUR = 3_600_000;

export const HALL_TAU_MIN = 50;
export const CLEAN_EFFECT = 0.92;
/** Share of a point's fresh charge the web picks up between the bar and the meter after it. */
export const PICKUP = 0.005;
export const MAX_KV = 0.95 * maxReadingKv(25);

// The demo's incidents (cold snap, fouling bar, power-unit faults, silent meter) are its plan:
// demoIncidentPlan in simulators/incident-plan.ts.
/** water added inside each hall by people and process, kg/h (an assumption for the demo) */
const INTERNAL_MOISTURE_KG_PER_H: Record<string, number> = { "press-hall": 1.5, "converting-hall": 1.0, "labelling-room": 0.3 };

/** Sample period of each kind of device, ms. */
export const SAMPLE_PERIOD_MS: Record<DeviceKind, number> = { field_meter: 1000, th_logger: 10_000, speed_gateway: 5000 };

export type SimDevice = {
  code: string;
  kind: DeviceKind;
  index: number;
  line?: DemoLine;
  lineIndex?: number;
  pointIndex?: number;
  area: DemoArea;
};

export type Scenario = { anchorMs: number; seed: number; /** the incidents to play; the demo's own when absent */ incidents?: IncidentPlan };

const planCache = new WeakMap<Scenario, IncidentPlan>();
/** The scenario's incident plan (the demo's, relative to its anchor, unless it carries one). */
export function planOf(sc: Scenario): IncidentPlan {
  if (sc.incidents) return sc.incidents;
  let plan = planCache.get(sc);
  if (!plan) {
    plan = demoIncidentPlan(sc.anchorMs);
    planCache.set(sc, plan);
  }
  return plan;
}

export function listSimDevices(): SimDevice[] {
  const out: SimDevice[] = [];
  for (const area of DEMO_AREAS) out.push({ code: loggerCode(area.slug), kind: "th_logger", index: out.length, area });
  DEMO_LINES.forEach((line, lineIndex) => {
    const area = DEMO_AREAS.find((a) => a.slug === line.areaSlug)!;
    out.push({ code: speedGatewayCode(line.slug), kind: "speed_gateway", index: out.length, line, lineIndex, area });
    line.points.forEach((p, pointIndex) =>
      out.push({ code: fieldMeterCode(line.slug, p.slug), kind: "field_meter", index: out.length, line, lineIndex, pointIndex, area }),
    );
  });
  return out;
}

// ---- deterministic noise ----

function mix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** Uniform in [0, 1) from integers (seed, stream, sub-stream, time step). */
export function hashUniform(seed: number, a: number, b: number, t: number): number {
  let h = mix32(seed ^ 0x9e3779b9);
  h = mix32(h ^ Math.imul(a + 1, 0x27d4eb2f));
  h = mix32(h ^ Math.imul(b + 1, 0x165667b1));
  h = mix32(h ^ (t >>> 0));
  h = mix32(h ^ Math.floor(t / 4294967296));
  return h / 4294967296;
}

export function hashGaussian(seed: number, a: number, b: number, t: number): number {
  const u1 = Math.max(1e-12, hashUniform(seed, a, b * 2 + 11, t));
  const u2 = hashUniform(seed, a, b * 2 + 12, t);
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

/** Smooth pseudo-random wobble in [-1, 1] with a period of hours (sum of two seeded sines). */
function wobble(seed: number, stream: number, tMs: number, periodH: number): number {
  const p1 = hashUniform(seed, stream, 1, 0) * 2 * Math.PI;
  const p2 = hashUniform(seed, stream, 2, 0) * 2 * Math.PI;
  const x = (tMs / HOUR) * ((2 * Math.PI) / periodH);
  return 0.65 * Math.sin(x + p1) + 0.35 * Math.sin(2.7 * x + p2);
}

// ---- weather and halls ----

/** 0 outside the cold snap, 1 at its depth. */
export function coldSnapDepth(sc: Scenario, tMs: number): number {
  return coldSpellAt(planOf(sc), tMs).depth;
}

/** Hour of day (UTC) as a fraction of a day's cycle peaking mid-afternoon. */
function dailyCycle(tMs: number): number {
  const hourOfDay = ((tMs % DAY) + DAY) % DAY / HOUR;
  return Math.cos(((hourOfDay - 15) / 24) * 2 * Math.PI);
}

export function outdoorAir(sc: Scenario, tMs: number): { tempC: number; rhPct: number } {
  const spell = coldSpellAt(planOf(sc), tMs);
  const snap = spell.depth;
  const daily = dailyCycle(tMs);
  const tempC = 8 + 3 * daily + 2 * wobble(sc.seed, 901, tMs, 80) + spell.deltaTempC * snap;
  const normalRh = 88 - 7 * daily + 3 * wobble(sc.seed, 902, tMs, 50);
  const rhPct = normalRh + (spell.outdoorRhPct - normalRh) * snap;
  return { tempC, rhPct: Math.min(99, Math.max(30, rhPct)) };
}

export function hallTempC(sc: Scenario, area: DemoArea, areaIndex: number, tMs: number): number {
  // heating holds the setpoint within a degree; it lags a little in the deepest cold
  return area.tempSetpointC + 0.7 * dailyCycle(tMs - 2 * HOUR) + 0.3 * wobble(sc.seed, 910 + areaIndex, tMs, 5) - 1.2 * coldSnapDepth(sc, tMs);
}

function equilibriumHumidityRatio(sc: Scenario, area: DemoArea, areaIndex: number, tMs: number): number {
  const out = outdoorAir(sc, tMs);
  const wOut = humidityRatioKgPerKg(out.tempC, out.rhPct, undefined, "water");
  const tIn = hallTempC(sc, area, areaIndex, tMs);
  const dryAirKgPerH = dryAirMassFlowKgPerH(Math.max(1, area.airflowM3PerH), tIn, 40);
  const internal = INTERNAL_MOISTURE_KG_PER_H[area.slug] ?? 0.5;
  const wTarget = humidityRatioKgPerKg(tIn, Math.min(95, area.rhMinPct + 5));
  const needKgPerH = Math.max(0, dryAirKgPerH * (wTarget - wOut) - internal);
  const capacityKgPerH = humidifierFailed(planOf(sc), area.slug, tMs) ? 0 : area.humidifierKgPerH;
  const humidifierKgPerH = Math.min(capacityKgPerH, needKgPerH);
  return wOut + (internal + humidifierKgPerH) / dryAirKgPerH;
}

const LAG_STEP_MIN = 5;
const LAG_STEPS = Math.ceil((6 * 60) / LAG_STEP_MIN);
const LAG_WEIGHTS = (() => {
  const w = Array.from({ length: LAG_STEPS + 1 }, (_, k) => Math.exp((-k * LAG_STEP_MIN) / HALL_TAU_MIN));
  const sum = w.reduce((a, b) => a + b, 0);
  return w.map((x) => x / sum);
})();

export type HallState = { tempC: number; rhPct: number };

/**
 * The hall's temperature and RH (no sensor noise). Evaluated on whole minutes and interpolated
 * between, with a small cache, since every field meter of the hall needs it every second.
 */
export class HallClimate {
  private cache = new Map<string, HallState>();
  private equilibrium = new Map<string, number>();
  constructor(private readonly sc: Scenario) {}

  private equilibriumAt(area: DemoArea, areaIndex: number, slotMs: number): number {
    const key = `${areaIndex}:${slotMs}`;
    const hit = this.equilibrium.get(key);
    if (hit !== undefined) return hit;
    const w = equilibriumHumidityRatio(this.sc, area, areaIndex, slotMs);
    if (this.equilibrium.size > 20_000) this.equilibrium.clear();
    this.equilibrium.set(key, w);
    return w;
  }

  private atMinute(area: DemoArea, areaIndex: number, minuteMs: number): HallState {
    const key = `${areaIndex}:${minuteMs}`;
    const hit = this.cache.get(key);
    if (hit) return hit;
    let w = 0;
    for (let k = 0; k <= LAG_STEPS; k++) {
      // the lag grid is aligned to absolute 5-minute steps so every minute sees the same past
      const t = Math.floor(minuteMs / (LAG_STEP_MIN * MIN)) * LAG_STEP_MIN * MIN - k * LAG_STEP_MIN * MIN;
      w += LAG_WEIGHTS[k] * this.equilibriumAt(area, areaIndex, t);
    }
    const tempC = hallTempC(this.sc, area, areaIndex, minuteMs);
    const state = { tempC, rhPct: Math.min(100, Math.max(1, rhFromHumidityRatioPct(tempC, w))) };
    if (this.cache.size > 20_000) this.cache.clear();
    this.cache.set(key, state);
    return state;
  }

  at(area: DemoArea, tMs: number): HallState {
    const areaIndex = DEMO_AREAS.indexOf(area);
    const m0 = Math.floor(tMs / MIN) * MIN;
    const a = this.atMinute(area, areaIndex, m0);
    const b = this.atMinute(area, areaIndex, m0 + MIN);
    const f = (tMs - m0) / MIN;
    return { tempC: a.tempC + (b.tempC - a.tempC) * f, rhPct: a.rhPct + (b.rhPct - a.rhPct) * f };
  }
}

// ---- lines ----

export type LineState = { running: boolean; speedMpm: number };

/** Planned and unplanned stops, and speed with a ramp after each start. */
export function lineState(sc: Scenario, line: DemoLine, lineIndex: number, tMs: number): LineState {
  const stopEnd = stoppedUntil(sc, line, lineIndex, tMs);
  if (stopEnd !== null) return { running: false, speedMpm: 0 };
  // ramp up over 90 s after the last stop
  let sinceStartS = Infinity;
  const prevStopEnd = stoppedUntil(sc, line, lineIndex, tMs - 90_000);
  if (prevStopEnd !== null && prevStopEnd <= tMs) sinceStartS = (tMs - prevStopEnd) / 1000;
  const ramp = Math.min(1, sinceStartS / 90);
  const speed = line.nominalSpeedMpm * (0.93 + 0.05 * wobble(sc.seed, 300 + lineIndex, tMs, 1.5)) * ramp * speedFactorAt(planOf(sc), line.slug, tMs);
  return { running: true, speedMpm: Math.max(0, speed) };
}

/** End of the stop covering tMs, or null when the line runs then. */
function stoppedUntil(sc: Scenario, line: DemoLine, lineIndex: number, tMs: number): number | null {
  const dayStart = Math.floor(tMs / DAY) * DAY;
  const hourOfDay = (tMs - dayStart) / HOUR;
  // the labeller runs two shifts (06:00-22:00 UTC)
  if (line.kind === "labeller" && (hourOfDay < 6 || hourOfDay >= 22)) {
    return hourOfDay < 6 ? dayStart + 6 * HOUR : dayStart + DAY + 6 * HOUR;
  }
  // job changes: 25 min every 8 h, staggered by line
  const jobOffsetH = 1 + lineIndex * 1.3;
  const sinceJob = (((hourOfDay - jobOffsetH) % 8) + 8) % 8;
  if (sinceJob < 25 / 60) return tMs + (25 / 60 - sinceJob) * HOUR;
  // unplanned stops: in some half-hour blocks, 8-23 min
  const block = Math.floor(tMs / (30 * MIN));
  const u = hashUniform(sc.seed, 400 + lineIndex, 0, block);
  if (u < 0.07) {
    const start = block * 30 * MIN + hashUniform(sc.seed, 400 + lineIndex, 1, block) * 5 * MIN;
    const end = start + (8 + hashUniform(sc.seed, 400 + lineIndex, 2, block) * 15) * MIN;
    if (tMs >= start && tMs < end) return end;
  }
  return null;
}

/** Effect of the neutralizer serving a point, 0…1. */
export function neutralizerEffect(sc: Scenario, line: DemoLine, lineIndex: number, pointIndex: number, tMs: number): number {
  const point = line.points[pointIndex];
  const plan = planOf(sc);
  if (powerFaultAt(plan, line.slug, point.slug, tMs)) return 0;
  const fouling = foulingAt(plan, line.slug, point.slug, tMs);
  if (fouling !== null) return CLEAN_EFFECT * Math.exp(-fouling.ageDays / fouling.tauDays);
  // cleaned on schedule (7 days on solvent presses, 14 elsewhere), phase staggered per unit
  const intervalDays = line.solventName ? 7 : 14;
  const tauDays = line.solventName ? 40 : 90;
  const phaseDays = hashUniform(sc.seed, 500 + lineIndex, pointIndex, 0) * intervalDays;
  const ageDays = ((((tMs / DAY - phaseDays) % intervalDays) + intervalDays) % intervalDays);
  return CLEAN_EFFECT * Math.exp(-ageDays / tauDays);
}

/** Relative charging versus humidity: 1 at 20 % RH, 0.1 at 60 % RH. */
export function humidityFactor(rhPct: number): number {
  const rh = Math.min(90, Math.max(5, rhPct));
  return Math.pow(10, -(rh - 20) / 40);
}

export type ChannelValues = Partial<Record<Channel, number>>;

const round = (v: number, digits: number) => {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
};

export class PlantModel {
  readonly devices: SimDevice[];
  readonly climate: HallClimate;
  private readonly lineCache = new Map<number, { tMs: number; charges: number[] }>();

  constructor(readonly scenario: Scenario) {
    this.devices = listSimDevices();
    this.climate = new HallClimate(scenario);
  }

  isSilent(code: string, tMs: number): boolean {
    return isSilentIn(planOf(this.scenario), code, tMs);
  }

  /** Field-meter readings (without noise) of every point of a line at one instant (ground truth reads them too). */
  lineCharges(line: DemoLine, lineIndex: number, tMs: number): number[] {
    const hit = this.lineCache.get(lineIndex);
    if (hit && hit.tMs === tMs) return hit.charges;
    const state = lineState(this.scenario, line, lineIndex, tMs);
    const hall = this.climate.at(DEMO_AREAS.find((a) => a.slug === line.areaSlug)!, tMs);
    const speedRatio = state.speedMpm / line.nominalSpeedMpm;
    const speedFactor = state.running ? Math.pow(speedRatio, 0.7) : 0.03;
    const rhFactor = humidityFactor(hall.rhPct);
    // a bar's fixed ion output covers less of a faster web
    const barCover = state.running && speedRatio > 1 ? 1 / Math.sqrt(speedRatio) : 1;
    const charges: number[] = [];
    let before = 0;
    line.points.forEach((p, i) => {
      const eta = neutralizerEffect(this.scenario, line, lineIndex, i, tMs) * barCover;
      const fresh = p.polarity * p.baseKv * speedFactor * rhFactor;
      // the first bar sees the unwind's own fresh charge; later bars what the meter before them read
      const q = (i === 0 ? fresh : before) * (1 - eta) + PICKUP * fresh;
      charges.push(q);
      before = q;
    });
    this.lineCache.set(lineIndex, { tMs, charges });
    return charges;
  }

  /** The channel values a device reports at tMs, or null when it is silent then. */
  valuesAt(device: SimDevice, tMs: number): ChannelValues | null {
    if (this.isSilent(device.code, tMs)) return null;
    const seed = this.scenario.seed;
    const step = Math.floor(tMs / 1000);
    if (device.kind === "th_logger") {
      const hall = this.climate.at(device.area, tMs);
      return {
        temp_c: round(hall.tempC + 0.08 * hashGaussian(seed, device.index, 1, step), 2),
        rh_pct: round(Math.min(100, Math.max(0, hall.rhPct + 0.35 * hashGaussian(seed, device.index, 2, step))), 2),
      };
    }
    const line = device.line!;
    const lineIndex = device.lineIndex!;
    if (device.kind === "speed_gateway") {
      const s = lineState(this.scenario, line, lineIndex, tMs);
      const speed = s.running ? Math.max(0, s.speedMpm + 0.4 * hashGaussian(seed, device.index, 3, step)) : 0;
      return { speed_mpm: round(speed, 1), running: s.running ? 1 : 0 };
    }
    const q = this.lineCharges(line, lineIndex, tMs)[device.pointIndex!];
    let value = q + (0.04 * Math.abs(q) + 0.05) * hashGaussian(seed, device.index, 4, step);
    // the odd discharge event or splice: a short spike
    if (hashUniform(seed, device.index, 5, step) < 1 / 3000) value += 3 * q;
    value = Math.max(-MAX_KV, Math.min(MAX_KV, value));
    return { charge_kv: round(value, 3) };
  }
}
