// Alert-load figures against the published benchmarks of alarm management (EEMUA 191 /
// ISA-18.2): alerts per 10 minutes, floods, chattering, standing alerts, the noisiest rules.
// Pure; db/queries/alert-load.ts reads the rows.
import { DAY_MS, HOUR_MS, MINUTE_MS, type AlertState, type RuleKind, type Severity } from "./vocabulary";

export type LoadAlert = { id: number; ruleId: number; ruleName: string | null; kind: RuleKind; severity: Severity; subjectKey: string; startTs: number; endTs: number | null; closedTs: number | null; chattering: boolean; state: AlertState };

export const TEN_MIN_MS = 10 * MINUTE_MS;
/** More than this many alerts in 10 minutes is a flood (EEMUA 191 / ISA-18.2: "more than 10 alarms in 10 minutes"). */
export const FLOOD_PER_10_MIN = 10;
/** EEMUA 191 / ISA-18.2 average alarm rate per 10 minutes: about 1 "very likely acceptable", 2 "manageable". */
export const BENCHMARK_ACCEPTABLE_PER_10_MIN = 1;
export const BENCHMARK_MANAGEABLE_PER_10_MIN = 2;
/** ISA-18.2 target: under 1 % of the time in flood. */
export const BENCHMARK_FLOOD_TIME_FRACTION = 0.01;
/** Standing (stale) alerts: active for more than 24 hours (ISA-18.2 "stale alarm", from memory). */
export const STANDING_MS = 24 * HOUR_MS;

export type AlertLoad = {
  fromTs: number;
  toTs: number;
  total: number;
  /** alerts raised in each 10-minute bucket from fromTs */
  per10Min: number[];
  perDay: Array<{ dayTs: number; count: number }>;
  averagePer10Min: number;
  peakPer10Min: number;
  floodBuckets: number;
  floodTimeFraction: number;
  floods: Array<{ startTs: number; endTs: number; count: number }>;
  chatteringCount: number;
  chatteringRules: Array<{ ruleId: number; ruleName: string | null; subjectKey: string; count: number }>;
  standing: Array<{ id: number; ruleName: string | null; kind: RuleKind; subjectKey: string; startTs: number; hours: number }>;
  noisiest: Array<{ ruleId: number; ruleName: string | null; kind: RuleKind; count: number; share: number }>;
  verdict: "acceptable" | "manageable" | "demanding" | "overloaded";
};

/**
 * Pure: the alert-load figures over [fromTs, toTs) from the alerts raised in it (and those
 * standing at `nowMs`). Day buckets start at fromTs (plant days are the caller's concern).
 */
export function computeAlertLoad(raised: readonly LoadAlert[], standingNow: readonly LoadAlert[], fromTs: number, toTs: number, nowMs: number): AlertLoad {
  const spanMs = Math.max(TEN_MIN_MS, toTs - fromTs);
  const nBuckets = Math.ceil(spanMs / TEN_MIN_MS);
  const per10Min = new Array<number>(nBuckets).fill(0);
  const nDays = Math.ceil(spanMs / DAY_MS);
  const perDayCounts = new Array<number>(nDays).fill(0);
  const byRule = new Map<number, { ruleId: number; ruleName: string | null; kind: RuleKind; count: number }>();
  const chatter = new Map<string, { ruleId: number; ruleName: string | null; subjectKey: string; count: number }>();
  let total = 0;
  let chatteringCount = 0;
  for (const a of raised) {
    if (a.startTs < fromTs || a.startTs >= toTs) continue;
    total++;
    per10Min[Math.floor((a.startTs - fromTs) / TEN_MIN_MS)]++;
    perDayCounts[Math.floor((a.startTs - fromTs) / DAY_MS)]++;
    const r = byRule.get(a.ruleId) ?? { ruleId: a.ruleId, ruleName: a.ruleName, kind: a.kind, count: 0 };
    r.count++;
    byRule.set(a.ruleId, r);
    if (a.chattering) {
      chatteringCount++;
      const key = `${a.ruleId}|${a.subjectKey}`;
      const c = chatter.get(key) ?? { ruleId: a.ruleId, ruleName: a.ruleName, subjectKey: a.subjectKey, count: 0 };
      c.count++;
      chatter.set(key, c);
    }
  }
  const floods: AlertLoad["floods"] = [];
  let floodBuckets = 0;
  per10Min.forEach((count, i) => {
    if (count <= FLOOD_PER_10_MIN) return;
    floodBuckets++;
    const startTs = fromTs + i * TEN_MIN_MS;
    const last = floods[floods.length - 1];
    if (last && last.endTs === startTs) {
      last.endTs = startTs + TEN_MIN_MS;
      last.count += count;
    } else floods.push({ startTs, endTs: startTs + TEN_MIN_MS, count });
  });
  const averagePer10Min = total / nBuckets;
  const floodTimeFraction = floodBuckets / nBuckets;
  const noisiest = [...byRule.values()]
    .sort((a, b) => b.count - a.count || a.ruleId - b.ruleId)
    .slice(0, 10)
    .map((r) => ({ ...r, share: total ? r.count / total : 0 }));
  const standing = standingNow
    .filter((a) => nowMs - a.startTs > STANDING_MS)
    .map((a) => ({ id: a.id, ruleName: a.ruleName, kind: a.kind, subjectKey: a.subjectKey, startTs: a.startTs, hours: (nowMs - a.startTs) / HOUR_MS }));
  const verdict: AlertLoad["verdict"] =
    floodTimeFraction >= BENCHMARK_FLOOD_TIME_FRACTION && averagePer10Min > BENCHMARK_MANAGEABLE_PER_10_MIN
      ? "overloaded"
      : averagePer10Min <= BENCHMARK_ACCEPTABLE_PER_10_MIN
        ? "acceptable"
        : averagePer10Min <= BENCHMARK_MANAGEABLE_PER_10_MIN
          ? "manageable"
          : "demanding";
  return {
    fromTs,
    toTs,
    total,
    per10Min,
    perDay: perDayCounts.map((count, i) => ({ dayTs: fromTs + i * DAY_MS, count })),
    averagePer10Min,
    peakPer10Min: per10Min.reduce((m, x) => Math.max(m, x), 0),
    floodBuckets,
    floodTimeFraction,
    floods,
    chatteringCount,
    chatteringRules: [...chatter.values()].sort((a, b) => b.count - a.count).slice(0, 10),
    standing,
    noisiest,
    verdict,
  };
}

