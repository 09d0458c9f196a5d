/**
 * Hand-built plant and series for the rules-engine tests. Invented demo names (Harrow Fen
 * Packaging): a Press Hall with a gravure press, a Converting Hall with a slitter-rewinder.
 */
import { createRuleEngine, type RuleEngine } from "../../../lib/rules/engine";
import type { AlertTransition, Channel, Reading, RuleDefinitionInput, Topology } from "../../../lib/rules/types";

/** 15 January 2025, 06:00 UTC: a winter morning shift. */
export const T0 = Date.UTC(2025, 0, 15, 6, 0, 0);
export const S = 1000;
export const MIN = 60 * S;

export const PLANT: Topology = {
  areas: [
    { areaId: 1, name: "Press Hall", climateSensorKey: "th-press" },
    { areaId: 2, name: "Converting Hall", climateSensorKey: "th-conv" },
  ],
  lines: [
    {
      lineId: 10,
      areaId: 1,
      name: "Gravure press",
      pointIds: [101, 102, 103],
      runningSensorKey: "gw-gravure",
      speedSensorKey: "gw-gravure",
    },
    {
      lineId: 20,
      areaId: 2,
      name: "Slitter-rewinder",
      pointIds: [201, 202],
      runningSensorKey: "gw-slitter",
      speedSensorKey: null,
    },
  ],
  points: [
    { pointId: 101, name: "Unwind", fieldMeterSensorKey: "fm-gp-unwind" },
    { pointId: 102, name: "Print deck 1", fieldMeterSensorKey: "fm-gp-deck1" },
    { pointId: 103, name: "Rewind", fieldMeterSensorKey: "fm-gp-rewind" },
    { pointId: 201, name: "Unwind", fieldMeterSensorKey: "fm-sr-unwind" },
    { pointId: 202, name: "Rewind", fieldMeterSensorKey: "fm-sr-rewind" },
  ],
  neutralizers: [{ neutralizerId: 7, name: "Bar U1", beforePointId: 101, afterPointId: 102 }],
};

type Base = Omit<RuleDefinitionInput, "kind" | "params" | "onlyWhileRunning">;

export function baseRule(id: number, over: Partial<Base> = {}): Base {
  return { id, version: 1, severity: "medium", scope: {}, onDelayS: 0, offDelayS: 0, ...over };
}

export function chargeHighRule(
  id: number,
  params: { limitKv: number; clearKv: number },
  over: Partial<Base> & { onlyWhileRunning?: boolean } = {},
): RuleDefinitionInput {
  const { onlyWhileRunning = false, ...rest } = over;
  return { ...baseRule(id, rest), kind: "charge_high", onlyWhileRunning, params };
}

/** Readings of one channel, one every stepMs from startTs. */
export function series(
  sensorKey: string,
  channel: Channel,
  startTs: number,
  stepMs: number,
  values: readonly number[],
): Reading[] {
  return values.map((value, i) => ({ sensorKey, channel, ts: startTs + i * stepMs, value }));
}

/** `n` copies of `value`. */
export function repeat(value: number, n: number): number[] {
  return Array.from({ length: n }, () => value);
}

/** Merge several reading lists into time order (stable: ties keep argument order). */
export function mergeByTs(...lists: Reading[][]): Reading[] {
  return lists.flat().sort((a, b) => a.ts - b.ts);
}

export function pushAll(engine: RuleEngine, readings: readonly Reading[]): AlertTransition[] {
  const out: AlertTransition[] = [];
  for (const r of readings) out.push(...engine.push(r));
  return out;
}

export function runRules(rules: readonly RuleDefinitionInput[], readings: readonly Reading[], topology: Topology = PLANT) {
  const engine = createRuleEngine({ rules, topology });
  return { engine, transitions: pushAll(engine, readings) };
}

/** Compact view for assertions: [type, subject, seconds after T0]. */
export function brief(transitions: readonly AlertTransition[], origin = T0): [string, string, number][] {
  return transitions.map((t) => [t.type, t.subjectKey, (t.ts - origin) / S]);
}
