// The backfill's alerts, from the database's side: loads the rules and the plant like the live
// runner (db/queries/rule-rows.ts, db/queries/topology.ts), plays each chunk of backfilled
// readings through simulators/backfill-alerts.ts as the chunk is written, answers the cleared
// alerts as the demo people would (simulators/backfill-responses.ts) and stores them in bulk
// (db/seed-alert-history.ts). Alerts still open when the history ends are cleared there: the
// live worker starts without their engine state and would otherwise clear them itself at its
// first reconcile (ingest/alerts-runner.ts), with a reason that is not true of history; it
// raises the condition again from live readings if it persists.
//
// Played only when the backfill writes every sensor the rules look at: a partial backfill
// (--devices) would make the others look silent.
import type { Db } from "../db/client";
import type { ReadingRow } from "../db/queries/readings-write";
import { loadRuleDefinitions } from "../db/queries/rule-rows";
import { loadPlantTopology } from "../db/queries/topology";
import { loadDemoResponders, storeAlertHistory, type AlertHistoryRow } from "../db/seed-alert-history";
import type { Reading } from "../lib/rules/types";
import { createAlertHistoryPlayer, isRuleChannel, type HistoryAlert, type Responder } from "./backfill-alerts";
import { createResponsePlayer } from "./backfill-responses";

/** Thinned samples never further apart than this (and never more than half the shortest silence time). */
const MAX_SAMPLE_GAP_MS = 60_000;
/** Cleared alerts are stored in batches of about this many. */
const STORE_EVERY = 1000;

export type HistoryAlertReport = { readings: number; alerts: number; events: number; alreadyStored: number; engineMs: number; storeMs: number };

export type HistoryAlertWriter = {
  maxPeriodMs: number;
  onRows(rows: ReadingRow[], chunkEndMs: number): Promise<void>;
  finish(): Promise<HistoryAlertReport>;
};

/** A writer for the history [fromMs, toMs) of the devices `codes`, or the reason alerts are not played. */
export async function createHistoryAlertWriter(db: Db, opts: { fromMs: number; toMs: number; codes: readonly string[] }): Promise<HistoryAlertWriter | { skipped: string }> {
  const [topo, { rules }, people] = await Promise.all([loadPlantTopology(db), loadRuleDefinitions(db), loadDemoResponders(db)]);
  const written = new Set(opts.codes);
  const watched = [
    ...topo.topology.areas.map((a) => a.climateSensorKey),
    ...topo.topology.lines.flatMap((l) => [l.runningSensorKey, l.speedSensorKey]),
    ...topo.topology.points.map((p) => p.fieldMeterSensorKey),
  ].filter((k): k is string => k !== null);
  const missing = [...new Set(watched.filter((k) => !written.has(k)))];
  if (missing.length > 0) return { skipped: `${missing.length} sensor(s) the rules watch are not in this backfill (e.g. ${missing[0]})` };
  if (rules.length === 0) return { skipped: "no rules" };

  const silentMs = rules.flatMap((r) => (r.kind === "sensor_silent" ? [r.params.silentS * 1000] : []));
  const maxPeriodMs = Math.min(MAX_SAMPLE_GAP_MS, ...silentMs.map((ms) => ms / 2));
  const codeOf = new Map<number, string>();
  for (const [code, id] of topo.deviceIdByCode) codeOf.set(id, code);

  // the edge nodes and the feed the sensors report through hold their silent sensors, as live
  const player = createAlertHistoryPlayer({ rules, topology: topo.topology, parents: topo.parents, fromMs: opts.fromMs });
  const responses = people !== null ? createResponsePlayer(opts.toMs) : null;
  const personOf = (r: Responder | null) => (r === null || people === null ? null : people[r]);
  const report: HistoryAlertReport = { readings: 0, alerts: 0, events: 0, alreadyStored: 0, engineMs: 0, storeMs: 0 };
  let ready: AlertHistoryRow[] = [];

  const toRow = (a: HistoryAlert): AlertHistoryRow => {
    responses?.respond(a);
    return { ...a, ackedBy: personOf(a.ackedBy), events: a.events.map(({ by, ...e }) => ({ ...e, personId: personOf(by) })) };
  };
  const store = async (force: boolean) => {
    if (ready.length === 0 || (!force && ready.length < STORE_EVERY)) return;
    const batch = ready;
    ready = [];
    const t0 = performance.now();
    const r = await storeAlertHistory(db, batch, topo.subjects);
    report.storeMs += performance.now() - t0;
    report.alerts += r.alerts;
    report.events += r.events;
    report.alreadyStored += r.alreadyStored;
  };

  return {
    maxPeriodMs,
    async onRows(rows, chunkEndMs) {
      const t0 = performance.now();
      const readings: Reading[] = [];
      for (const r of rows) {
        const sensorKey = codeOf.get(r.deviceId);
        if (sensorKey !== undefined && isRuleChannel(r.channel)) readings.push({ sensorKey, channel: r.channel, ts: r.ts, value: r.value });
      }
      readings.sort((a, b) => a.ts - b.ts);
      player.push(readings);
      player.advanceTo(chunkEndMs);
      for (const a of player.drainCleared()) ready.push(toRow(a));
      report.readings += readings.length;
      report.engineMs += performance.now() - t0;
      await store(false);
    },
    async finish() {
      for (const a of player.finish(opts.toMs)) ready.push(toRow(a));
      await store(true);
      report.engineMs = Math.round(report.engineMs);
      report.storeMs = Math.round(report.storeMs);
      return report;
    },
  };
}
