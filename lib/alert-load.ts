// Alert-load figures against the published benchmarks of alarm management (EEMUA Publication
// 191, 3rd edition, 2013; ANSI/ISA-18.2-2016): alerts per 10 minutes, per hour and per day,
// floods in sliding 10-minute windows, chattering, standing alerts, and the noisiest alerts
// (rule + subject). Pure; db/queries/alert-load.ts reads the rows.
//
// The published figures are per operator position; Stillfield counts the whole plant, so on a
// plant with several positions the same figures are stricter than the benchmark (the page says so).
import { DAY_MS, HOUR_MS, MINUTE_MS, type AlertState, type RuleKind, type Severity } from "./vocabulary";

export type LoadAlert = { id: number; ruleId: number; ruleName: string | null; kind: RuleKind; severity: Severity; subjectKey: string; startTs: number; endTs: number | null; closedTs: number | null; chattering: boolean; state: AlertState };

export const TEN_MIN_MS = 10 * MINUTE_MS;
/** More than this many alerts in any 10 minutes is a flood (EEMUA 191 / ISA-18.2: "more than 10 alarms in 10 minutes"). */
export const FLOOD_PER_10_MIN = 10;
/** ISA-18.2-2016 / EEMUA 191 average alarm rate per 10 minutes: about 1 "very likely acceptable", about 2 "maximum manageable". */
export const BENCHMARK_ACCEPTABLE_PER_10_MIN = 1;
export const BENCHMARK_MANAGEABLE_PER_10_MIN = 2;
/** The same per hour (about 6 and 12) and per day (about 150 and 300), ISA-18.2-2016 (from memory). */
export const BENCHMARK_ACCEPTABLE_PER_HOUR = 6;
export const BENCHMARK_MANAGEABLE_PER_HOUR = 12;
export const BENCHMARK_ACCEPTABLE_PER_DAY = 150;
export const BENCHMARK_MANAGEABLE_PER_DAY = 300;
/** ISA-18.2-2016 target: in flood under about 1 % of the time. */
export const BENCHMARK_FLOOD_TIME_FRACTION = 0.01;
/** Standing (stale) alerts: active for more than 24 hours (ISA-18.2 "stale alarm", from memory). */
export const STANDING_MS = 24 * HOUR_MS;
/**
 * Chattering: the same alert (rule + subject) raised this many times within CHATTER_SPAN_MS,
 * counted from raise times only, whatever the rule's on- and off-delays (common practice, a
 * repeat count in the spirit of ISA-TR18.2.5's chattering alarms; the 3-in-10-minutes figure
 * is a plant setting, from memory).
 */
export const CHATTER_RAISES = 3;
export const CHATTER_SPAN_MS = 10 * MINUTE_MS;

export type Flood = { startTs: number; endTs: number; count: number };

/**
 * Floods from raise times: whenever any 10-minute window holds more than FLOOD_PER_10_MIN raises.
 * The flood starts at the raise that makes the window overfull and lasts until enough of the
 * window's raises are more than 10 minutes old; overlapping spells are one flood. `count` is
 * the raises within the flood's time.
 */
export function findFloods(sortedTs: readonly number[], windowMs = TEN_MIN_MS, moreThan = FLOOD_PER_10_MIN): Flood[] {
  const floods: Flood[] = [];
  for (let j = moreThan; j < sortedTs.length; j++) {
    const first = sortedTs[j - moreThan];
    if (sortedTs[j] - first >= windowMs) continue;
    const startTs = sortedTs[j];
    const endTs = first + windowMs;
    const last = floods[floods.length - 1];
    if (last && startTs <= last.endTs) last.endTs = Math.max(last.endTs, endTs);
    else floods.push({ startTs, endTs, count: 0 });
  }
  // count the raises inside each flood, including the ones that filled its first window
  for (const f of floods) {
    const from = f.startTs - windowMs;
    f.count = sortedTs.filter((t) => t > from && t < f.endTs).length;
  }
  return floods;
}

/** Alerts (rule + subject) with at least CHATTER_RAISES raises within any CHATTER_SPAN_MS. */
export function findChattering(raised: readonly Pick<LoadAlert, "ruleId" | "subjectKey" | "startTs">[]): Map<string, number> {
  const byAlert = new Map<string, number[]>();
  for (const a of raised) {
    const key = `${a.ruleId}|${a.subjectKey}`;
    const list = byAlert.get(key) ?? [];
    list.push(a.startTs);
    byAlert.set(key, list);
  }
  const out = new Map<string, number>();
  for (const [key, list] of byAlert) {
    list.sort((a, b) => a - b);
    let chattering = false;
    for (let i = CHATTER_RAISES - 1; i < list.length && !chattering; i++) chattering = list[i] - list[i - CHATTER_RAISES + 1] <= CHATTER_SPAN_MS;
    if (chattering) out.set(key, list.length);
  }
  return out;
}

export type LoadVerdict = "acceptable" | "manageable" | "overloaded";

/**
 * Overloaded when the time in flood reaches the 1 % target OR the average is above the
 * manageable 2 per 10 minutes; else manageable above 1 per 10 minutes; else acceptable.
 */
export function judgeLoad(averagePer10Min: number, floodTimeFraction: number): LoadVerdict {
  if (floodTimeFraction >= BENCHMARK_FLOOD_TIME_FRACTION || averagePer10Min > BENCHMARK_MANAGEABLE_PER_10_MIN) return "overloaded";
  return averagePer10Min > BENCHMARK_ACCEPTABLE_PER_10_MIN ? "manageable" : "acceptable";
}

export type AlertLoad = {
  fromTs: number;
  toTs: number;
  total: number;
  /** alerts raised in each 10-minute bucket from fromTs (for the chart) */
  per10Min: number[];
  perHour: number[];
  perDay: Array<{ dayTs: number; count: number }>;
  averagePer10Min: number;
  peakPer10Min: number;
  averagePerHour: number;
  peakPerHour: number;
  averagePerDay: number;
  peakPerDay: number;
  floodTimeFraction: number;
  floods: Flood[];
  chatteringCount: number;
  chatteringRules: Array<{ ruleId: number; ruleName: string | null; subjectKey: string; count: number }>;
  standing: Array<{ id: number; ruleName: string | null; kind: RuleKind; subjectKey: string; startTs: number; hours: number }>;
  /** the ten alerts (rule + subject) raised most often */
  noisiest: Array<{ ruleId: number; ruleName: string | null; kind: RuleKind; subjectKey: string; count: number; share: number }>;
  verdict: LoadVerdict;
};

function buckets(list: readonly LoadAlert[], fromTs: number, n: number, sizeMs: number): number[] {
  const out = new Array<number>(n).fill(0);
  for (const a of list) out[Math.floor((a.startTs - fromTs) / sizeMs)]++;
  return out;
}

/**
 * Pure: the alert-load figures over [fromTs, toTs) from the alerts raised in it (and those
 * standing at `nowMs`). Hour and day buckets start at fromTs (plant days are the caller's concern).
 */
export function computeAlertLoad(raised: readonly LoadAlert[], standingNow: readonly LoadAlert[], fromTs: number, toTs: number, nowMs: number): AlertLoad {
  const spanMs = Math.max(TEN_MIN_MS, toTs - fromTs);
  const inSpan = raised.filter((a) => a.startTs >= fromTs && a.startTs < toTs).sort((a, b) => a.startTs - b.startTs);
  const total = inSpan.length;
  const per10Min = buckets(inSpan, fromTs, Math.ceil(spanMs / TEN_MIN_MS), TEN_MIN_MS);
  const perHour = buckets(inSpan, fromTs, Math.ceil(spanMs / HOUR_MS), HOUR_MS);
  const perDayCounts = buckets(inSpan, fromTs, Math.ceil(spanMs / DAY_MS), DAY_MS);

  const floods = findFloods(inSpan.map((a) => a.startTs)).map((f) => ({ ...f, endTs: Math.min(f.endTs, toTs) }));
  const floodMs = floods.reduce((sum, f) => sum + (f.endTs - f.startTs), 0);
  const floodTimeFraction = floodMs / spanMs;

  const byAlert = new Map<string, { ruleId: number; ruleName: string | null; kind: RuleKind; subjectKey: string; count: number }>();
  for (const a of inSpan) {
    const key = `${a.ruleId}|${a.subjectKey}`;
    const r = byAlert.get(key) ?? { ruleId: a.ruleId, ruleName: a.ruleName, kind: a.kind, subjectKey: a.subjectKey, count: 0 };
    r.count++;
    byAlert.set(key, r);
  }
  const chatter = findChattering(inSpan);
  const chatteringRules = [...chatter.entries()]
    .map(([key, count]) => ({ ruleId: byAlert.get(key)!.ruleId, ruleName: byAlert.get(key)!.ruleName, subjectKey: byAlert.get(key)!.subjectKey, count }))
    .sort((a, b) => b.count - a.count || a.ruleId - b.ruleId)
    .slice(0, 10);
  const noisiest = [...byAlert.values()]
    .sort((a, b) => b.count - a.count || a.ruleId - b.ruleId || (a.subjectKey < b.subjectKey ? -1 : 1))
    .slice(0, 10)
    .map((r) => ({ ...r, share: total ? r.count / total : 0 }));
  const standing = standingNow
    .filter((a) => nowMs - a.startTs > STANDING_MS)
    .map((a) => ({ id: a.id, ruleName: a.ruleName, kind: a.kind, subjectKey: a.subjectKey, startTs: a.startTs, hours: (nowMs - a.startTs) / HOUR_MS }));
  const averagePer10Min = total / per10Min.length;
  const max = (xs: number[]) => xs.reduce((m, x) => Math.max(m, x), 0);
  return {
    fromTs,
    toTs,
    total,
    per10Min,
    perHour,
    perDay: perDayCounts.map((count, i) => ({ dayTs: fromTs + i * DAY_MS, count })),
    averagePer10Min,
    peakPer10Min: max(per10Min),
    averagePerHour: total / perHour.length,
    peakPerHour: max(perHour),
    averagePerDay: total / (spanMs / DAY_MS),
    peakPerDay: max(perDayCounts),
    floodTimeFraction,
    floods,
    chatteringCount: [...chatter.values()].reduce((a, b) => a + b, 0),
    chatteringRules,
    standing,
    noisiest,
    verdict: judgeLoad(averagePer10Min, floodTimeFraction),
  };
}
