/**
 * Turns a list of transitions (from replay() or from stored alerts) into episodes: one per
 * raised alert, with when it cleared and its final peak. The limits editor counts these to
 * compare proposed rules with current ones ("how many, when, for how long").
 */
import type { AlertTransition, RuleKind, Severity } from "./types";

export type AlertEpisode = {
  ruleId: number;
  ruleVersion: number;
  subjectKey: string;
  kind: RuleKind;
  severity: Severity;
  raisedTs: number;
  /** null: still active at the end of the transitions given. */
  clearedTs: number | null;
  durationMs: number | null;
  peakValue: number;
  chattering: boolean;
};

export function collectAlertEpisodes(transitions: readonly AlertTransition[]): AlertEpisode[] {
  const open = new Map<string, AlertEpisode>();
  const episodes: AlertEpisode[] = [];
  for (const t of transitions) {
    const key = `${t.ruleId}|${t.subjectKey}|${t.raisedTs}`;
    if (t.type === "raise") {
      const episode: AlertEpisode = {
        ruleId: t.ruleId,
        ruleVersion: t.ruleVersion,
        subjectKey: t.subjectKey,
        kind: t.kind,
        severity: t.severity,
        raisedTs: t.raisedTs,
        clearedTs: null,
        durationMs: null,
        peakValue: t.peakValue,
        chattering: t.chattering,
      };
      open.set(key, episode);
      episodes.push(episode);
      continue;
    }
    const episode = open.get(key);
    if (episode === undefined) continue; // raised before these transitions began
    episode.peakValue = t.peakValue;
    if (t.type === "clear") {
      episode.clearedTs = t.ts;
      episode.durationMs = t.ts - episode.raisedTs;
      open.delete(key);
    }
  }
  return episodes.sort((a, b) => a.raisedTs - b.raisedTs);
}
