// db/use-cases/ is the one place for use cases that combine data access (db/queries) with the
// rules and computations of lib/: report assembly, the due-list e-mail, the rule replay. Read
// models stay in db/queries, pure computation in lib/, request handling in app/.
//
// Use case: replay a proposed rule over recorded data (the limits editor's backtest). Reads the
// rules, the topology and the readings, runs lib/rules replay() — the code the live worker
// runs — for the current rules and for the proposal, and counts what each would have raised.
import { and, eq, gte, lt } from "drizzle-orm";
import type mysql from "mysql2/promise";
import type { Db } from "../client";
import { alerts as alertsTable } from "../schema";
import { loadPlantTopology, type AlertSubject } from "../queries/topology";
import { listRuleRows, toRuleDefinitions } from "../queries/rule-rows";
import { collectAlertEpisodes, replay, type AlertEpisode, type Channel } from "../../lib/rules";
import { mergeSeries, replaySensors, scopeTopologyForReplay, type ReplaySensor, type ReplaySeries } from "../../lib/rules/replay-scope";
import { checkProposedRule, replayInputSchema, type ReplayInput } from "../../lib/rules/rule-input";
import { badInput, fieldErrorsFromIssues, notFound } from "../../lib/errors";
import { DAY_MS } from "../../lib/vocabulary";
import type { ReplayResult, ReplaySide } from "../../lib/views/replay";

/** Raw readings are replayed when the span holds at most this many (else 1-minute rollups). */
export const REPLAY_RAW_BUDGET = 2_000_000;
export const REPLAY_DEFAULT_SPAN_MS = 7 * DAY_MS;
export const REPLAY_MAX_SPAN_MS = 31 * DAY_MS;
const EPISODES_SHOWN = 300;

async function estimateRawCount(pool: mysql.Pool, sensors: ReplaySensor[], fromTs: number, toTs: number): Promise<number> {
  let total = 0;
  for (const s of sensors) {
    const [rows] = await pool.query<mysql.RowDataPacket[]>(
      "SELECT COALESCE(SUM(`count`), 0) AS n FROM rollup_1m WHERE device_id = ? AND channel IN (?) AND bucket_ts >= ? AND bucket_ts < ?",
      [s.deviceId, s.channels, fromTs - 60_000, toTs],
    );
    total += Number(rows[0]?.n ?? 0);
  }
  return total;
}

async function loadRawSeries(pool: mysql.Pool, s: ReplaySensor, channel: Channel, fromTs: number, toTs: number): Promise<ReplaySeries> {
  const [rows] = await pool.query<mysql.RowDataPacket[]>({
    sql: "SELECT ts, value FROM readings WHERE device_id = ? AND channel = ? AND ts >= ? AND ts < ? ORDER BY ts",
    values: [s.deviceId, channel, fromTs, toTs],
    rowsAsArray: true,
  });
  const ts = new Array<number>(rows.length);
  const values = new Array<number>(rows.length);
  for (let i = 0; i < rows.length; i++) {
    ts[i] = Number(rows[i][0]);
    values[i] = Number(rows[i][1]);
  }
  return { code: s.code, channel, ts, values };
}

/**
 * One value per minute from the 1-minute rollups: charge the extreme by magnitude (an excursion
 * inside the minute is not averaged away), running the minimum (a stop inside the minute
 * counts), humidity, temperature and speed the mean.
 */
async function loadMinuteSeries(pool: mysql.Pool, s: ReplaySensor, channel: Channel, fromTs: number, toTs: number): Promise<ReplaySeries> {
  const [rows] = await pool.query<mysql.RowDataPacket[]>({
    sql: "SELECT bucket_ts, `min`, `max`, `sum`, `count` FROM rollup_1m WHERE device_id = ? AND channel = ? AND bucket_ts >= ? AND bucket_ts < ? ORDER BY bucket_ts",
    values: [s.deviceId, channel, fromTs, toTs],
    rowsAsArray: true,
  });
  const ts: number[] = [];
  const values: number[] = [];
  for (const r of rows) {
    const [b, mn, mx, sm, n] = [Number(r[0]), Number(r[1]), Number(r[2]), Number(r[3]), Number(r[4])];
    if (!(n > 0)) continue;
    const v = channel === "charge_kv" ? (Math.abs(mn) > Math.abs(mx) ? mn : mx) : channel === "running" ? mn : sm / n;
    ts.push(b);
    values.push(v);
  }
  return { code: s.code, channel, ts, values };
}

function summarize(episodes: AlertEpisode[], editedRuleId: number, subjects: ReadonlyMap<string, AlertSubject>): ReplaySide {
  return {
    count: episodes.length,
    totalDurationMs: episodes.reduce((n, e) => n + (e.durationMs ?? 0), 0),
    stillActive: episodes.filter((e) => e.clearedTs === null).length,
    chattering: episodes.filter((e) => e.chattering).length,
    episodes: episodes.slice(-EPISODES_SHOWN).map((e) => ({
      ruleId: e.ruleId,
      severity: e.severity,
      subjectKey: e.subjectKey,
      where: subjects.get(e.subjectKey)?.where ?? e.subjectKey,
      raisedTs: e.raisedTs,
      clearedTs: e.clearedTs,
      durationMs: e.durationMs,
      peakValue: e.peakValue,
      chattering: e.chattering,
      edited: e.ruleId === editedRuleId,
    })),
  };
}

/**
 * Replays the current rules of the proposal's kind and the same set with the proposal in place
 * over the recorded data of the sensors in the proposal's scope (lib/rules replay(), the code
 * the live worker runs), and counts what each would have raised.
 */
export async function replayRuleProposal(db: Db, pool: mysql.Pool, raw: ReplayInput, nowMs = Date.now(), rawRetentionMs = 14 * DAY_MS): Promise<ReplayResult> {
  const started = performance.now();
  const parsedInput = replayInputSchema.safeParse(raw);
  if (!parsedInput.success) throw badInput("The replay request is not valid.", fieldErrorsFromIssues(parsedInput.error.issues));
  const input = parsedInput.data;
  const toTs = Math.min(input.toTs ?? nowMs, nowMs);
  const fromTs = input.fromTs ?? toTs - REPLAY_DEFAULT_SPAN_MS;
  if (!(fromTs < toTs)) throw badInput("The replay must start before it ends.", { fromTs: ["Start before the end"] });
  if (toTs - fromTs > REPLAY_MAX_SPAN_MS) throw badInput("Replay at most 31 days at a time.", { fromTs: ["At most 31 days"] });

  const [topo, rows] = await Promise.all([loadPlantTopology(db), listRuleRows(db)]);
  const { rules: current } = toRuleDefinitions(rows);
  const existing = input.ruleId !== undefined ? rows.find((r) => r.id === input.ruleId) : undefined;
  if (input.ruleId !== undefined && !existing) throw notFound("No such rule.");
  const editedRuleId = existing?.id ?? rows.reduce((m, r) => Math.max(m, r.id), 0) + 1;
  const proposal = checkProposedRule(input, editedRuleId, existing ? existing.currentVersion + 1 : 1);
  const sameKind = current.filter((r) => r.kind === input.kind);
  const proposedSet = [...sameKind.filter((r) => r.id !== editedRuleId), proposal];

  const flatChannel: Channel | null = proposal.kind === "sensor_flat" ? proposal.params.channel : null;
  const topology = scopeTopologyForReplay(topo.topology, input.kind, input.scope, flatChannel);
  const sensors = replaySensors(topology, topo.deviceIdByCode, input.kind, flatChannel);

  let source: "raw" | "1m" = input.source ?? "raw";
  if (!input.source) {
    if (fromTs < nowMs - rawRetentionMs) source = "1m";
    else if ((await estimateRawCount(pool, sensors, fromTs, toTs)) > REPLAY_RAW_BUDGET) source = "1m";
  }
  const series: ReplaySeries[] = [];
  for (const s of sensors) {
    for (const ch of s.channels) series.push(await (source === "raw" ? loadRawSeries(pool, s, ch, fromTs, toTs) : loadMinuteSeries(pool, s, ch, fromTs, toTs)));
  }
  const readings = mergeSeries(series);
  const currentEpisodes = collectAlertEpisodes(replay(sameKind, topology, readings, { endTs: toTs }));
  const proposedEpisodes = collectAlertEpisodes(replay(proposedSet, topology, readings, { endTs: toTs }));

  // what the live engine stored over the span, within the scope
  const subjectInScope = new Set<string>();
  for (const p of topology.points) if (p.fieldMeterSensorKey !== null) subjectInScope.add(`point:${p.pointId}`);
  for (const a of topology.areas) if (a.climateSensorKey !== null) subjectInScope.add(`area:${a.areaId}`);
  for (const s of sensors) subjectInScope.add(`sensor:${s.code}`);
  for (const n of topology.neutralizers) subjectInScope.add(`neutralizer:${n.neutralizerId}`);
  const storedRows = await db
    .select({ subjectKey: alertsTable.subjectKey })
    .from(alertsTable)
    .where(and(eq(alertsTable.kind, input.kind), gte(alertsTable.startTs, fromTs), lt(alertsTable.startTs, toTs)));
  const stored = storedRows.filter((r) => subjectInScope.has(r.subjectKey)).length;

  return {
    fromTs,
    toTs,
    source,
    readings: readings.length,
    sensors: sensors.map((s) => s.code),
    elapsedMs: Math.round(performance.now() - started),
    editedRuleId,
    current: summarize(currentEpisodes, editedRuleId, topo.subjects),
    proposed: summarize(proposedEpisodes, editedRuleId, topo.subjects),
    stored,
  };
}
