/**
 * Re-checking a late span: readings that reach the worker after the live engine has moved past
 * their reading time (a store-and-forward upload, Sparkplug historical metrics, a delayed JSON
 * batch). The live engine never sees them (an old reading must not throw off its windows and
 * delays); instead the stored readings around the span are replayed, in reading-time order,
 * through a fresh engine with the same rules (engine.ts replay()), and the excursions that touch
 * the span and that the alert history does not already hold are reported.
 *
 * - An excursion that cleared within the replay is a finding: kept in the history marked "found
 *   late", and quiet (pages nobody) when it ended longer ago than the quiet time.
 * - An excursion still open at the end of the replay is a condition still present: it is left to
 *   the live engine, which sees the readings that follow and alerts as usual (and keeps the one
 *   alert per condition it owns).
 * - Silence (sensor_silent) is about when data arrived, which only the live engine can judge; a
 *   late upload does not re-judge it.
 * Pure: the caller reads the readings and the alerts (ingest/late-recheck.ts).
 */
import { replay } from "./engine";
import type { AlertTransition, Channel, Reading, RuleDefinition, Topology } from "./types";

const MINUTE_MS = 60_000;
/** bounds on the stored context replayed before the late span */
export const LATE_LOOKBACK_MIN_MS = 5 * MINUTE_MS;
export const LATE_LOOKBACK_MAX_MS = 6 * 60 * MINUTE_MS;
/** how far past the late span stored readings are replayed to see an excursion end */
export const LATE_FOLLOW_MS = 30 * MINUTE_MS;

/** The stored context a replay needs before the span: the longest on-delay plus window among the rules. */
export function lateLookbackMs(rules: readonly RuleDefinition[]): number {
  let longest = 0;
  for (const r of rules) {
    if (r.kind === "sensor_silent") continue;
    const p: Record<string, unknown> = r.params;
    const windowS = typeof p.windowS === "number" ? p.windowS : typeof p.windowMin === "number" ? p.windowMin * 60 : 0;
    longest = Math.max(longest, (r.onDelayS + windowS) * 1000);
  }
  return Math.min(LATE_LOOKBACK_MAX_MS, Math.max(LATE_LOOKBACK_MIN_MS, longest + MINUTE_MS));
}

export type LateScope = { topology: Topology; sensors: Array<{ code: string; channels: Channel[] }> };

/**
 * The plant trimmed to what the late sensors feed: the whole line of each late field meter or
 * line gateway (its other points for the neutralizer rules, its running signal for the gating),
 * and a hall's logger only when that logger is late. Everything else is left out of the replay.
 */
export function lateSpanScope(topology: Topology, lateCodes: ReadonlySet<string>): LateScope {
  const pointById = new Map(topology.points.map((p) => [p.pointId, p]));
  const linesKept = new Set<number>();
  for (const l of topology.lines) {
    const codes = [l.runningSensorKey, l.speedSensorKey, ...l.pointIds.map((id) => pointById.get(id)?.fieldMeterSensorKey ?? null)];
    if (codes.some((c) => c !== null && lateCodes.has(c))) linesKept.add(l.lineId);
  }
  const pointsKept = new Set<number>();
  for (const l of topology.lines) if (linesKept.has(l.lineId)) for (const id of l.pointIds) pointsKept.add(id);
  const trimmed: Topology = {
    areas: topology.areas.map((a) => ({ ...a, climateSensorKey: a.climateSensorKey !== null && lateCodes.has(a.climateSensorKey) ? a.climateSensorKey : null })),
    lines: topology.lines.map((l) => (linesKept.has(l.lineId) ? l : { ...l, runningSensorKey: null, speedSensorKey: null })),
    points: topology.points.map((p) => (pointsKept.has(p.pointId) ? p : { ...p, fieldMeterSensorKey: null })),
    neutralizers: topology.neutralizers,
  };
  const channels = new Map<string, Set<Channel>>();
  const add = (code: string | null, ...list: Channel[]) => {
    if (code === null) return;
    const set = channels.get(code) ?? new Set<Channel>();
    for (const c of list) set.add(c);
    channels.set(code, set);
  };
  for (const p of trimmed.points) add(p.fieldMeterSensorKey, "charge_kv");
  for (const l of trimmed.lines) {
    add(l.runningSensorKey, "running");
    add(l.speedSensorKey, "speed_mpm");
  }
  for (const a of trimmed.areas) add(a.climateSensorKey, "rh_pct", "temp_c");
  return { topology: trimmed, sensors: [...channels].map(([code, set]) => ({ code, channels: [...set] })) };
}

export type KnownAlert = { ruleId: number; subjectKey: string; startTs: number; endTs: number | null };

export type LateFinding = {
  raise: AlertTransition;
  /** the last transition before the clear (its peak and message are the episode's final ones) */
  clear: AlertTransition;
  startTs: number;
  endedTs: number;
  /** ended longer ago than the quiet time: kept in the history, pages nobody */
  quiet: boolean;
};

export type LateRecheckOutcome = {
  findings: LateFinding[];
  /** excursions touching the span still open at the end of the replay (left to the live engine) */
  stillPresent: Array<{ ruleId: number; subjectKey: string; raisedTs: number }>;
  /** excursions the history already holds (an alert of the same rule and subject overlapping) */
  alreadyKnown: number;
};

export type LateRecheckInput = {
  rules: readonly RuleDefinition[];
  topology: Topology;
  /** the stored readings of the scope's sensors around the span, in reading-time order */
  readings: Iterable<Reading>;
  /** reading times of the late readings themselves */
  span: { fromTs: number; toTs: number };
  known: readonly KnownAlert[];
  nowMs: number;
  quietAfterMs: number;
};

export function recheckLateSpan(input: LateRecheckInput): LateRecheckOutcome {
  const rules = input.rules.filter((r) => r.kind !== "sensor_silent");
  const transitions = replay(rules, input.topology, input.readings);
  type Episode = { raise: AlertTransition; last: AlertTransition; clear: AlertTransition | null };
  const episodes = new Map<string, Episode>();
  for (const t of transitions) {
    const key = `${t.ruleId}|${t.subjectKey}|${t.raisedTs}`;
    if (t.type === "raise") {
      episodes.set(key, { raise: t, last: t, clear: null });
      continue;
    }
    const e = episodes.get(key);
    if (!e) continue;
    e.last = t;
    if (t.type === "clear") e.clear = t;
  }
  const out: LateRecheckOutcome = { findings: [], stillPresent: [], alreadyKnown: 0 };
  for (const { raise, clear } of episodes.values()) {
    const startTs = raise.conditionSinceTs ?? raise.raisedTs;
    const endTs = clear?.ts ?? Number.POSITIVE_INFINITY;
    if (startTs > input.span.toTs || endTs < input.span.fromTs) continue; // not the late span's doing
    const known = input.known.some((k) => k.ruleId === raise.ruleId && k.subjectKey === raise.subjectKey && k.startTs <= endTs && (k.endTs ?? Number.POSITIVE_INFINITY) >= startTs);
    if (known) {
      out.alreadyKnown++;
      continue;
    }
    if (clear === null) {
      out.stillPresent.push({ ruleId: raise.ruleId, subjectKey: raise.subjectKey, raisedTs: raise.raisedTs });
      continue;
    }
    out.findings.push({ raise, clear, startTs, endedTs: clear.ts, quiet: input.nowMs - clear.ts > input.quietAfterMs });
  }
  out.findings.sort((a, b) => a.startTs - b.startTs);
  return out;
}
