// Late and out-of-order readings inside the alerts runner (ingest/alerts-runner.ts).
//
// takeLive() sorts each committed batch: a reading goes to the live engine only when it is newer
// than the live engine's watermark for its sensor and channel (the last reading time the engine
// took) and is not a Sparkplug historical metric. Everything else is late: the live engine never
// sees it, so an old reading cannot throw off its windows, delays or open alerts. Late readings
// are gathered into spans per sensor; once no more have come for LATE_RECHECK_SETTLE_MS (a
// store-and-forward upload arrives in many messages), onTick() re-checks each span through the
// same rules (lib/rules/late-span.ts) over the stored readings around it, stores what it finds
// as alerts marked "found late" (db/queries/late-findings.ts) and pages on call only for an
// excursion that ended within LATE_FINDING_QUIET_AFTER_MS (lib/settings.ts).
import type { PlantTopology } from "../db/queries/topology";
import { getAlertingSettings, listOnCallAt } from "../db/queries/oncall";
import { listKnownAlerts, loadScopeReadings, storeLateFinding } from "../db/queries/late-findings";
import type { NewMail } from "../db/queries/outbox";
import type { RuleDefinition, RuleEngine } from "../lib/rules";
import { LATE_FOLLOW_MS, lateLookbackMs, lateSpanScope, recheckLateSpan, type LateFinding } from "../lib/rules/late-span";
import { composeAlertEmail } from "../lib/mail/alert-emails";
import { formatPlantTime } from "../lib/plant-time";
import { internalTopics } from "../lib/contract/topics";
import { getSettings } from "../lib/settings";
import { severitiesAtOrAbove } from "./alerts-escalation";
import { describeError } from "./log";
import type { CommittedReading, SinkContext } from "./sinks";

/** What the runner holds now (it swaps engine, rules and plant on a reload). */
export type LateRecheckSources = () => { engine: RuleEngine; rules: RuleDefinition[]; topo: PlantTopology; timeZone: string };

type Pending = { fromTs: number; toTs: number; firstAddedMs: number; lastAddedMs: number };

/** a span still growing after this long is re-checked anyway (later readings start a new one) */
const MAX_GATHER_MS = 60_000;
/** sensors and pending spans kept at most (memory bound) */
const MAX_PENDING = 5000;

export type LateRecheck = ReturnType<typeof createLateRecheck>;

export function createLateRecheck(ctx: SinkContext, sources: LateRecheckSources, opts: { settleMs?: number; quietAfterMs?: number } = {}) {
  const { db, pool, log } = ctx;
  const settleMs = opts.settleMs ?? getSettings().LATE_RECHECK_SETTLE_MS;
  const quietAfterMs = opts.quietAfterMs ?? getSettings().LATE_FINDING_QUIET_AFTER_MS;
  /** `${code}\0${channel}` → the live engine's last reading time */
  const watermarks = new Map<string, number>();
  let engineSeen: RuleEngine | null = null;
  const pending = new Map<string, Pending>();
  const stats = { late: 0, rechecks: 0, findings: 0, quiet: 0 };

  /** Picks up the watermarks of an engine made from a saved state (start-up, a rules reload). */
  function syncWatermarks(engine: RuleEngine): void {
    if (engine === engineSeen) return;
    engineSeen = engine;
    for (const s of engine.snapshot().sensors) {
      for (const [channel, ts] of Object.entries(s.channelLastTs)) {
        const key = `${s.sensorKey}\u0000${channel}`;
        if (typeof ts === "number" && ts > (watermarks.get(key) ?? -Infinity)) watermarks.set(key, ts);
      }
    }
  }

  function addLate(r: CommittedReading, nowMs: number): void {
    stats.late++;
    const p = pending.get(r.deviceCode);
    if (p) {
      p.fromTs = Math.min(p.fromTs, r.ts);
      p.toTs = Math.max(p.toTs, r.ts);
      p.lastAddedMs = nowMs;
    } else if (pending.size < MAX_PENDING) {
      pending.set(r.deviceCode, { fromTs: r.ts, toTs: r.ts, firstAddedMs: nowMs, lastAddedMs: nowMs });
    }
  }

  /** The readings (in reading-time order) the live engine should take; the rest wait for a re-check. */
  function takeLive(readings: readonly CommittedReading[]): CommittedReading[] {
    syncWatermarks(sources().engine);
    const now = Date.now();
    const live: CommittedReading[] = [];
    for (const r of readings) {
      const key = `${r.deviceCode}\u0000${r.channel}`;
      const mark = watermarks.get(key);
      if (r.historical || (mark !== undefined && r.ts <= mark)) {
        addLate(r, now);
        continue;
      }
      watermarks.set(key, r.ts);
      live.push(r);
    }
    return live;
  }

  /** Spans ready for a re-check, overlapping ones merged (one replay per stretch of time). */
  function takeReady(nowMs: number): Array<{ codes: Set<string>; fromTs: number; toTs: number }> {
    const ready: Array<[string, Pending]> = [];
    for (const [code, p] of pending) if (nowMs - p.lastAddedMs >= settleMs || nowMs - p.firstAddedMs >= MAX_GATHER_MS) ready.push([code, p]);
    for (const [code] of ready) pending.delete(code);
    ready.sort((a, b) => a[1].fromTs - b[1].fromTs);
    const groups: Array<{ codes: Set<string>; fromTs: number; toTs: number }> = [];
    for (const [code, p] of ready) {
      const last = groups[groups.length - 1];
      if (last && p.fromTs <= last.toTs) {
        last.codes.add(code);
        last.toTs = Math.max(last.toTs, p.toTs);
      } else groups.push({ codes: new Set([code]), fromTs: p.fromTs, toTs: p.toTs });
    }
    return groups;
  }

  async function pageFor(f: LateFinding, nowMs: number, timeZone: string, topo: PlantTopology): Promise<{ order: number; mails(alertId: number): NewMail[] } | null> {
    const alerting = await getAlertingSettings(db);
    if (!severitiesAtOrAbove(alerting.notifyMinSeverity).includes(f.raise.severity)) return null;
    const onCall = await listOnCallAt(db, nowMs);
    if (onCall.length === 0) return null;
    const order = Math.min(...onCall.map((s) => s.escalationOrder));
    const subject = topo.subjects.get(f.raise.subjectKey);
    const ended = formatPlantTime(f.endedTs, timeZone, "HH:mm");
    return {
      order,
      mails: (alertId) =>
        onCall
          .filter((s) => s.escalationOrder === order)
          .map((s) => {
            const mail = composeAlertEmail(
              {
                alertId,
                kind: f.raise.kind,
                severity: f.raise.severity,
                state: "cleared_unacked",
                message: f.clear.message,
                startTs: f.raise.raisedTs,
                peakValue: f.clear.peakValue,
                expectedCrossingTs: null,
                areaName: null,
                lineName: null,
                pointName: null,
                where: subject?.where ?? null,
                linkLineId: subject?.linkLineId ?? null,
              },
              { level: 1, recipientName: s.personName, appUrl: ctx.env.APP_URL, timeZone, nowMs, unackedForMs: nowMs - f.endedTs },
            );
            const foundLate = `Found late: the readings of this excursion reached Stillfield after it had ended (at ${ended}, plant time).`;
            return {
              dedupeKey: `alert:${alertId}:late:person:${s.personId}`,
              toAddress: s.personEmail,
              subject: `[Found late] ${mail.subject}`,
              bodyText: `${foundLate}\n\n${mail.text}`,
              bodyHtml: mail.html ? `<p><strong>${foundLate}</strong></p>${mail.html}` : null,
            };
          }),
    };
  }

  async function recheck(group: { codes: Set<string>; fromTs: number; toTs: number }, nowMs: number): Promise<void> {
    const { rules, topo, timeZone } = sources();
    const scope = lateSpanScope(topo.topology, group.codes);
    const sensors = scope.sensors.flatMap((s) => {
      const deviceId = topo.deviceIdByCode.get(s.code);
      return deviceId === undefined ? [] : [{ deviceId, code: s.code, channels: s.channels }];
    });
    if (sensors.length === 0) return;
    const fromTs = group.fromTs - lateLookbackMs(rules);
    const toTs = Math.min(nowMs, group.toTs + LATE_FOLLOW_MS);
    const [readings, known] = await Promise.all([loadScopeReadings(pool, sensors, fromTs, toTs), listKnownAlerts(db, fromTs, toTs)]);
    const outcome = recheckLateSpan({ rules, topology: scope.topology, readings, span: { fromTs: group.fromTs, toTs: group.toTs }, known, nowMs, quietAfterMs });
    stats.rechecks++;
    for (const f of outcome.findings) {
      const page = f.quiet ? null : await pageFor(f, nowMs, timeZone, topo);
      const subject = topo.subjects.get(f.raise.subjectKey);
      const stored = await storeLateFinding(db, f, subject, nowMs, page);
      stats.findings++;
      if (f.quiet) stats.quiet++;
      ctx.publish(internalTopics.alerts, JSON.stringify({ alertId: stored.alertId, lineId: stored.lineId, areaId: stored.areaId, state: stored.state, severity: f.raise.severity, ts: f.endedTs }), 1);
      log.info(`alert ${stored.alertId} found late (${f.raise.kind} on ${f.raise.subjectKey}, ended ${new Date(f.endedTs).toISOString()})${f.quiet ? "; nobody paged" : "; on call paged"}`);
    }
    log.info("late span re-checked", {
      sensors: [...group.codes].slice(0, 20),
      from: new Date(group.fromTs).toISOString(),
      to: new Date(group.toTs).toISOString(),
      readings: readings.length,
      findings: outcome.findings.length,
      stillPresent: outcome.stillPresent.length,
      alreadyKnown: outcome.alreadyKnown,
    });
  }

  let running = false;
  /** Re-checks the spans that have settled. Never throws: a failed span is tried again. */
  async function onTick(nowMs: number): Promise<void> {
    if (running || pending.size === 0) return;
    running = true;
    try {
      for (const group of takeReady(nowMs)) {
        try {
          await recheck(group, nowMs);
        } catch (err) {
          log.warn("could not re-check a late span; will retry", { error: describeError(err) });
          // back in the queue, settling afresh (a finding stored before the failure is known next time)
          for (const code of group.codes) {
            const p = pending.get(code);
            if (p) {
              p.fromTs = Math.min(p.fromTs, group.fromTs);
              p.toTs = Math.max(p.toTs, group.toTs);
            } else pending.set(code, { fromTs: group.fromTs, toTs: group.toTs, firstAddedMs: nowMs, lastAddedMs: nowMs });
          }
        }
      }
    } finally {
      running = false;
    }
  }

  return { takeLive, onTick, stats, pendingSpans: () => pending.size };
}
