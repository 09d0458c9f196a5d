/**
 * Shift handover: what happened on a shift, built from the shift's readings, alerts, notes and
 * the neutralizers' records. Pure; db/queries/reports.ts loads the inputs.
 *
 * Sections: alerts (with who acknowledged and what they noted), time each point spent over its
 * charge limit and its worst reading, the lowest RH per hall, neutralizers that need attention,
 * line notes.
 */
import type { MaintenanceWindowView } from "../views/maintenance";
import type { ShiftWindow } from "../plant-time";
import { ACTIVE_ALERT_STATES, ALERT_STATE_WORDS, DAY_MS, alertStateCodeAt, type AlertState, type RuleKind, type Severity } from "../vocabulary";
import { chargeLimitAt, rhLowLimitAt, type StoredRule } from "../rules/limits-in-force";
import { lowestReading, timeOverLimit, worstReading, type Sample } from "./series";
import { buildPlaceIndex, type ReportArea, type Where } from "./types";
import type { PointState } from "../vocabulary";


/**
 * A raw reading stands for at most this long (sample-and-hold): 2 min, the plant-wide "sensor
 * silent" time of the default rules. Longer gaps count as no data.
 */
export const RAW_HOLD_MS = 120_000;

/** A point whose worst reading reached this share of its limit is shown as "near" (a display choice). */
export const NEAR_LIMIT_FRACTION = 0.8;

/** Cleaning or a check falling due within this time after the shift is listed as coming up. */
export const DUE_SOON_MS = DAY_MS;

export type HandoverAlertEvent = { ts: number; kind: string; personName: string | null; comment: string | null };

export type HandoverAlertInput = {
  id: number;
  kind: RuleKind;
  severity: Severity;
  ruleName: string | null;
  message: string;
  state: AlertState;
  startTs: number;
  endTs: number | null;
  peakValue: number | null;
  chattering: boolean;
  shelvedUntilTs: number | null;
  shelvedReason: string | null;
  ackedByName: string | null;
  ackedTs: number | null;
  areaId: number | null;
  lineId: number | null;
  pointId: number | null;
  deviceId: number | null;
  neutralizerId: number | null;
  /** Acknowledgements, comments and shelving with what people wrote, oldest first. */
  events: readonly HandoverAlertEvent[];
};

export type HandoverNeutralizerInput = {
  id: number;
  tag: string;
  kind: string;
  state: string;
  pointId: number | null;
  cleaningIntervalDays: number;
  checkIntervalDays: number;
  lastCleanedTs: number | null;
  /** Midnight of the installation day, epoch ms, if known. */
  installedTs: number | null;
  lastCheck: { ts: number; passed: boolean; failReasons: string | null } | null;
};

export type HandoverNoteInput = { id: number; ts: number; lineId: number; pointId: number | null; text: string; personName: string | null };

export type HandoverInput = {
  plantName: string;
  window: ShiftWindow;
  generatedTs: number;
  plant: readonly ReportArea[];
  rules: readonly StoredRule[];
  /** charge_kv readings per field-meter device id, including the last one before the shift. */
  chargeSeries: ReadonlyMap<number, readonly Sample[]>;
  /** rh_pct readings per logger device id, including the last one before the shift. */
  rhSeries: ReadonlyMap<number, readonly Sample[]>;
  /** Alerts that were active at any time during the shift. */
  alerts: readonly HandoverAlertInput[];
  neutralizers: readonly HandoverNeutralizerInput[];
  notes: readonly HandoverNoteInput[];
  holdMs?: number;
};

export type HandoverAlertRow = HandoverAlertInput & { where: Where; code: PointState; status: string; raisedInShift: boolean; activeMsInShift: number };

export type HandoverPointRow = {
  pointId: number;
  where: Where;
  limitKv: number | null;
  limitFrom: string | null;
  overMs: number;
  coveredMs: number;
  excursions: number;
  worst: Sample | null;
  code: PointState;
};

export type HandoverHallRow = {
  areaId: number;
  areaName: string;
  rhMinPct: number;
  rhMaxPct: number;
  limitPct: number | null;
  lowest: Sample | null;
  belowBandMs: number;
  belowLimitMs: number;
  coveredMs: number;
  code: PointState;
};

export type HandoverNeutralizerRow = { id: number; tag: string; kind: string; where: Where; reasons: string[]; code: PointState };

export type HandoverNoteRow = HandoverNoteInput & { where: Where };

export type HandoverReport = {
  kind: "handover";
  plantName: string;
  window: ShiftWindow;
  generatedTs: number;
  /** True while the shift is still running: the figures cover it only up to generatedTs. */
  inProgress: boolean;
  summary: {
    alertsRaised: number;
    alertsActiveAtEnd: number;
    unacknowledgedAtEnd: number;
    pointsOverLimit: number;
    pointsWithData: number;
    pointsTotal: number;
    worst: { where: Where; sample: Sample } | null;
    lowestRh: { areaName: string; sample: Sample } | null;
    neutralizersNeedingAttention: number;
    notes: number;
  };
  alerts: HandoverAlertRow[];
  points: HandoverPointRow[];
  /** The five readings of largest magnitude, one per point. */
  worstReadings: { where: Where; sample: Sample; limitKv: number | null }[];
  halls: HandoverHallRow[];
  neutralizers: HandoverNeutralizerRow[];
  notes: HandoverNoteRow[];
  /** Planned work (maintenance windows) overlapping the shift, with owner, reason and summary. */
  maintenance?: MaintenanceWindowView[];
};

const LEVEL_WORDS = { point: "point", line: "line", area: "hall", plant: "plant-wide" } as const;

function daysText(ms: number): string {
  const d = Math.floor(ms / DAY_MS);
  if (d >= 1) return `${d} d`;
  const h = Math.max(1, Math.round(ms / 3_600_000));
  return `${h} h`;
}

/** Why a neutralizer needs attention at `atTs`, with its code; empty reasons when it does not. */
export function neutralizerAttention(
  n: HandoverNeutralizerInput,
  atTs: number,
  effectLossAlertTs: readonly number[] = [],
): { reasons: string[]; code: PointState } {
  const reasons: string[] = [];
  let code: PointState = "normal";
  const raise = (c: PointState) => {
    if (c === "over" || (c === "near" && code === "normal")) code = c;
  };
  if (n.state === "faulty") {
    reasons.push("Marked faulty");
    raise("over");
  }
  if (n.state === "needs_cleaning") {
    reasons.push("Marked for cleaning");
    raise("near");
  }
  if (effectLossAlertTs.length > 0) {
    reasons.push(`Losing effect (${effectLossAlertTs.length === 1 ? "1 alert" : `${effectLossAlertTs.length} alerts`} this shift)`);
    raise("over");
  }
  if (n.lastCheck && !n.lastCheck.passed) {
    reasons.push(`Last check failed${n.lastCheck.failReasons ? `: ${n.lastCheck.failReasons}` : ""}`);
    raise("over");
  }
  if (n.lastCleanedTs === null) {
    reasons.push("No cleaning on record");
    raise("near");
  } else {
    const due = n.lastCleanedTs + n.cleaningIntervalDays * DAY_MS;
    if (due <= atTs) {
      reasons.push(`Cleaning overdue by ${daysText(atTs - due)}`);
      raise("near");
    } else if (due - atTs <= DUE_SOON_MS) {
      reasons.push(`Cleaning due in ${daysText(due - atTs)}`);
      raise("near");
    }
  }
  const checkFrom = n.lastCheck?.ts ?? n.installedTs;
  if (checkFrom === null) {
    reasons.push("No check on record");
    raise("near");
  } else {
    const due = checkFrom + n.checkIntervalDays * DAY_MS;
    if (due <= atTs) {
      reasons.push(`Check overdue by ${daysText(atTs - due)}`);
      raise("near");
    } else if (due - atTs <= DUE_SOON_MS) {
      reasons.push(`Check due in ${daysText(due - atTs)}`);
      raise("near");
    }
  }
  return { reasons, code };
}

export function buildHandover(input: HandoverInput): HandoverReport {
  const { window, generatedTs } = input;
  const holdMs = input.holdMs ?? RAW_HOLD_MS;
  // figures of a shift still running stop at "now"
  const endTs = Math.min(window.endTs, Math.max(window.startTs, generatedTs));
  const span = { startTs: window.startTs, endTs };
  const places = buildPlaceIndex(input.plant);

  // --- points: time over limit, worst reading ---------------------------------------------
  const points: HandoverPointRow[] = [];
  for (const area of input.plant) {
    for (const line of area.lines) {
      for (const point of line.points) {
        const where = places.where({ pointId: point.id });
        const limit = chargeLimitAt({ pointId: point.id, lineId: line.id, areaId: area.id }, input.rules);
        const series = point.fieldMeter ? (input.chargeSeries.get(point.fieldMeter.id) ?? []) : [];
        // no rule in force: nothing is "over", but the coverage still counts
        const over = timeOverLimit(series, { kind: "magnitude_above", limit: limit?.value ?? Number.POSITIVE_INFINITY }, span, holdMs);
        const worst = worstReading(series, span);
        let code: PointState = "normal";
        if (over.coveredMs === 0 || !worst) code = "silent";
        else if (over.overMs > 0) code = "over";
        else if (limit && Math.abs(worst.value) >= NEAR_LIMIT_FRACTION * limit.value) code = "near";
        points.push({
          pointId: point.id,
          where,
          limitKv: limit?.value ?? null,
          limitFrom: limit ? `${limit.ruleName} (${LEVEL_WORDS[limit.level]})` : null,
          overMs: over.overMs,
          coveredMs: over.coveredMs,
          excursions: over.excursions.length,
          worst,
          code,
        });
      }
    }
  }

  // --- halls: lowest RH, time below the band and below the alert limit ----------------------
  const halls: HandoverHallRow[] = input.plant.map((area) => {
    const series = area.logger ? (input.rhSeries.get(area.logger.id) ?? []) : [];
    const limit = rhLowLimitAt({ areaId: area.id }, input.rules);
    const band = timeOverLimit(series, { kind: "below", limit: area.rhMinPct }, span, holdMs);
    const belowLimitMs = limit ? timeOverLimit(series, { kind: "below", limit: limit.value }, span, holdMs).overMs : 0;
    const lowest = lowestReading(series, span);
    let code: PointState = "normal";
    if (!lowest || band.coveredMs === 0) code = "silent";
    else if (belowLimitMs > 0) code = "over";
    else if (band.overMs > 0) code = "near";
    return {
      areaId: area.id,
      areaName: area.name,
      rhMinPct: area.rhMinPct,
      rhMaxPct: area.rhMaxPct,
      limitPct: limit?.value ?? null,
      lowest,
      belowBandMs: band.overMs,
      belowLimitMs,
      coveredMs: band.coveredMs,
      code,
    };
  });

  // --- alerts -------------------------------------------------------------------------------
  const alerts: HandoverAlertRow[] = input.alerts
    .filter((a) => a.startTs < window.endTs && (a.endTs === null || a.endTs > window.startTs))
    .map((a) => {
      const from = Math.max(a.startTs, window.startTs);
      const to = Math.min(a.endTs ?? endTs, endTs);
      return {
        ...a,
        where: places.where(a),
        code: alertStateCodeAt(a, endTs),
        status: ALERT_STATE_WORDS[a.state],
        raisedInShift: a.startTs >= window.startTs,
        activeMsInShift: Math.max(0, to - from),
      };
    })
    .sort((x, y) => x.startTs - y.startTs || x.id - y.id);

  // --- neutralizers -------------------------------------------------------------------------
  const effectLoss = new Map<number, number[]>();
  for (const a of alerts) {
    if (a.kind === "effect_loss" && a.neutralizerId !== null) {
      effectLoss.set(a.neutralizerId, [...(effectLoss.get(a.neutralizerId) ?? []), a.startTs]);
    }
  }
  const neutralizers: HandoverNeutralizerRow[] = input.neutralizers
    .filter((n) => n.state !== "removed")
    .map((n) => {
      const { reasons, code } = neutralizerAttention(n, window.endTs, effectLoss.get(n.id) ?? []);
      return { id: n.id, tag: n.tag, kind: n.kind, where: places.where({ pointId: n.pointId }), reasons, code };
    })
    .filter((n) => n.reasons.length > 0)
    .sort((a, b) => (a.code === b.code ? a.tag.localeCompare(b.tag) : a.code === "over" ? -1 : b.code === "over" ? 1 : 0));

  // --- notes --------------------------------------------------------------------------------
  const notes: HandoverNoteRow[] = input.notes
    .filter((n) => n.ts >= window.startTs && n.ts < window.endTs)
    .map((n) => ({ ...n, where: places.where({ lineId: n.lineId, pointId: n.pointId }) }))
    .sort((a, b) => a.ts - b.ts || a.id - b.id);

  // --- summary ------------------------------------------------------------------------------
  const withWorst = points.filter((p): p is HandoverPointRow & { worst: Sample } => p.worst !== null);
  const worstReadings = [...withWorst]
    .sort((a, b) => Math.abs(b.worst.value) - Math.abs(a.worst.value) || a.worst.ts - b.worst.ts)
    .slice(0, 5)
    .map((p) => ({ where: p.where, sample: p.worst, limitKv: p.limitKv }));
  const lowestHall = halls
    .filter((h): h is HandoverHallRow & { lowest: Sample } => h.lowest !== null)
    .sort((a, b) => a.lowest.value - b.lowest.value)[0];

  return {
    kind: "handover",
    plantName: input.plantName,
    window,
    generatedTs,
    inProgress: generatedTs < window.endTs,
    summary: {
      alertsRaised: alerts.filter((a) => a.raisedInShift).length,
      alertsActiveAtEnd: alerts.filter((a) => a.endTs === null || a.endTs > endTs).length,
      unacknowledgedAtEnd: alerts.filter((a) => ACTIVE_ALERT_STATES.includes(a.state) && a.ackedTs === null && (a.endTs === null || a.endTs > endTs)).length,
      pointsOverLimit: points.filter((p) => p.overMs > 0).length,
      pointsWithData: points.filter((p) => p.coveredMs > 0).length,
      pointsTotal: points.length,
      worst: worstReadings[0] ? { where: worstReadings[0].where, sample: worstReadings[0].sample } : null,
      lowestRh: lowestHall ? { areaName: lowestHall.areaName, sample: lowestHall.lowest } : null,
      neutralizersNeedingAttention: neutralizers.length,
      notes: notes.length,
    },
    alerts,
    points,
    worstReadings,
    halls,
    neutralizers,
    notes,
  };
}
