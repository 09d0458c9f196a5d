// Neutralizer states: the value list (the schema's enum uses it), words, the state code each
// shows, and rank (worse first).
import type { PointState } from "./point-states";

export const NEUTRALIZER_STATES = ["in_service", "needs_cleaning", "faulty", "removed"] as const;
export type NeutralizerState = (typeof NEUTRALIZER_STATES)[number];

export const NEUTRALIZER_STATE_WORDS: Record<NeutralizerState, string> = {
  in_service: "In service",
  needs_cleaning: "Needs cleaning",
  faulty: "Faulty",
  removed: "Removed",
};

export const NEUTRALIZER_STATE_CODE: Record<NeutralizerState, PointState> = {
  in_service: "normal",
  needs_cleaning: "near",
  faulty: "over",
  removed: "silent",
};

/** Higher needs attention sooner (a removed bar needs none). */
export const NEUTRALIZER_STATE_RANK: Record<NeutralizerState, number> = { faulty: 3, needs_cleaning: 2, in_service: 1, removed: 0 };

export function isNeutralizerState(v: string): v is NeutralizerState {
  return (NEUTRALIZER_STATES as readonly string[]).includes(v);
}
