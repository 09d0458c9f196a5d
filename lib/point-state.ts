// The state of a measured value against its limit, as the Floor, the line page and the
// wallboard show it: normal, near (limit), over (limit), silent (no data), shelved.
// Pure and synchronous so every screen judges a value the same way.
//
// "Near" is Stillfield's own early-warning band, chosen as common practice for operator
// displays rather than taken from a standard: a value is near when its ratio to the limit
// reaches 80 % —
//   high limit L (charge magnitude): |v| ≥ 0.8·L            (12 kV limit → near from 9.6 kV)
//   low limit L (relative humidity):  L / v ≥ 0.8, i.e. v ≤ L / 0.8   (30 % limit → near below 37.5 %)
// and over when it passes the limit itself (|v| > L, v < L). This is a display state only; the
// alerts (with on-delays and deadbands, lib/rules) decide what is raised. The state codes
// themselves (words, symbols, rank, worstState) are in lib/vocabulary/point-states.ts.

import type { PointState } from "./vocabulary";

export const NEAR_FRACTION = 0.8;

/** Silent when the newest reading is older than this (matches the sensor_silent rule default). */
export const DEFAULT_SILENT_AFTER_MS = 120_000;

export type Limit = { direction: "high"; limit: number } | { direction: "low"; limit: number };

export type PointStateInput = {
  /** newest value, or null when there is none */
  value: number | null;
  /** time of the newest value (epoch ms), or null */
  lastTs: number | null;
  nowMs: number;
  limit: Limit | null;
  /** an alert on this point is shelved right now */
  shelved?: boolean;
  silentAfterMs?: number;
  nearFraction?: number;
};

export function limitRatio(value: number, limit: Limit): number {
  if (limit.direction === "high") return limit.limit > 0 ? Math.abs(value) / limit.limit : Number.POSITIVE_INFINITY;
  if (value <= 0) return Number.POSITIVE_INFINITY;
  return limit.limit / value;
}

export function valueState(value: number, limit: Limit | null, nearFraction = NEAR_FRACTION): "normal" | "near" | "over" {
  if (!limit || !Number.isFinite(value)) return "normal";
  const over = limit.direction === "high" ? Math.abs(value) > limit.limit : value < limit.limit;
  if (over) return "over";
  // a hair of tolerance: 9.6 / 12 is 0.7999… in binary floating point
  return limitRatio(value, limit) >= nearFraction - 1e-9 ? "near" : "normal";
}

export function pointState(input: PointStateInput): PointState {
  if (input.shelved) return "shelved";
  const silentAfter = input.silentAfterMs ?? DEFAULT_SILENT_AFTER_MS;
  if (input.value === null || input.lastTs === null || input.nowMs - input.lastTs > silentAfter) return "silent";
  return valueState(input.value, input.limit, input.nearFraction);
}
