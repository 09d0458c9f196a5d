// A seeded plan of incidents over a span, for `npm run bench:alerts`: several of each kind,
// spread so that two incidents never share a place at the same time. Same seed, same plan.
import { DEMO_AREAS, DEMO_LINES, fieldMeterCode, loggerCode, speedGatewayCode } from "../lib/demo-plant";
import type { ColdSpell, FoulingBar, IncidentPlan, PowerFault, Silence, SpeedUp } from "./incident-plan";

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;

/** The demo's edge nodes: each line's speed gateway and field meters report through one node. */
export function demoEdgeNodes(): Array<{ key: string; name: string; lineSlug: string; codes: string[] }> {
  return DEMO_LINES.map((l) => ({
    key: `edge-${l.slug}`,
    name: `Edge node of ${l.name}`,
    lineSlug: l.slug,
    codes: [speedGatewayCode(l.slug), ...l.points.map((p) => fieldMeterCode(l.slug, p.slug))],
  }));
}

/** Every device code of the demo plant (the whole data feed). */
export function demoDeviceCodes(): string[] {
  return [...DEMO_AREAS.map((a) => loggerCode(a.slug)), ...demoEdgeNodes().flatMap((n) => n.codes)];
}

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export type ScheduleCounts = { coldSpells: number; fouling: number; powerFaults: number; silentSensors: number; deadGateways: number; speedUps: number };
export const DEFAULT_COUNTS: ScheduleCounts = { coldSpells: 3, fouling: 4, powerFaults: 4, silentSensors: 4, deadGateways: 3, speedUps: 3 };

/** Lines whose first bar carries enough charge to judge the second (meters before and after it). */
const JUDGEABLE_LINES = ["gravure-1", "flexo-2", "slitter-1", "laminator-1"];

export function scheduleIncidents(seed: number, fromMs: number, days: number, counts: ScheduleCounts = DEFAULT_COUNTS): IncidentPlan {
  const rnd = mulberry32(seed);
  const pick = <T>(list: readonly T[]): T => list[Math.floor(rnd() * list.length)];
  const toMs = fromMs + days * DAY;
  const busy: Array<{ place: string; startMs: number; endMs: number }> = [];
  const free = (place: string, s: number, e: number) => !busy.some((b) => (b.place === place || b.place === "*" || place === "*") && s < b.endMs + 2 * HOUR && e > b.startMs - 2 * HOUR);
  /** A start within the span (after a day of settling) where `place` is free for the duration. */
  const slot = (place: string, durationMs: number): number | null => {
    for (let tries = 0; tries < 200; tries++) {
      const s = Math.floor((fromMs + DAY + rnd() * (toMs - fromMs - 2 * DAY - durationMs)) / MIN) * MIN;
      if (free(place, s, s + durationMs)) {
        busy.push({ place, startMs: s, endMs: s + durationMs });
        return s;
      }
    }
    return null;
  };

  const coldSpells: ColdSpell[] = [];
  for (let i = 0; i < counts.coldSpells; i++) {
    const lengthMs = (8 + rnd() * 12) * HOUR;
    const s = slot("weather", lengthMs + 16 * HOUR);
    if (s === null) continue;
    coldSpells.push({ startMs: s, rampInMs: 6 * HOUR, endMs: s + lengthMs, rampOutMs: 10 * HOUR, deltaTempC: -(9 + rnd() * 5), outdoorRhPct: 74 + rnd() * 6 });
  }
  // speed-ups while the halls are dry, on a line with a strong unwind
  const speedUps: SpeedUp[] = [];
  coldSpells.slice(0, counts.speedUps).forEach((c) => {
    const lineSlug = pick(JUDGEABLE_LINES);
    const s = c.startMs + c.rampInMs + Math.floor(rnd() * 3) * HOUR;
    busy.push({ place: lineSlug, startMs: s, endMs: s + 80 * MIN });
    speedUps.push({ lineSlug, startMs: s, rampMs: 15 * MIN, factor: 2.2, endMs: s + 65 * MIN });
  });
  const fouling: FoulingBar[] = [];
  for (let i = 0; i < counts.fouling; i++) {
    const line = DEMO_LINES.find((l) => l.slug === JUDGEABLE_LINES[i % JUDGEABLE_LINES.length])!;
    const tauDays = 1 + rnd() * 1.5;
    const lengthMs = tauDays * Math.log(0.92 / 0.3) * DAY + DAY;
    const s = slot(line.slug, lengthMs);
    if (s === null) continue;
    fouling.push({ lineSlug: line.slug, pointSlug: line.points[1].slug, cleanedMs: s, tauDays, endMs: s + lengthMs });
  }
  const powerFaults: PowerFault[] = [];
  for (let i = 0; i < counts.powerFaults; i++) {
    const line = DEMO_LINES.find((l) => l.slug === pick(JUDGEABLE_LINES))!;
    const durationMs = (20 + rnd() * 70) * MIN;
    const s = slot(line.slug, durationMs);
    if (s === null) continue;
    powerFaults.push({ lineSlug: line.slug, pointSlug: line.points[1].slug, startMs: s, endMs: s + durationMs });
  }
  const silences: Silence[] = [];
  for (let i = 0; i < counts.silentSensors; i++) {
    const line = pick(DEMO_LINES);
    const point = pick(line.points);
    const durationMs = (15 + rnd() * 45) * MIN;
    const s = slot(line.slug, durationMs);
    if (s === null) continue;
    silences.push({ codes: [fieldMeterCode(line.slug, point.slug)], startMs: s, endMs: s + durationMs });
  }
  const nodes = demoEdgeNodes();
  for (let i = 0; i < counts.deadGateways; i++) {
    const node = pick(nodes);
    const durationMs = (20 + rnd() * 40) * MIN;
    const s = slot(node.lineSlug, durationMs);
    if (s === null) continue;
    silences.push({ codes: node.codes, startMs: s, endMs: s + durationMs, gatewayKey: node.key });
  }
  return { coldSpells, humidifierFailures: [], fouling, powerFaults, silences, speedUps };
}
