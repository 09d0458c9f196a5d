// What the demo plant's people did about the alerts of the backfilled history (invented, like
// the plant): the shift lead (or on call at night) acknowledges within minutes, the engineer
// leaves a plain note on a few, and one nuisance alert was shelved for a while. Alerts raised in
// the last UNANSWERED_MS of the history are left for the current shift. Deterministic: the same
// alert always gets the same answer. Pure: it only fills in the alert's lifecycle and events.
import type { HistoryAlert, HistoryEvent, Responder } from "./backfill-alerts";
import type { RuleKind } from "../lib/vocabulary";

const MIN = 60_000;
const HOUR = 60 * MIN;

/** Alerts raised this close to the end of the history are not answered yet. */
export const UNANSWERED_MS = 2 * HOUR;
/** Notes per kind (and on high-severity alerts) at most, so the history reads like a plant's, not a log. */
const NOTES_PER_KIND = 2;
const HIGH_NOTES = 3;

const ENGINEER_NOTES: Record<RuleKind, string> = {
  charge_high: "Walked the line: the bar ahead of this point was dirty. Cleaned it at the reel change and the charge came down.",
  charge_rate: "Charge climbed with the speed. Checked the bar and the earthing of the idlers; both fine.",
  rh_low: "Cold dry air outside. Humidifier already at full output; asked the crew to watch for film clinging at the rewind.",
  rh_forecast: "Saw this coming. Raised the humidifier set point and told the shift lead.",
  sensor_silent: "Meter cable knocked loose during the changeover. Plugged back in, reading again.",
  sensor_flat: "Line threading at crawl speed, so the meter read flat. Meter is fine.",
  effect_loss: "Bar not taking the charge off. Booked a clean and a charged-plate check for the next stop.",
};
const HIGH_NOTE = "Charge far over the limit. Slowed the line, checked the bar and its power unit; maintenance to look at the HV cable.";
const SHELVE_REASON = "Known problem, booked for the next stop; shelved until maintenance has been.";

/** FNV-1a over the alert's identity: a stable pseudo-random number per alert. */
function hashOf(a: HistoryAlert): number {
  const text = `${a.ruleId}|${a.subjectKey}|${a.startTs}`;
  let x = 2166136261;
  for (let i = 0; i < text.length; i++) {
    x ^= text.charCodeAt(i);
    x = Math.imul(x, 16777619) >>> 0;
  }
  return x;
}

const isNight = (ts: number) => {
  const h = new Date(ts).getUTCHours();
  return h >= 22 || h < 6;
};

/** The engineer works days: a note due at night is written the next morning. */
function dayTime(ts: number): number {
  if (!isNight(ts)) return ts;
  const d = new Date(ts);
  const morning = Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), 7, 40);
  return morning > ts ? morning : morning + 24 * HOUR;
}

export type ResponsePlayer = { respond(a: HistoryAlert): void };

/** Answers cleared alerts as they come (call in raise order per subject; any order works). */
export function createResponsePlayer(historyEndMs: number): ResponsePlayer {
  const notesByKind = new Map<RuleKind, number>();
  let highNotes = 0;
  let shelved = false;

  function respond(a: HistoryAlert): void {
    if (a.endTs === null) throw new Error("only cleared alerts are answered");
    if (a.startTs >= historyEndMs - UNANSWERED_MS) return; // still waiting for the current shift
    const h = hashOf(a);
    const by: Responder = isNight(a.startTs) ? "oncall" : "lead";
    const ackTs = a.startTs + (2 + (h % 11)) * MIN; // 2–12 minutes
    const extra: HistoryEvent[] = [];
    a.ackedBy = by;
    a.ackedTs = ackTs;
    extra.push({ ts: ackTs, kind: "acknowledged", by, comment: null, value: null });
    if (ackTs < a.endTs) {
      // acknowledged while active: closed when it clears
      a.closedTs = a.endTs;
      extra.push({ ts: a.endTs, kind: "closed", by: null, comment: null, value: null });
      const lastsMs = a.endTs - ackTs;
      // a nuisance, or a bar known to be fouled and waiting for its cleaning, is shelved for a while
      if (!shelved && (((a.chattering || a.kind === "sensor_flat") && lastsMs >= 45 * MIN) || (a.kind === "effect_loss" && lastsMs >= 12 * HOUR))) {
        shelved = true;
        const untilTs = Math.min(ackTs + 4 * HOUR, a.endTs - MIN);
        extra.push({ ts: ackTs + MIN, kind: "shelved", by: "lead", comment: SHELVE_REASON, value: String(untilTs) });
        extra.push({ ts: untilTs, kind: "unshelved", by: null, comment: "Shelving ran out", value: null });
      }
    } else {
      // cleared before anyone got to it: the acknowledgement closes it
      a.closedTs = ackTs;
      extra.push({ ts: ackTs, kind: "closed", by, comment: null, value: null });
    }
    a.state = "closed";

    const noteTs = dayTime(ackTs + (15 + (h % 31)) * MIN);
    const note = noteTs < historyEndMs ? noteFor(a) : null;
    if (note !== null) extra.push({ ts: noteTs, kind: "commented", by: "engineer", comment: note, value: null });
    a.events = [...a.events, ...extra].sort((x, y) => x.ts - y.ts);
  }

  function noteFor(a: HistoryAlert): string | null {
    if (a.severity === "high" && highNotes < HIGH_NOTES && (a.kind === "charge_high" || a.kind === "charge_rate")) {
      highNotes++;
      return HIGH_NOTE;
    }
    const n = notesByKind.get(a.kind) ?? 0;
    if (n >= NOTES_PER_KIND || (a.endTs ?? a.startTs) - a.startTs < 10 * MIN) return null;
    notesByKind.set(a.kind, n + 1);
    return ENGINEER_NOTES[a.kind];
  }

  return { respond };
}
