/**
 * How the round page judges a spot's reading as it is entered: the flat-surface equivalent,
 * the state against the plant's limit (the Floor's near/over bands, lib/point-state.ts), the
 * change since the last survey and the reduction across a neutralizer. Pure.
 */
import { valueState } from "../point-state";
import { distanceEquivalent, reductionPct } from "./judge";

export type SpotJudgement = {
  equivalentKv: number;
  state: "normal" | "near" | "over";
  vsLast: string | null;
  reductionPct: number | null;
};

export const fmtKv = (v: number) => `${v > 0 ? "+" : v < 0 ? "−" : ""}${Math.abs(v).toFixed(1)} kV`;

export function judgeSpot(input: {
  readKv: number;
  distanceMm: number;
  calibratedMm: number;
  limitKv: number | null;
  last: { equivalentKv: number } | null;
  afterNeutralizer: string | null;
  /** the previous spot's equivalent in this round, if measured */
  previousKv: number | null;
}): SpotJudgement {
  const eq = distanceEquivalent(input.readKv, input.distanceMm, input.calibratedMm).equivalentKv;
  const state = valueState(eq, input.limitKv !== null ? { direction: "high", limit: input.limitKv } : null);
  let vsLast: string | null = null;
  if (input.last) {
    const d = Math.abs(eq) - Math.abs(input.last.equivalentKv);
    vsLast = Math.abs(d) < 0.05 ? `same as last survey (${fmtKv(input.last.equivalentKv)})` : `${d > 0 ? "up" : "down"} ${Math.abs(d).toFixed(1)} kV on last survey (${fmtKv(input.last.equivalentKv)})`;
  }
  const red = input.afterNeutralizer && input.previousKv !== null ? reductionPct(input.previousKv, eq) : null;
  return { equivalentKv: eq, state, vsLast, reductionPct: red };
}
