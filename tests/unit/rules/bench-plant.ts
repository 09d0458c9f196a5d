/**
 * A large invented plant for measuring the rules engine (for a `bench:rules` script):
 * 5 halls × 10 lines × 4 points, 150 neutralizers, exactly 500 rules, 1 Hz data.
 * Deterministic (seeded noise), so runs are comparable.
 */
import type { Reading, RuleDefinitionInput, Topology, TopologyArea, TopologyLine, TopologyNeutralizer, TopologyPoint } from "../../../lib/rules/types";

export const BENCH_T0 = Date.UTC(2025, 0, 15);

export function createBenchPlant(): { topology: Topology; rules: RuleDefinitionInput[] } {
  const areas: TopologyArea[] = [];
  const lines: TopologyLine[] = [];
  const points: TopologyPoint[] = [];
  const neutralizers: TopologyNeutralizer[] = [];
  let pointId = 1;
  let neutralizerId = 1;
  for (let a = 1; a <= 5; a++) {
    areas.push({ areaId: a, name: `Hall ${a}`, climateSensorKey: `th-${a}` });
    for (let l = 1; l <= 10; l++) {
      const lineId = a * 100 + l;
      const ids: number[] = [];
      for (let p = 0; p < 4; p++) {
        points.push({ pointId, name: `Point ${pointId}`, fieldMeterSensorKey: `fm-${pointId}` });
        ids.push(pointId++);
      }
      lines.push({ lineId, areaId: a, name: `Line ${lineId}`, pointIds: ids, runningSensorKey: `gw-${lineId}`, speedSensorKey: null });
      for (let k = 0; k < 3; k++) {
        neutralizers.push({ neutralizerId, name: `Bar ${neutralizerId}`, beforePointId: ids[k], afterPointId: ids[k + 1] });
        neutralizerId++;
      }
    }
  }

  let id = 1;
  const base = (scope: RuleDefinitionInput["scope"]) => ({ id: id++, version: 1, severity: "medium" as const, scope, onDelayS: 10, offDelayS: 30 });
  const rules: RuleDefinitionInput[] = [];
  for (const p of points) rules.push({ ...base({ pointId: p.pointId }), kind: "charge_high", onlyWhileRunning: true, params: { limitKv: 12, clearKv: 10 } });
  for (const p of points) {
    rules.push({ ...base({ pointId: p.pointId }), kind: "charge_rate", onlyWhileRunning: true, params: { rateKvPerMin: 3, clearRateKvPerMin: 1.5, windowS: 120 } });
  }
  for (const l of lines) rules.push({ ...base({ lineId: l.lineId }), kind: "effect_loss", onlyWhileRunning: true, params: { minReductionFraction: 0.5, windowS: 300 } });
  for (const l of lines.slice(0, 40)) {
    rules.push({ ...base({ lineId: l.lineId }), kind: "sensor_flat", onlyWhileRunning: true, params: { windowS: 600, tolerance: 0.05 } });
  }
  for (const a of areas) rules.push({ ...base({ areaId: a.areaId }), kind: "rh_low", onlyWhileRunning: false, params: { limitPct: 30, clearPct: 33 } });
  for (const a of areas.slice(0, 4)) {
    rules.push({ ...base({ areaId: a.areaId }), kind: "rh_forecast", onlyWhileRunning: false, params: { limitPct: 30, horizonMin: 60, windowMin: 30 } });
  }
  rules.push({ ...base({}), kind: "sensor_silent", onlyWhileRunning: false, params: { silentS: 120 } });
  return { topology: { areas, lines, points, neutralizers }, rules };
}

/** `seconds` of 1 Hz readings from every meter and gateway (hall loggers every 30 s), in time order. */
export function createBenchReadings(topology: Topology, seconds: number): Reading[] {
  let seed = 12345;
  const random = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648; // classic LCG, enough for noise
    return seed / 2147483648;
  };
  const readings: Reading[] = [];
  for (let s = 0; s < seconds; s++) {
    const ts = BENCH_T0 + s * 1000;
    for (const l of topology.lines) {
      if (l.runningSensorKey !== null) readings.push({ sensorKey: l.runningSensorKey, channel: "running", ts, value: 1 });
    }
    for (const p of topology.points) {
      if (p.fieldMeterSensorKey === null) continue;
      readings.push({ sensorKey: p.fieldMeterSensorKey, channel: "charge_kv", ts, value: -5 + 4 * Math.sin(s / 50 + p.pointId) + random() });
    }
    if (s % 30 === 0) {
      for (const a of topology.areas) {
        if (a.climateSensorKey !== null) readings.push({ sensorKey: a.climateSensorKey, channel: "rh_pct", ts, value: 40 + Math.sin(s / 900) });
      }
    }
  }
  return readings;
}
