// The live rules engine inside the ingest worker (a reading sink, ingest/sinks.ts).
//
// - Loads the rules (current versions) and the plant topology from the database, and reloads
//   them within RULES_POLL_MS of a change (it polls cheap signatures), carrying the engine's
//   state over so delays, windows and open alerts continue without a restart.
// - Feeds every committed reading to the alert pipeline (lib/alerts/alert-pipeline.ts: the rules
//   engine of lib/rules, then one alert per condition, then causes before symptoms) in
//   reading-time order and ticks it with the wall clock (sensor silence). One excursion at one
//   point is one alert that escalates (12 kV, then 20 kV) and eases back in steps; a silent edge
//   node or data feed is one alert, not one per sensor behind it.
// - Writes each condition event into `alerts` + `alert_events` in one transaction together with
//   the engine's snapshot and the pipeline's own state (CONDITION_STATE_KEY), so what the
//   database says is open and what the engine holds never drift apart across a crash; the
//   snapshot is also saved every SNAPSHOT_EVERY_MS while readings flow (it carries the windows).
//   A restart continues from the last snapshot.
// - Publishes each alert change on `stillfield/internal/alerts` ({alertId, lineId, areaId, state,
//   severity, ts}) after the commit, for the app's live streams.
// - Every ESCALATE_EVERY_MS: on-call e-mails and escalation (alerts-escalation.ts), and the end
//   of shelvings whose time is up.
// One engine per plant: with one worker this sink runs in it (ALERTS_OWNER=local); with several,
// the worker holding the alert-owner lease runs startCore() with its own state store and feeds it
// every worker's committed readings (ingest/alerts-owner.ts).
import { eq } from "drizzle-orm";
import { ZodError } from "zod";
import { settings } from "../db/schema";
import { applyClearTransition, applyEased, applyUpdateTransition, applyWorsened, expireShelving, insertRaisedAlert, listUnclearedAlerts } from "../db/queries/alert-transitions";
import type { AlertChange } from "../lib/views/alerts";
import { loadRuleDefinitions, readRulesSignature } from "../db/queries/rule-rows";
import { loadPlantTopology, readTopologySignature, type PlantTopology } from "../db/queries/topology";
import { getPlantSettings } from "../db/queries/equipment";
import { internalTopics } from "../lib/contract/topics";
import { CHANNELS, createRuleEngine, RuleEngineStateError, type Channel, type RuleDefinition, type RuleEngine } from "../lib/rules";
import { createAlertPipeline, type AlertPipeline } from "../lib/alerts/alert-pipeline";
import { isConditionMergerState, mergerFromActiveAlerts, type ConditionEvent } from "../lib/alerts/condition-merge";
import type { AlertState, Severity } from "../lib/vocabulary";
import { runEscalation } from "./alerts-escalation";
import { createLateRecheck } from "./late-recheck";
import { getSettings } from "../lib/settings";
import { describeError } from "./log";
import type { CommittedReading, ReadingSink, SinkContext } from "./sinks";

export const ENGINE_STATE_KEY = "alerts.engine_state";
/** The pipeline's state above the engine: open conditions and held silences (lib/alerts). */
export const CONDITION_STATE_KEY = "alerts.condition_state";

const CHANNEL_SET: ReadonlySet<string> = new Set(CHANNELS);
function isChannel(c: string): c is Channel {
  return CHANNEL_SET.has(c);
}

type Published = { alertId: number; lineId: number | null; areaId: number | null; state: AlertState; severity: Severity; ts: number };

function alertKey(ruleId: number, subjectKey: string, raisedTs: number): string {
  return `${ruleId}|${subjectKey}|${raisedTs}`;
}

export type Core = Required<Pick<ReadingSink, "onCommitted" | "onTick" | "close">>;

/**
 * The sink factory. It returns at once and loads rules, plant and saved state in the background
 * (the first call waits for it), so the worker's own start-up is never held up by it.
 */
export async function createAlertsRunner(ctx: SinkContext): Promise<ReadingSink> {
  const { log } = ctx;
  if (getSettings().ALERTS_RUNNER === "off") {
    log.info("alerts runner switched off (ALERTS_RUNNER=off)");
    return { name: "alerts", onCommitted: async () => undefined };
  }
  let core: Promise<Core> | null = null;
  const ready = (): Promise<Core> => {
    core ??= startCore(ctx).catch((err: unknown) => {
      core = null; // try again on the next call
      throw err;
    });
    return core;
  };
  void ready().catch((err: unknown) => log.error("alerts runner could not start yet; will retry", { error: describeError(err) }));
  return {
    name: "alerts",
    async onCommitted(readings) {
      await (await ready()).onCommitted(readings);
    },
    async onTick(nowMs) {
      await (await ready()).onTick(nowMs);
    },
    async close() {
      if (core) await (await core).close();
    },
  };
}

/**
 * Where the engine's state lives when not in the settings row: the alert owner's store of
 * rows per rule and subject (ingest/alert-engine-rows.ts). `save` runs inside the transaction
 * that writes the alert transitions and may refuse it (a fenced-off owner).
 */
export type EngineStateStore = {
  load(args: { rules: RuleDefinition[]; topology: PlantTopology["topology"] }): Promise<unknown>;
  save(tx: Pick<SinkContext["db"], "insert" | "select" | "execute">, engine: RuleEngine, nowMs: number): Promise<void>;
};

/** The engine and its alert writes; `store` replaces the settings-row snapshot (the alert owner's hook). */
export async function startCore(ctx: SinkContext, store?: EngineStateStore): Promise<Core> {
  const { db, log, env } = ctx;
  const { ALERTS_RULES_POLL_MS: RULES_POLL_MS, ALERTS_ESCALATE_EVERY_MS: ESCALATE_EVERY_MS, ALERTS_SNAPSHOT_EVERY_MS: SNAPSHOT_EVERY_MS } = getSettings();
  const MAX_PENDING_TRANSITIONS = 20_000;

  let topo: PlantTopology = await loadPlantTopology(db);
  let topoSig = await readTopologySignature(db);
  let rulesSig = await readRulesSignature(db);
  let rules: RuleDefinition[] = await loadRules();
  let timeZone = (await getPlantSettings(db)).timeZone;

  // the engine, from the saved snapshot when there is a usable one
  const [saved] = store
    ? [{ value: await store.load({ rules, topology: topo.topology }) }]
    : await db.select({ value: settings.value }).from(settings).where(eq(settings.key, ENGINE_STATE_KEY)).limit(1);
  let engine: RuleEngine;
  try {
    engine = createRuleEngine({ rules, topology: topo.topology, state: saved?.value ?? undefined });
    if (saved) log.info("alerts engine continues from its saved state");
  } catch (err) {
    if (!(err instanceof RuleEngineStateError) && !(err instanceof ZodError)) throw err;
    log.warn("saved alerts-engine state not usable; starting afresh", { error: describeError(err) });
    engine = createRuleEngine({ rules, topology: topo.topology });
  }

  // the layers above the engine: saved with it, or rebuilt from what it holds active
  const [savedConditions] = await db.select({ value: settings.value }).from(settings).where(eq(settings.key, CONDITION_STATE_KEY)).limit(1);
  let pipeline: AlertPipeline = buildPipeline(engine, savedConditions?.value);

  function buildPipeline(next: RuleEngine, state: unknown): AlertPipeline {
    const o = typeof state === "object" && state !== null ? (state as Record<string, unknown>) : {};
    if (isConditionMergerState(o.merger)) return createAlertPipeline({ rules: [], topology: topo.topology, engine: next, parents: topo.parents, mergerState: o.merger, holdState: o.hold });
    return createAlertPipeline({ rules: [], topology: topo.topology, engine: next, parents: topo.parents, merger: mergerFromActiveAlerts(next.activeAlerts()) });
  }

  // open alert rows by key (rule that opened it, subject, raise time)
  const openIds = new Map<string, number>();
  for (const a of await listUnclearedAlerts(db)) openIds.set(alertKey(a.ruleId, a.subjectKey, a.startTs), a.id);

  let pending: ConditionEvent[] = [];
  let dirty = false;
  let lastSnapshotTs = Date.now();
  let lastRulesPoll = 0;
  let lastEscalation = 0;
  let closed = false;

  take(pipeline.prune(Date.now()));
  await flush();
  await reconcile("start-up");

  async function loadRules(): Promise<RuleDefinition[]> {
    const { rules: list, problems } = await loadRuleDefinitions(db);
    for (const p of problems) log.warn(`rule ${p.ruleId} left out of the alerts engine: ${p.message}`);
    return list;
  }

  function publish(changes: Published[]) {
    for (const c of changes) ctx.publish(internalTopics.alerts, JSON.stringify(c), 1);
  }

  /**
   * Open alert rows the engine does not hold active (its rule or subject is gone, or its state
   * was lost) are cleared, so nothing stays open for ever.
   */
  async function reconcile(why: string): Promise<void> {
    const active = new Set([...pipeline.merger.openKeys(), ...pipeline.hold.openParents()].map((a) => alertKey(a.ruleId, a.subjectKey, a.raisedTs)));
    const stale = [...openIds.entries()].filter(([key]) => !active.has(key));
    if (stale.length === 0) return;
    const now = Date.now();
    const changes: Published[] = [];
    await db.transaction(async (tx) => {
      for (const [key, id] of stale) {
        const reason =
          why === "rules changed"
            ? "Cleared: its rule was removed, disabled or no longer applies here"
            : "Cleared: the alerts engine restarted without this alert's state; it is raised again if the condition persists";
        const r = await applyClearTransition(tx, id, { ts: now, reason });
        openIds.delete(key);
        if (r) changes.push({ alertId: id, lineId: r.lineId, areaId: r.areaId, state: r.state, severity: r.severity, ts: now });
      }
      await saveSnapshot(tx, now);
    });
    log.info(`cleared ${stale.length} alert(s) the engine no longer holds (${why})`);
    publish(changes);
  }

  async function saveSnapshot(tx: Pick<typeof db, "insert" | "select" | "execute">, nowMs: number): Promise<void> {
    // the owner's store checks its lease first, so a fenced-off owner writes neither
    if (store) await store.save(tx, engine, nowMs);
    else {
      const state = engine.snapshot();
      await tx
        .insert(settings)
        .values({ key: ENGINE_STATE_KEY, value: state, updatedAt: nowMs })
        .onDuplicateKeyUpdate({ set: { value: state, updatedAt: nowMs } });
    }
    const conditions = pipeline.snapshot();
    await tx
      .insert(settings)
      .values({ key: CONDITION_STATE_KEY, value: conditions, updatedAt: nowMs })
      .onDuplicateKeyUpdate({ set: { value: conditions, updatedAt: nowMs } });
    dirty = false;
    lastSnapshotTs = nowMs;
  }

  /** Writes the pending transitions (and the snapshot) in one transaction; kept for a retry on failure. */
  async function flush(): Promise<void> {
    if (pending.length === 0) return;
    const batch = pending;
    const now = Date.now();
    const changes: Published[] = [];
    const added = new Map<string, number>();
    const removed = new Set<string>();
    try {
      await db.transaction(async (tx) => {
        for (const t of batch) {
          const key = alertKey(t.ruleId, t.subjectKey, t.raisedTs);
          const existing = removed.has(key) ? undefined : (added.get(key) ?? openIds.get(key));
          if (t.type === "raise" || existing === undefined) {
            if (t.type === "clear" || t.type === "ease") continue; // raised before anything we know of: nothing to clear
            if (existing !== undefined) continue; // a raise already written (retry)
            const row = await insertRaisedAlert(tx, t, topo.subjects.get(t.subjectKey), now);
            added.set(key, row.id);
            const subject = topo.subjects.get(t.subjectKey);
            changes.push({ alertId: row.id, lineId: subject?.lineId ?? null, areaId: subject?.areaId ?? null, state: "active_unacked", severity: t.severity, ts: t.ts });
            if (t.type === "update") await applyUpdateTransition(tx, row.id, t);
            continue;
          }
          if (t.type === "update") {
            await applyUpdateTransition(tx, existing, t);
            continue;
          }
          if (t.type === "escalate" || t.type === "worse" || t.type === "ease") {
            const r = t.type === "ease" ? await applyEased(tx, existing, t) : await applyWorsened(tx, existing, { ...t, type: t.type });
            if (r) changes.push({ alertId: existing, lineId: r.lineId, areaId: r.areaId, state: r.state, severity: r.severity, ts: t.ts });
            continue;
          }
          const r = await applyClearTransition(tx, existing, { ts: t.ts, peakValue: t.peakValue, message: t.message });
          removed.add(key);
          added.delete(key);
          if (r) changes.push({ alertId: existing, lineId: r.lineId, areaId: r.areaId, state: r.state, severity: r.severity, ts: t.ts });
        }
        await saveSnapshot(tx, now);
      });
    } catch (err) {
      log.error("could not store alert transitions; will retry", { error: describeError(err), transitions: batch.length });
      return;
    }
    pending = pending.slice(batch.length);
    for (const [k, id] of added) openIds.set(k, id);
    for (const k of removed) openIds.delete(k);
    publish(changes);
  }

  function take(list: ConditionEvent[]) {
    for (const t of list) pending.push(t);
    if (pending.length > MAX_PENDING_TRANSITIONS) {
      log.error("too many alert transitions waiting for the database; dropping the oldest", { dropped: pending.length - MAX_PENDING_TRANSITIONS });
      pending = pending.slice(pending.length - MAX_PENDING_TRANSITIONS);
    }
  }

  async function refreshIfChanged(nowMs: number): Promise<void> {
    if (nowMs - lastRulesPoll < RULES_POLL_MS) return;
    lastRulesPoll = nowMs;
    const [nextRulesSig, nextTopoSig] = await Promise.all([readRulesSignature(db), readTopologySignature(db)]);
    if (nextRulesSig === rulesSig && nextTopoSig === topoSig) return;
    const topoChanged = nextTopoSig !== topoSig;
    if (topoChanged) topo = await loadPlantTopology(db);
    rules = await loadRules();
    timeZone = (await getPlantSettings(db)).timeZone;
    engine = createRuleEngine({ rules, topology: topo.topology, state: engine.snapshot() });
    pipeline = buildPipeline(engine, pipeline.snapshot());
    take(pipeline.prune(nowMs));
    rulesSig = nextRulesSig;
    topoSig = nextTopoSig;
    log.info(`alerts engine reloaded (${topoChanged ? "plant and " : ""}rules changed)`, { rules: rules.length });
    await flush();
    await reconcile("rules changed");
  }

  async function escalate(nowMs: number): Promise<void> {
    if (nowMs - lastEscalation < ESCALATE_EVERY_MS) return;
    lastEscalation = nowMs;
    const expired: AlertChange[] = await expireShelving(db, nowMs);
    publish(expired.map(({ shelved: _s, ...c }) => c));
    const r = await runEscalation(db, nowMs, { appUrl: env.APP_URL, timeZone, subjects: topo.subjects });
    for (const n of r.notified) log.info(`alert ${n.alertId}: e-mail queued for on-call order ${n.order}`, { to: n.recipients });
  }

  // late and historical readings bypass the live engine and are re-checked on their own (ingest/late-recheck.ts)
  const late = createLateRecheck(ctx, () => ({ engine, rules, topo, timeZone }));
  log.info("alerts engine running", { rules: rules.length, openAlerts: openIds.size });
  return {
    async onCommitted(readings: CommittedReading[]) {
      if (closed) return;
      // the worker hands them over per device in time order; the engine wants time order
      const sorted = readings.length > 1 ? [...readings].sort((a, b) => a.ts - b.ts) : readings;
      for (const r of late.takeLive(sorted)) {
        if (!isChannel(r.channel)) continue;
        const out = pipeline.push({ sensorKey: r.deviceCode, channel: r.channel, ts: r.ts, value: r.value });
        if (out.length) take(out);
      }
      dirty = true;
      await flush();
    },
    async onTick(nowMs: number) {
      if (closed) return;
      take(pipeline.tick(nowMs));
      await flush();
      await late.onTick(nowMs);
      try {
        await refreshIfChanged(nowMs);
      } catch (err) {
        log.warn("could not reload rules", { error: describeError(err) });
      }
      try {
        await escalate(nowMs);
      } catch (err) {
        log.warn("escalation round failed; will retry", { error: describeError(err) });
      }
      if (dirty && nowMs - lastSnapshotTs >= SNAPSHOT_EVERY_MS) {
        try {
          await saveSnapshot(db, nowMs);
        } catch (err) {
          log.warn("could not save the alerts-engine state", { error: describeError(err) });
        }
      }
    },
    async close() {
      closed = true;
      await flush();
      try {
        await saveSnapshot(db, Date.now());
      } catch (err) {
        log.warn("could not save the alerts-engine state on close", { error: describeError(err) });
      }
    },
  };
}
