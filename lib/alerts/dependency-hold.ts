/**
 * Causes before symptoms: when a logger, gateway or edge node goes quiet, every sensor behind
 * it goes silent at once, and so does every sensor when the worker loses the broker. Instead
 * of N "sensor silent" alerts this layer raises one alert for the thing that failed and holds
 * the sensors' alerts behind it.
 *
 * - A "sensor silent" raise of a sensor that sits behind a parent (gateway, edge node, logger,
 *   or the whole data feed) waits `graceMs` of reading time for its siblings.
 * - When the first of them has waited its grace and at least `needed(parent)` of a parent's
 *   sensors are silent together, one alert is raised for the parent ("gateway:<key>") and the sensors' raises are held (recorded as held,
 *   never notified). The widest parent that qualifies wins: a broker outage is one alert, not
 *   one per gateway.
 * - When the grace runs out and no parent qualifies, the sensor's own raise goes out with its
 *   original time.
 * - Held sensors' clears are swallowed; the parent's alert clears when its last held sensor is
 *   back.
 *
 * Pure and deterministic (time is reading time passed to `advance`).
 */
import type { ConditionEvent } from "./condition-merge";

export type DependencyParent = {
  /** e.g. "edge:press-hall-1", "feed" */
  key: string;
  name: string;
  kind: "gateway" | "edge_node" | "logger" | "feed";
  /** Sensor keys (device codes) behind it. */
  sensorKeys: readonly string[];
  /** The parent's place, for the stored alert. */
  areaId?: number | null;
  lineId?: number | null;
};

/** How long a sensor's silence waits for its siblings (plant setting, from memory: gateways drop all their sensors within a few seconds). */
export const DEPENDENCY_GRACE_MS = 30_000;

/** Silent sensors needed before a parent is judged silent: all of a small group, 80 % of a large one, at least 2. */
export function neededSilent(parent: DependencyParent): number {
  const n = parent.sensorKeys.length;
  return Math.max(2, n <= 4 ? n : Math.ceil(0.8 * n));
}

export const subjectKeyOfParent = (key: string) => `gateway:${key}`;
const sensorOfSubject = (subjectKey: string) => (subjectKey.startsWith("sensor:") ? subjectKey.slice("sensor:".length) : null);

export type DependencyHold = {
  push(e: ConditionEvent): ConditionEvent[];
  /** Let reading time pass: releases raises whose grace ran out. */
  advance(ts: number): ConditionEvent[];
  /** Sensors currently held behind a silent parent, by parent key. */
  held(): Map<string, string[]>;
  /** The parents' alerts now open (their raise events). */
  openParents(): ConditionEvent[];
  /** What to save so a restarted worker holds the same sensors (JSON). */
  snapshot(): DependencyHoldState;
};

export type DependencyHoldState = {
  pending: ConditionEvent[];
  released: string[];
  down: Array<{ key: string; event: ConditionEvent; held: string[] }>;
};

function isHoldState(v: unknown): v is DependencyHoldState {
  if (typeof v !== "object" || v === null) return false;
  const o = v as Record<string, unknown>;
  return Array.isArray(o.pending) && Array.isArray(o.released) && Array.isArray(o.down);
}

export function createDependencyHold(parents: readonly DependencyParent[], graceMs = DEPENDENCY_GRACE_MS, state?: unknown): DependencyHold {
  // widest first, so a feed outage wins over its gateways
  const ordered = [...parents].filter((p) => p.sensorKeys.length >= 2).sort((a, b) => b.sensorKeys.length - a.sensorKeys.length);
  const parentsOf = new Map<string, DependencyParent[]>();
  for (const p of ordered) for (const s of p.sensorKeys) parentsOf.set(s, [...(parentsOf.get(s) ?? []), p]);

  const pending = new Map<string, ConditionEvent>(); // sensor → its held-back raise
  const released = new Set<string>(); // sensors whose own silent alert went out
  const down = new Map<string, { event: ConditionEvent; held: Set<string> }>(); // parent key → its alert
  const heldBy = new Map<string, string>(); // sensor → parent key holding it
  if (isHoldState(state)) {
    const known = new Set(parents.map((p) => p.key));
    for (const e of state.pending) {
      const sensor = sensorOfSubject(e.subjectKey);
      if (sensor !== null && parentsOf.has(sensor)) pending.set(sensor, e);
    }
    for (const s of state.released) released.add(s);
    for (const d of state.down) {
      if (!known.has(d.key)) continue;
      down.set(d.key, { event: d.event, held: new Set(d.held) });
      for (const s of d.held) heldBy.set(s, d.key);
    }
  }

  function silentCount(p: DependencyParent): number {
    let n = 0;
    for (const s of p.sensorKeys) if (pending.has(s) || released.has(s) || heldBy.has(s)) n++;
    return n;
  }

  function raiseParent(p: DependencyParent, trigger: ConditionEvent): ConditionEvent {
    const members = p.sensorKeys.filter((s) => pending.has(s));
    const firstTs = Math.min(...members.map((s) => pending.get(s)!.ts));
    const event: ConditionEvent = {
      ...trigger,
      type: "raise",
      subjectKey: subjectKeyOfParent(p.key),
      conditionKey: `sensor|${subjectKeyOfParent(p.key)}`,
      raisedTs: firstTs,
      ts: firstTs,
      message: `${p.name} silent: ${silentCount(p)} of ${p.sensorKeys.length} sensors behind it send nothing`,
      notify: true,
    };
    const held = new Set<string>();
    for (const s of members) {
      pending.delete(s);
      held.add(s);
      heldBy.set(s, p.key);
    }
    down.set(p.key, { event, held });
    return event;
  }

  function push(e: ConditionEvent): ConditionEvent[] {
    const sensor = e.kind === "sensor_silent" || e.family === "sensor" ? sensorOfSubject(e.subjectKey) : null;
    if (sensor === null) return [e];
    const holder = heldBy.get(sensor);
    // a sensor no longer behind any parent (the plant changed) may still be held: its clear frees it
    if (holder === undefined && !parentsOf.has(sensor)) return [e];
    if (e.type === "raise" && e.kind === "sensor_silent") {
      if (holder !== undefined) return [];
      const already = parentsOf.get(sensor)!.find((p) => down.has(p.key));
      if (already) {
        down.get(already.key)!.held.add(sensor);
        heldBy.set(sensor, already.key);
        return [];
      }
      pending.set(sensor, e);
      return [];
    }
    if (holder !== undefined) {
      if (e.type !== "clear") return [];
      heldBy.delete(sensor);
      const d = down.get(holder)!;
      d.held.delete(sensor);
      if (d.held.size > 0) return [];
      down.delete(holder);
      return [{ ...d.event, type: "clear", ts: e.ts, value: e.value, message: `${d.event.message.split(":")[0]} is back`, notify: false }];
    }
    const waiting = pending.get(sensor);
    if (waiting !== undefined) {
      if (e.type !== "clear") return [];
      // back within the grace: the short silence goes out as it happened
      pending.delete(sensor);
      return [waiting, e];
    }
    if (e.type === "clear") released.delete(sensor);
    return [e];
  }

  function advance(ts: number): ConditionEvent[] {
    const out: ConditionEvent[] = [];
    if (pending.size === 0) return out;
    const isDue = (s: string) => {
      const e = pending.get(s);
      return e !== undefined && e.ts + graceMs <= ts;
    };
    // once a silence has waited its grace, the widest parent with enough silent sensors takes it
    for (const p of ordered) {
      if (down.has(p.key) || !p.sensorKeys.some(isDue)) continue;
      if (silentCount(p) >= neededSilent(p)) out.push(raiseParent(p, pending.get(p.sensorKeys.find(isDue)!)!));
    }
    for (const [sensor, e] of pending) {
      if (e.ts + graceMs > ts) continue;
      pending.delete(sensor);
      released.add(sensor);
      out.push(e);
    }
    return out;
  }

  return {
    push,
    advance,
    held: () => new Map([...down.entries()].map(([k, d]) => [k, [...d.held]])),
    openParents: () => [...down.values()].map((d) => d.event),
    snapshot: () => ({
      pending: [...pending.values()],
      released: [...released],
      down: [...down.entries()].map(([key, d]) => ({ key, event: d.event, held: [...d.held] })),
    }),
  };
}
