/**
 * Weekly review of one line: time over limits per point, alert counts and the noisiest rules,
 * and how charge depends on humidity and on speed at each point (least-squares fit of |charge|
 * against hall RH and against line speed, with r²). Pure; db/queries/reports.ts loads the inputs.
 *
 * Data: time over limit from 1-minute rollups (each minute's extreme reading, so the figure is
 * "minutes in which any reading was over", an upper bound), the fits from hourly rollups
 * (rollup_1h) of hours in which the line was running: hall RH and speed as hourly means, charge as
 * the hourly RMS √(Σv²/n) (CHARGE_FIT_MEASURE).
 */
import type { DateWindow } from "../plant-time";
import { chargeLimitAt, rhLowLimitAt, type StoredRule } from "../rules/limits-in-force";
import { fitLeastSquares, thinPairs, type LineFit, type Pair } from "./regression";
import { lowestReading, timeOverLimit, worstReading, type Sample } from "./series";
import type { ReportArea, ReportLine } from "./types";
import type { PointState } from "../vocabulary";

/** A 1-minute rollup bucket stands for one minute. */
export const MINUTE_HOLD_MS = 60_000;

/** An hour counts as "running" when the running flag averaged at least this (ran ≥ 54 min). */
export const RUNNING_FRACTION_MIN = 0.9;

/** Most points drawn in one scatter plot (the fit uses all of them). */
export const MAX_PLOT_POINTS = 400;

export const RULE_KIND_WORDS: Record<string, string> = {
  charge_high: "Charge over limit",
  charge_rate: "Charge rising fast",
  rh_low: "Humidity low",
  rh_forecast: "Humidity falling toward limit",
  sensor_silent: "Sensor silent",
  sensor_flat: "Sensor reading flat",
  effect_loss: "Neutralizer losing effect",
};

/** One hourly rollup: its mean Σv/n and its root mean square √(Σv²/n). */
export type HourlyMean = { deviceId: number; channel: string; bucketTs: number; mean: number; rms: number };

/**
 * The charge figure each hour contributes to the fits: the RMS √(Σv²/n) of the readings, from the
 * rollup's sum of squares. The mean of signed charge would let opposite polarities cancel (an
 * hour half at +8 kV and half at −8 kV has mean 0 but RMS 8 kV), and a neutralizer out of
 * balance swings the web's polarity; the RMS is the charge's typical size whatever its sign, and
 * weighs the high readings that cause trouble a little more than the mean of |v| would.
 */
export const CHARGE_FIT_MEASURE = {
  key: "rms",
  words: "hourly RMS of the charge, √(Σv²/n)",
  why: "the mean of signed readings lets +8 kV and −8 kV cancel to 0; the RMS gives 8 kV for that hour, the charge's size whatever its sign",
} as const;

/** RMS of a rollup from its count and sum of squares. */
export function rollupRms(count: number, sumSq: number): number {
  return count > 0 ? Math.sqrt(Math.max(0, sumSq) / count) : Number.NaN;
}

export type WeeklyAlertInput = {
  id: number;
  ruleId: number;
  ruleName: string | null;
  kind: string;
  severity: string;
  startTs: number;
  endTs: number | null;
  chattering: boolean;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
};

export type WeeklyInput = {
  plantName: string;
  window: DateWindow;
  generatedTs: number;
  area: ReportArea;
  line: ReportLine;
  rules: readonly StoredRule[];
  /** Per field-meter device id: one sample per minute with that minute's extreme charge (signed). */
  minuteCharge: ReadonlyMap<number, readonly Sample[]>;
  /** The hall logger's minute minimum RH. */
  minuteRhMin: readonly Sample[];
  /** Hourly rollups (mean and RMS) of the line's devices and the hall logger. */
  hourly: readonly HourlyMean[];
  /** Alerts raised in the week on the line, its points, and the hall (hall-only alerts have no lineId). */
  alerts: readonly WeeklyAlertInput[];
};

export type WeeklyFit = { fit: LineFit | null; n: number; plot: Pair[] };

export type WeeklyPointRow = {
  pointId: number;
  name: string;
  position: number;
  limitKv: number | null;
  overMs: number;
  coveredMs: number;
  excursions: number;
  worst: Sample | null;
  alerts: number;
  code: PointState;
  rh: WeeklyFit;
  speed: WeeklyFit;
};

export type WeeklyReport = {
  kind: "weekly";
  plantName: string;
  window: DateWindow;
  generatedTs: number;
  line: { id: number; name: string; solventName: string | null };
  hall: {
    id: number;
    name: string;
    rhMinPct: number;
    limitPct: number | null;
    lowest: Sample | null;
    belowBandMs: number;
    belowLimitMs: number;
    coveredMs: number;
    alerts: number;
  };
  runningHours: number;
  points: WeeklyPointRow[];
  alerts: {
    total: number;
    chattering: number;
    byKind: { kind: string; words: string; count: number }[];
    bySeverity: { severity: string; count: number }[];
    noisiestRules: { ruleId: number; ruleName: string; kind: string; count: number; chattering: number; activeMs: number }[];
  };
};

function hourMap(hourly: readonly HourlyMean[], deviceId: number | undefined, channel: string, measure: "mean" | "rms" = "mean"): Map<number, number> {
  const m = new Map<number, number>();
  if (deviceId === undefined) return m;
  for (const h of hourly) if (h.deviceId === deviceId && h.channel === channel && Number.isFinite(h[measure])) m.set(h.bucketTs, h[measure]);
  return m;
}

export function buildWeekly(input: WeeklyInput): WeeklyReport {
  const { window, line, area } = input;
  const span = { startTs: window.startTs, endTs: Math.min(window.endTs, Math.max(window.startTs, input.generatedTs)) };
  const inWeek = (ts: number) => ts >= window.startTs && ts < window.endTs;
  const alerts = input.alerts.filter((a) => inWeek(a.startTs));

  // --- which hours the line ran ---------------------------------------------------------------
  const running = hourMap(input.hourly, line.speedGateway?.id, "running");
  const speed = hourMap(input.hourly, line.speedGateway?.id, "speed_mpm");
  const rh = hourMap(input.hourly, area.logger?.id, "rh_pct");
  const haveRunData = running.size > 0 || speed.size > 0;
  const ran = (hourTs: number): boolean => {
    if (!haveRunData) return true;
    const r = running.get(hourTs);
    if (r !== undefined) return r >= RUNNING_FRACTION_MIN;
    const s = speed.get(hourTs);
    return s !== undefined && s > 0;
  };
  const hoursSeen = new Set<number>();

  // --- points -------------------------------------------------------------------------------
  const points: WeeklyPointRow[] = line.points.map((point) => {
    const limit = chargeLimitAt({ pointId: point.id, lineId: line.id, areaId: area.id }, input.rules);
    const series = point.fieldMeter ? (input.minuteCharge.get(point.fieldMeter.id) ?? []) : [];
    const over = timeOverLimit(series, { kind: "magnitude_above", limit: limit?.value ?? Number.POSITIVE_INFINITY }, span, MINUTE_HOLD_MS);
    const worst = worstReading(series, span);
    const charge = hourMap(input.hourly, point.fieldMeter?.id, "charge_kv", CHARGE_FIT_MEASURE.key);
    const rhPairs: Pair[] = [];
    const speedPairs: Pair[] = [];
    for (const [hourTs, kv] of [...charge.entries()].sort((a, b) => a[0] - b[0])) {
      if (!inWeek(hourTs) || !ran(hourTs)) continue;
      hoursSeen.add(hourTs);
      const y = kv; // RMS: already the size of the charge, never negative
      const x = rh.get(hourTs);
      if (x !== undefined) rhPairs.push([x, y]);
      const v = speed.get(hourTs);
      if (v !== undefined) speedPairs.push([v, y]);
    }
    let code: PointState = "normal";
    if (over.coveredMs === 0) code = "silent";
    else if (over.overMs > 0) code = "over";
    return {
      pointId: point.id,
      name: point.name,
      position: point.position,
      limitKv: limit?.value ?? null,
      overMs: over.overMs,
      coveredMs: over.coveredMs,
      excursions: over.excursions.length,
      worst,
      alerts: alerts.filter((a) => a.pointId === point.id).length,
      code,
      rh: { fit: fitLeastSquares(rhPairs), n: rhPairs.length, plot: thinPairs(rhPairs, MAX_PLOT_POINTS) },
      speed: { fit: fitLeastSquares(speedPairs), n: speedPairs.length, plot: thinPairs(speedPairs, MAX_PLOT_POINTS) },
    };
  });

  // --- hall ---------------------------------------------------------------------------------
  const rhLimit = rhLowLimitAt({ areaId: area.id }, input.rules);
  const band = timeOverLimit(input.minuteRhMin, { kind: "below", limit: area.rhMinPct }, span, MINUTE_HOLD_MS);
  const belowLimit = rhLimit ? timeOverLimit(input.minuteRhMin, { kind: "below", limit: rhLimit.value }, span, MINUTE_HOLD_MS).overMs : 0;

  // --- alerts -------------------------------------------------------------------------------
  const count = <K extends string>(keys: K[]) => {
    const m = new Map<K, number>();
    for (const k of keys) m.set(k, (m.get(k) ?? 0) + 1);
    return m;
  };
  const byKind = [...count(alerts.map((a) => a.kind)).entries()]
    .map(([kind, n]) => ({ kind, words: RULE_KIND_WORDS[kind] ?? kind, count: n }))
    .sort((a, b) => b.count - a.count || a.kind.localeCompare(b.kind));
  const severityOrder = ["high", "medium", "low"];
  const bySeverity = [...count(alerts.map((a) => a.severity)).entries()]
    .map(([severity, n]) => ({ severity, count: n }))
    .sort((a, b) => severityOrder.indexOf(a.severity) - severityOrder.indexOf(b.severity));
  const rules = new Map<number, { ruleId: number; ruleName: string; kind: string; count: number; chattering: number; activeMs: number }>();
  for (const a of alerts) {
    const r = rules.get(a.ruleId) ?? { ruleId: a.ruleId, ruleName: a.ruleName ?? `Rule ${a.ruleId}`, kind: a.kind, count: 0, chattering: 0, activeMs: 0 };
    r.count += 1;
    if (a.chattering) r.chattering += 1;
    r.activeMs += Math.max(0, Math.min(a.endTs ?? span.endTs, window.endTs) - a.startTs);
    rules.set(a.ruleId, r);
  }
  const noisiestRules = [...rules.values()].sort((a, b) => b.count - a.count || b.activeMs - a.activeMs || a.ruleId - b.ruleId).slice(0, 5);

  return {
    kind: "weekly",
    plantName: input.plantName,
    window,
    generatedTs: input.generatedTs,
    line: { id: line.id, name: line.name, solventName: line.solventName },
    hall: {
      id: area.id,
      name: area.name,
      rhMinPct: area.rhMinPct,
      limitPct: rhLimit?.value ?? null,
      lowest: lowestReading(input.minuteRhMin, span),
      belowBandMs: band.overMs,
      belowLimitMs: belowLimit,
      coveredMs: band.coveredMs,
      alerts: alerts.filter((a) => a.lineId === null && a.pointId === null).length,
    },
    runningHours: hoursSeen.size,
    points,
    alerts: {
      total: alerts.length,
      chattering: alerts.filter((a) => a.chattering).length,
      byKind,
      bySeverity,
      noisiestRules,
    },
  };
}
