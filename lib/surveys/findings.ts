/**
 * The findings that close a survey: points over their charge limit, a neutralizer whose
 * reduction is low, and charge building up between two points along the web path.
 * Pure, no I/O. Readings are judged by their flat-surface equivalent at the calibrated distance.
 */
import { reductionPct } from "./judge";

/**
 * A neutralizer removing less than half of the charge reaching it is doing too little. The same
 * 50 % as the default "neutralizer losing effect" rule (db/seed.ts, lib/rules/defaults.ts);
 * common practice for a working bar is 80–95 % (from memory).
 */
export const LOW_REDUCTION_PCT = 50;

/**
 * Charge "builds" between two neighbouring points when the magnitude grows by at least this much
 * (kV) and by at least half (common practice, from memory: a rise under a few kV is within the
 * scatter of handheld readings on a moving web).
 */
export const BUILD_MIN_RISE_KV = 3;
export const BUILD_MIN_RISE_SHARE = 0.5;

export const FINDING_KINDS = ["over_limit", "low_reduction", "charge_build"] as const;
export type FindingKind = (typeof FINDING_KINDS)[number];

export const FINDING_LABELS: Record<FindingKind, string> = {
  over_limit: "Over limit",
  low_reduction: "Low reduction",
  charge_build: "Charge building",
};

export type FindingInputSpot = {
  key: string;
  name: string;
  /** label of the neutralizer just upstream of this spot (the reading before it is the previous spot) */
  afterNeutralizer: string | null;
  /** the plant's charge limit at this spot, kV (magnitude); null when none applies */
  limitKv: number | null;
  /** flat-surface equivalent at the calibrated distance, kV, signed; null when not measured */
  equivalentKv: number | null;
};

export type Finding = {
  kind: FindingKind;
  spotKey: string;
  /** for reduction and build-up: the spot upstream */
  fromSpotKey: string | null;
  valueKv: number;
  limitKv: number | null;
  reductionPct: number | null;
  text: string;
};

const kv = (v: number) => `${v > 0 ? "+" : v < 0 ? "−" : ""}${Math.abs(v).toFixed(1)} kV`;

/** Findings of one survey, spots in web-path order. Unmeasured spots are skipped. */
export function surveyFindings(spots: readonly FindingInputSpot[]): Finding[] {
  const out: Finding[] = [];
  for (let i = 0; i < spots.length; i++) {
    const s = spots[i];
    if (s.equivalentKv === null) continue;
    if (s.limitKv !== null && Math.abs(s.equivalentKv) > s.limitKv) {
      out.push({
        kind: "over_limit",
        spotKey: s.key,
        fromSpotKey: null,
        valueKv: s.equivalentKv,
        limitKv: s.limitKv,
        reductionPct: null,
        text: `${s.name}: ${kv(s.equivalentKv)} is over the ${s.limitKv.toFixed(1)} kV limit.`,
      });
    }
    const prev = i > 0 ? spots[i - 1] : null;
    if (!prev || prev.equivalentKv === null) continue;
    if (s.afterNeutralizer) {
      const r = reductionPct(prev.equivalentKv, s.equivalentKv);
      if (r !== null && r < LOW_REDUCTION_PCT) {
        out.push({
          kind: "low_reduction",
          spotKey: s.key,
          fromSpotKey: prev.key,
          valueKv: s.equivalentKv,
          limitKv: null,
          reductionPct: r,
          text: `${s.afterNeutralizer}: ${Math.round(r)} % reduction (${kv(prev.equivalentKv)} at ${prev.name} → ${kv(s.equivalentKv)} at ${s.name}), under ${LOW_REDUCTION_PCT} %.`,
        });
      }
      continue;
    }
    const rise = Math.abs(s.equivalentKv) - Math.abs(prev.equivalentKv);
    if (rise >= BUILD_MIN_RISE_KV && rise >= BUILD_MIN_RISE_SHARE * Math.abs(prev.equivalentKv)) {
      out.push({
        kind: "charge_build",
        spotKey: s.key,
        fromSpotKey: prev.key,
        valueKv: s.equivalentKv,
        limitKv: null,
        reductionPct: null,
        text: `Charge builds from ${prev.name} (${kv(prev.equivalentKv)}) to ${s.name} (${kv(s.equivalentKv)}), up ${rise.toFixed(1)} kV.`,
      });
    }
  }
  return out;
}
