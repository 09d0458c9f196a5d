/**
 * The rules engine: rule definitions + plant topology + a stream of readings -> alert
 * transitions. Pure and deterministic: no I/O, no clock. Time comes only from reading
 * timestamps and from explicit tick(nowTs) calls (which only sensor_silent needs).
 *
 * The same engine runs live in the ingest worker (push each reading as it arrives, tick every
 * few seconds, persist snapshot() now and then) and in the limits editor's backtest (replay()).
 *
 * Ordering contract:
 * - Readings of one sensor channel must come in time order. A reading whose ts is not after the
 *   last accepted ts of the same sensor and channel is ignored (a re-sent duplicate, or late
 *   data: re-checking late spans is a later feature). Readings from sensors the topology does
 *   not know, and non-finite values, are ignored too.
 * - Different sensors may interleave freely. Rules that combine sensors evaluate at reading
 *   time (a line's running state is looked up at the reading's ts; a neutralizer is judged at
 *   the after-point's reading times once the before-point's data has caught up), so the
 *   outcome does not depend on which sensor's data arrives first, as long as no sensor runs
 *   more than MAX_CROSS_SENSOR_LAG_MS ahead of one it is combined with. A running signal that
 *   lags behind is taken as holding its last value.
 * - A line with no running sensor, or whose running sensor has not reported yet, counts as
 *   running (rules err on the side of alerting).
 * - Memory is bounded: each window keeps only its span; held-back data at most the lag above.
 * - tick(nowTs) compares nowTs with reading times, so tick with the clock the devices stamp
 *   their readings with (the worker's wall clock, when device clocks are set right). Ticks only
 *   reveal a silence that is still going on: every transition carries the exact reading-time
 *   moment it happened, whatever the tick cadence.
 *
 * Rule edits: build a new engine with the new rules and the old engine's snapshot(). An
 * evaluator of an unchanged rule version continues exactly; a new version keeps its open alert
 * (which still names the version that raised it) but starts its delays and windows afresh.
 * Open alerts whose rule or subject no longer exists are listed in `orphanedAlerts` so the
 * worker can close them.
 */
import {
  ENGINE_STATE_FORMAT,
  engineStateSchema,
  type EngineState,
  type EvaluatorState,
  type LineRunningState,
  type SensorState,
} from "./engine-state";
import {
  ChargeHighEvaluator,
  ChargeRateEvaluator,
  EffectLossEvaluator,
  MAX_CROSS_SENSOR_LAG_MS,
  RhForecastEvaluator,
  RhLowEvaluator,
  SensorFlatEvaluator,
  SensorSilentEvaluator,
  readingKey,
  type AnyEvaluator,
  type EvalContext,
} from "./evaluators";
import { resolveRulesForLocation } from "./scope";
import { buildTopologyIndex, type TopologyIndex } from "./topology-index";
import {
  CHANNELS,
  FLAT_CHANNELS,
  ruleListSchema,
  topologySchema,
  type ActiveAlert,
  type AlertTransition,
  type Reading,
  type RuleDefinition,
  type RuleDefinitionInput,
  type Topology,
} from "./types";

export type CreateRuleEngineOptions = {
  rules: readonly RuleDefinitionInput[];
  topology: Topology;
  /** A snapshot() of an earlier engine (e.g. loaded from the database); checked with zod. */
  state?: unknown;
};

export type RuleEngine = {
  /** Feed one reading; returns the transitions it caused, in time order. */
  push(reading: Reading): AlertTransition[];
  /** Let time pass to nowTs without a reading (detects ongoing sensor silence). */
  tick(nowTs: number): AlertTransition[];
  /** JSON-serializable state to persist; pass it back as `state` to continue. */
  snapshot(): EngineState;
  activeAlerts(): ActiveAlert[];
  /** Alerts that were open in the restored state but whose rule or subject is gone. */
  readonly orphanedAlerts: ActiveAlert[];
};

export class RuleEngineStateError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "RuleEngineStateError";
  }
}

const CHANNEL_SET: ReadonlySet<string> = new Set(CHANNELS);

function buildEvaluators(rules: readonly RuleDefinition[], index: TopologyIndex): AnyEvaluator[] {
  const evaluators: AnyEvaluator[] = [];
  for (const point of index.points) {
    if (point.fieldMeterSensorKey === null) continue;
    for (const { rule } of resolveRulesForLocation("charge_high", point.location, rules)) {
      evaluators.push(new ChargeHighEvaluator(rule, point));
    }
    for (const { rule } of resolveRulesForLocation("charge_rate", point.location, rules)) {
      evaluators.push(new ChargeRateEvaluator(rule, point));
    }
  }
  for (const area of index.areas) {
    if (area.climateSensorKey === null) continue;
    for (const { rule } of resolveRulesForLocation("rh_low", area.location, rules)) {
      evaluators.push(new RhLowEvaluator(rule, area));
    }
    for (const { rule } of resolveRulesForLocation("rh_forecast", area.location, rules)) {
      evaluators.push(new RhForecastEvaluator(rule, area));
    }
  }
  for (const sensor of index.sensors) {
    for (const { rule } of resolveRulesForLocation("sensor_silent", sensor.location, rules)) {
      evaluators.push(new SensorSilentEvaluator(rule, sensor));
    }
    // Flat rules take precedence per channel, so a rule for one channel never hides another's.
    for (const channel of FLAT_CHANNELS) {
      if (!sensor.channels.has(channel)) continue;
      const forChannel = rules.filter((r) => r.kind !== "sensor_flat" || r.params.channel === channel);
      for (const { rule } of resolveRulesForLocation("sensor_flat", sensor.location, forChannel)) {
        evaluators.push(new SensorFlatEvaluator(rule, sensor));
      }
    }
  }
  for (const neutralizer of index.neutralizers) {
    if (neutralizer.before.fieldMeterSensorKey === null || neutralizer.after.fieldMeterSensorKey === null) continue;
    for (const { rule } of resolveRulesForLocation("effect_loss", neutralizer.location, rules)) {
      evaluators.push(new EffectLossEvaluator(rule, neutralizer));
    }
  }
  // Deterministic order: rule id, then subject.
  return evaluators.sort((a, b) =>
    a.rule.id !== b.rule.id ? a.rule.id - b.rule.id : a.subjectKey < b.subjectKey ? -1 : a.subjectKey > b.subjectKey ? 1 : 0,
  );
}

function evaluatorKey(ruleId: number, subjectKey: string): string {
  return `${ruleId}|${subjectKey}`;
}

function toActiveAlert(state: EvaluatorState): ActiveAlert | null {
  const alert = state.h.alert;
  if (state.h.phase !== "active" || alert === null) return null;
  return {
    ruleId: state.ruleId,
    ruleVersion: alert.ruleVersion,
    subjectKey: state.subjectKey,
    kind: state.kind,
    severity: state.severity,
    raisedTs: alert.raisedTs,
    conditionSinceTs: alert.conditionSinceTs,
    value: alert.value,
    peakValue: alert.peakValue,
    unit: state.unit,
    message: alert.message,
    expectedCrossingTs: alert.expectedCrossingTs,
  };
}

function compareTs(a: AlertTransition, b: AlertTransition): number {
  return a.ts - b.ts;
}

function sortByTs(out: AlertTransition[]): AlertTransition[] {
  // Array.prototype.sort is stable: transitions at the same ts keep their evaluation order.
  if (out.length > 1) out.sort(compareTs);
  return out;
}

/**
 * Build an engine. Rules and topology are parsed with their zod schemas (a ZodError is thrown
 * for invalid ones); a `state` that does not match the state schema throws RuleEngineStateError.
 */
export function createRuleEngine(options: CreateRuleEngineOptions): RuleEngine {
  const rules = ruleListSchema.parse(options.rules);
  const topology = topologySchema.parse(options.topology);
  const index = buildTopologyIndex(topology);
  const evaluators = buildEvaluators(rules, index);

  const byReadingKey = new Map<string, AnyEvaluator[]>();
  const silentBySensor = new Map<string, SensorSilentEvaluator[]>();
  const silentAll: SensorSilentEvaluator[] = [];
  for (const ev of evaluators) {
    if (ev instanceof SensorSilentEvaluator) {
      silentAll.push(ev);
      const list = silentBySensor.get(ev.sensor.sensorKey) ?? [];
      list.push(ev);
      silentBySensor.set(ev.sensor.sensorKey, list);
      continue;
    }
    for (const key of ev.readingKeys) {
      const list = byReadingKey.get(key) ?? [];
      list.push(ev);
      byReadingKey.set(key, list);
    }
  }

  const sensors = new Map<string, SensorState>();
  for (const sensor of index.sensors) {
    sensors.set(sensor.sensorKey, { sensorKey: sensor.sensorKey, lastTs: null, channelLastTs: {} });
  }
  const lines = new Map<number, LineRunningState>();
  for (const line of index.lines) {
    if (line.runningSensorKey !== null) lines.set(line.lineId, { lineId: line.lineId, changes: [], trimmed: false });
  }
  let startTs: number | null = null;
  const orphanedAlerts: ActiveAlert[] = [];

  if (options.state !== undefined) {
    const parsed = engineStateSchema.safeParse(options.state);
    if (!parsed.success) {
      throw new RuleEngineStateError(`Saved rules-engine state is not valid: ${parsed.error.message}`);
    }
    const saved = parsed.data;
    startTs = saved.startTs;
    for (const s of saved.sensors) {
      if (sensors.has(s.sensorKey)) {
        sensors.set(s.sensorKey, { sensorKey: s.sensorKey, lastTs: s.lastTs, channelLastTs: { ...s.channelLastTs } });
      }
    }
    for (const l of saved.lines) {
      if (lines.has(l.lineId)) {
        lines.set(l.lineId, { lineId: l.lineId, changes: l.changes.map(([ts, v]) => [ts, v]), trimmed: l.trimmed });
      }
    }
    const current = new Map(evaluators.map((ev) => [evaluatorKey(ev.rule.id, ev.subjectKey), ev]));
    for (const s of saved.evaluators) {
      const ev = current.get(evaluatorKey(s.ruleId, s.subjectKey));
      if (ev !== undefined && ev.rule.kind === s.kind) {
        ev.restore(s);
      } else {
        const orphan = toActiveAlert(s);
        if (orphan !== null) orphanedAlerts.push(orphan);
      }
    }
  }

  const ctx: EvalContext = {
    getRunningSince(lineId, ts) {
      if (lineId === null) return Number.NEGATIVE_INFINITY;
      const line = lines.get(lineId);
      if (line === undefined || line.changes.length === 0) return Number.NEGATIVE_INFINITY;
      const changes = line.changes;
      for (let i = changes.length - 1; i >= 0; i--) {
        if (changes[i][0] <= ts) {
          if (changes[i][1] === 0) return null;
          // The very first entry is the first observation, not a start: running since unknown.
          return i === 0 && !line.trimmed ? Number.NEGATIVE_INFINITY : changes[i][0];
        }
      }
      // Before every entry kept. Nothing dropped yet: before the first observation, unknown
      // (counts as running). Otherwise the oldest kept entry is a change, so the line was in
      // the opposite state before it (since when is no longer known).
      if (!line.trimmed) return Number.NEGATIVE_INFINITY;
      return changes[0][1] === 1 ? null : Number.NEGATIVE_INFINITY;
    },
    getSensorLastTs(sensorKey) {
      return sensors.get(sensorKey)?.lastTs ?? null;
    },
    getStartTs() {
      return startTs;
    },
  };

  function recordRunning(lineId: number, ts: number, value: number): void {
    const line = lines.get(lineId);
    if (line === undefined) return;
    const running: 0 | 1 = value > 0.5 ? 1 : 0;
    const last = line.changes[line.changes.length - 1];
    if (last === undefined || last[1] !== running) line.changes.push([ts, running]);
    // Keep the last change before the lag horizon so any look-up within it is exact.
    while (line.changes.length >= 2 && line.changes[1][0] <= ts - MAX_CROSS_SENSOR_LAG_MS) {
      line.changes.shift();
      line.trimmed = true;
    }
  }

  function push(reading: Reading): AlertTransition[] {
    const { sensorKey, channel, ts, value } = reading;
    if (!Number.isFinite(ts) || !Number.isFinite(value) || !CHANNEL_SET.has(channel)) return [];
    const sensor = sensors.get(sensorKey);
    if (sensor === undefined) return [];
    const channelLast = sensor.channelLastTs[channel];
    if (channelLast !== undefined && ts <= channelLast) return [];
    sensor.channelLastTs[channel] = ts;
    if (startTs === null) startTs = ts;
    const out: AlertTransition[] = [];

    if (sensor.lastTs === null || ts > sensor.lastTs) {
      const silent = silentBySensor.get(sensorKey);
      const previousBaseTs = sensor.lastTs ?? startTs;
      if (silent !== undefined) for (const ev of silent) ev.advance(ctx, ts, false, out);
      sensor.lastTs = ts;
      if (silent !== undefined) for (const ev of silent) ev.onSensorReading(ctx, ts, previousBaseTs, out);
    }

    if (channel === "running") {
      const lineIds = index.linesByRunningSensor.get(sensorKey);
      if (lineIds !== undefined) for (const lineId of lineIds) recordRunning(lineId, ts, value);
    }

    const list = byReadingKey.get(readingKey(sensorKey, channel));
    if (list !== undefined) for (const ev of list) ev.onReading(reading, ctx, out);
    return sortByTs(out);
  }

  function tick(nowTs: number): AlertTransition[] {
    if (!Number.isFinite(nowTs)) return [];
    if (startTs === null) startTs = nowTs;
    const out: AlertTransition[] = [];
    for (const ev of silentAll) ev.advance(ctx, nowTs, false, out);
    return sortByTs(out);
  }

  function snapshot(): EngineState {
    return {
      format: ENGINE_STATE_FORMAT,
      startTs,
      sensors: [...sensors.values()].map((s) => ({ sensorKey: s.sensorKey, lastTs: s.lastTs, channelLastTs: { ...s.channelLastTs } })),
      lines: [...lines.values()].map((l) => ({ lineId: l.lineId, changes: l.changes.map(([ts, v]) => [ts, v]), trimmed: l.trimmed })),
      evaluators: evaluators.map((ev) => structuredClone(ev.state)),
    };
  }

  function activeAlerts(): ActiveAlert[] {
    const list: ActiveAlert[] = [];
    for (const ev of evaluators) {
      const alert = toActiveAlert(ev.state);
      if (alert !== null) list.push(alert);
    }
    return list;
  }

  return { push, tick, snapshot, activeAlerts, orphanedAlerts };
}

export const DEFAULT_TICK_EVERY_MS = 10_000;

export type ReplayOptions = {
  /** Tick cadence in ms (default 10 s). Ticks fall on whole multiples of it (epoch-aligned). */
  tickEveryMs?: number;
  /** Keep ticking up to this time after the last reading (then one last tick at endTs). */
  endTs?: number;
  /** Start from a saved state instead of a fresh engine. */
  state?: unknown;
};

/**
 * Backtest: exactly what the live worker does, in one call. Readings are pushed in the order
 * given (pass them as stored, ordered by ts; pass every sensor the rules look at, or silent
 * rules will find the missing ones silent). Before each reading, every tick at a multiple of
 * tickEveryMs up to the reading's ts is issued. Returns all transitions in emission order.
 */
export function replay(
  rules: readonly RuleDefinitionInput[],
  topology: Topology,
  readings: Iterable<Reading>,
  options: ReplayOptions = {},
): AlertTransition[] {
  const tickEveryMs = options.tickEveryMs ?? DEFAULT_TICK_EVERY_MS;
  if (!(tickEveryMs >= 100)) throw new RangeError("tickEveryMs must be at least 100 ms");
  const engine = createRuleEngine({ rules, topology, state: options.state });
  const out: AlertTransition[] = [];
  const append = (list: AlertTransition[]) => {
    for (const t of list) out.push(t);
  };
  let nextTickTs: number | null = null;
  for (const reading of readings) {
    if (nextTickTs === null) nextTickTs = (Math.floor(reading.ts / tickEveryMs) + 1) * tickEveryMs;
    while (nextTickTs <= reading.ts) {
      append(engine.tick(nextTickTs));
      nextTickTs += tickEveryMs;
    }
    append(engine.push(reading));
  }
  if (options.endTs !== undefined) {
    if (nextTickTs === null) nextTickTs = (Math.floor(options.endTs / tickEveryMs) + 1) * tickEveryMs;
    while (nextTickTs <= options.endTs) {
      append(engine.tick(nextTickTs));
      nextTickTs += tickEveryMs;
    }
    append(engine.tick(options.endTs));
  }
  return out;
}
