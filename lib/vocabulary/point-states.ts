// The five state codes every screen, e-mail, report and CSV shows: one word, one plain-text
// symbol and one rank each. components/ui/state-badge.tsx draws the matching shapes.
//   normal  — small hollow ring, "OK"
//   near    — upward triangle, "Near"
//   over    — filled diamond, "Over"
//   silent  — dashed circle, "Silent"
//   shelved — pause bars, "Shelved"

export const POINT_STATES = ["normal", "near", "over", "silent", "shelved"] as const;
export type PointState = (typeof POINT_STATES)[number];

export const STATE_WORDS: Record<PointState, string> = {
  normal: "OK",
  near: "Near",
  over: "Over",
  silent: "Silent",
  shelved: "Shelved",
};

/** Plain-text symbols for e-mails, CSV and print where SVG is not available. */
export const STATE_SYMBOLS: Record<PointState, string> = {
  normal: "○",
  near: "▲",
  over: "◆",
  silent: "◌",
  shelved: "‖",
};

/** Worst first: what a summary of several states shows. */
export const STATE_RANK: Record<PointState, number> = { over: 4, near: 3, silent: 2, shelved: 1, normal: 0 };

/** "◆ Over" — the plain-text code for e-mails. */
export function stateCodeText(code: PointState): string {
  return `${STATE_SYMBOLS[code]} ${STATE_WORDS[code]}`;
}

/** The worst of several states (normal for none). */
export function worstState(states: readonly PointState[]): PointState {
  let worst: PointState = "normal";
  for (const s of states) if (STATE_RANK[s] > STATE_RANK[worst]) worst = s;
  return worst;
}
