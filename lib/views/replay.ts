// View types of a rule replay (db/use-cases/replay-rule-proposal.ts computes it; the limits
// editor draws it).
import type { Severity } from "../vocabulary";

export type ReplayEpisode = { ruleId: number; severity: Severity; subjectKey: string; where: string; raisedTs: number; clearedTs: number | null; durationMs: number | null; peakValue: number; chattering: boolean; edited: boolean };
export type ReplaySide = { count: number; totalDurationMs: number; stillActive: number; chattering: number; episodes: ReplayEpisode[] };
export type ReplayResult = {
  fromTs: number;
  toTs: number;
  source: "raw" | "1m";
  readings: number;
  sensors: string[];
  elapsedMs: number;
  editedRuleId: number;
  current: ReplaySide;
  proposed: ReplaySide;
  /** alerts of this kind the live engine stored in the span, within the scope */
  stored: number;
};
