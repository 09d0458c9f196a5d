// The alerts of backfilled history (simulators/backfill-alerts.ts) and what the demo people did
// about them (simulators/backfill-responses.ts): one alert per excursion that goes up a band and
// down again, an alert open when the history ends is cleared there, acknowledgements within
// minutes, notes by day, one shelving, the last hours left for the current shift.
import { describe, expect, it } from "vitest";
import { createAlertHistoryPlayer, HISTORY_END_REASON, HISTORY_TICK_MS, type HistoryAlert } from "../../../simulators/backfill-alerts";
import { createResponsePlayer, UNANSWERED_MS } from "../../../simulators/backfill-responses";
import type { Reading, RuleDefinitionInput, Topology } from "../../../lib/rules/types";

const T0 = Date.UTC(2026, 0, 12, 9, 0);
const MIN = 60_000;
const HOUR = 60 * MIN;

const topology: Topology = {
  areas: [{ areaId: 1, name: "Hall", climateSensorKey: null }],
  lines: [{ lineId: 1, areaId: 1, name: "Line", pointIds: [1], runningSensorKey: "sg-1", speedSensorKey: "sg-1" }],
  points: [{ pointId: 1, name: "Unwind", fieldMeterSensorKey: "fm-1" }],
  neutralizers: [],
};
// the demo's two charge limits (lib/rules/defaults.ts: 12 kV medium, 20 kV high)
const rules: RuleDefinitionInput[] = [
  { id: 1, version: 1, kind: "charge_high", severity: "medium", scope: {}, onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 12, clearKv: 10 } },
  { id: 2, version: 1, kind: "charge_high", severity: "high", scope: {}, onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 20, clearKv: 17 } },
];

/** Every 5 s: the line running, and the meter reading chargeAt(t). */
function play(chargeAt: (tMs: number) => number, fromMs: number, toMs: number): Reading[] {
  const out: Reading[] = [];
  for (let t = fromMs; t < toMs; t += 5000) {
    out.push({ sensorKey: "sg-1", channel: "running", ts: t, value: 1 });
    out.push({ sensorKey: "sg-1", channel: "speed_mpm", ts: t, value: 200 });
    out.push({ sensorKey: "fm-1", channel: "charge_kv", ts: t, value: chargeAt(t) });
  }
  return out;
}

describe("alerts of backfilled history", () => {
  it("one excursion past both limits is one alert: raised, worse, up a band, down a band, cleared, in order", () => {
    const player = createAlertHistoryPlayer({ rules, topology, fromMs: T0 });
    // 4 kV, then 15 kV from +10 min, 25 kV from +15 min, 15 kV from +20 min, 4 kV from +25 min
    const kv = (t: number) => (t < T0 + 10 * MIN ? 4 : t < T0 + 15 * MIN ? 15 : t < T0 + 20 * MIN ? 25 : t < T0 + 25 * MIN ? 15 : 4);
    player.push(play(kv, T0, T0 + 40 * MIN));
    player.advanceTo(T0 + 40 * MIN);
    const done = player.drainCleared();
    expect(done).toHaveLength(1);
    const a = done[0];
    expect(a.subjectKey).toBe("point:1");
    // raised after the 10 s on-delay at 15 kV
    expect(a.startTs).toBe(T0 + 10 * MIN + 10_000);
    // at 25 kV the peak is clearly worse (lib/alerts/condition-merge.ts: a quarter more), then
    // after the on-delay the 20 kV rule takes it up a band; one step down, then clear
    expect(a.events.map((e) => e.kind)).toEqual(["raised", "worsened", "worsened", "eased", "cleared"]);
    expect(a.events.slice(1, 4).map((e) => e.comment)).toEqual(["Peak 25 kV", "Severity medium → high", "Severity high → medium"]);
    expect(a.severity).toBe("medium");
    expect(a.worsenedTs).toBe(T0 + 15 * MIN + 10_000);
    expect(a.peakValue).toBe(25);
    // cleared 30 s (the off-delay) after the charge fell under 10 kV
    expect(a.endTs).toBe(T0 + 25 * MIN + 30_000);
    expect(a.state).toBe("cleared_unacked");
    const times = a.events.map((e) => e.ts);
    expect(times).toEqual([...times].sort((x, y) => x - y));
  });

  it("an alert still open when the history ends is cleared there, saying why", () => {
    const player = createAlertHistoryPlayer({ rules, topology, fromMs: T0 });
    player.push(play((t) => (t < T0 + 5 * MIN ? 4 : 14), T0, T0 + 20 * MIN));
    expect(player.drainCleared()).toEqual([]);
    const [a] = player.finish(T0 + 20 * MIN);
    expect(a.endTs).toBe(T0 + 20 * MIN);
    expect(a.events.at(-1)).toMatchObject({ kind: "cleared", comment: HISTORY_END_REASON });
    expect(a.message).toMatch(/kV/); // the alert keeps what it was about
    expect(player.readings).toBe(3 * (20 * MIN / 5000));
  });

  it("ticks in reading time: a meter that stops sending is silent without further readings", () => {
    const silentRule: RuleDefinitionInput = { id: 6, version: 1, kind: "sensor_silent", severity: "medium", scope: {}, onDelayS: 0, offDelayS: 60, onlyWhileRunning: false, params: { silentS: 120 } };
    const player = createAlertHistoryPlayer({ rules: [silentRule], topology, fromMs: T0 });
    player.push(play(() => 4, T0, T0 + 5 * MIN));
    player.advanceTo(T0 + 10 * MIN);
    const [a] = player.finish(T0 + 10 * MIN);
    expect(a.kind).toBe("sensor_silent");
    // last reading at +5 min − 5 s; silent 120 s later, seen at the next tick
    expect(a.startTs - (T0 + 5 * MIN - 5000)).toBeGreaterThanOrEqual(120_000);
    expect(a.startTs - (T0 + 5 * MIN - 5000)).toBeLessThanOrEqual(120_000 + HISTORY_TICK_MS);
  });
});

function cleared(startTs: number, minutes: number, over: Partial<HistoryAlert> = {}): HistoryAlert {
  return {
    ruleId: 1,
    ruleVersion: 1,
    kind: "charge_high",
    severity: "medium",
    subjectKey: `point:${startTs % 97}`,
    startTs,
    endTs: startTs + minutes * MIN,
    closedTs: null,
    state: "cleared_unacked",
    message: "m",
    peakValue: 14,
    unit: "kV",
    chattering: false,
    expectedCrossingTs: null,
    worsenedTs: null,
    ackedBy: null,
    ackedTs: null,
    events: [
      { ts: startTs, kind: "raised", by: null, comment: null, value: "14" },
      { ts: startTs + minutes * MIN, kind: "cleared", by: null, comment: "back", value: null },
    ],
    ...over,
  };
}

describe("answers of the demo people", () => {
  const end = Date.UTC(2026, 0, 20, 15, 0);

  it("the lead acknowledges by day, on call by night, within 2–12 minutes; the alert is closed", () => {
    const r = createResponsePlayer(end);
    const day = cleared(Date.UTC(2026, 0, 14, 10, 0), 30);
    const night = cleared(Date.UTC(2026, 0, 14, 2, 0), 1);
    r.respond(day);
    r.respond(night);
    expect(day.ackedBy).toBe("lead");
    expect(night.ackedBy).toBe("oncall");
    for (const a of [day, night]) {
      expect(a.state).toBe("closed");
      expect(a.ackedTs! - a.startTs).toBeGreaterThanOrEqual(2 * MIN);
      expect(a.ackedTs! - a.startTs).toBeLessThanOrEqual(12 * MIN);
      const times = a.events.map((e) => e.ts);
      expect(times).toEqual([...times].sort((x, y) => x - y));
    }
    // acknowledged while active: closed when it cleared
    expect(day.closedTs).toBe(day.endTs);
    // cleared after a minute, before anyone got to it: the acknowledgement closes it
    expect(night.closedTs).toBe(night.ackedTs);
    expect(night.events.map((e) => e.kind)).toEqual(["raised", "cleared", "acknowledged", "closed"]);
  });

  it("leaves the current shift's alerts unanswered", () => {
    const r = createResponsePlayer(end);
    const recent = cleared(end - UNANSWERED_MS + MIN, 20);
    r.respond(recent);
    expect(recent.state).toBe("cleared_unacked");
    expect(recent.ackedBy).toBeNull();
  });

  it("notes are few, by the engineer, in the day; one known fouled bar is shelved for a while", () => {
    const r = createResponsePlayer(end);
    const list = [0, 1, 2, 3].map((d) => cleared(Date.UTC(2026, 0, 13 + d, 23, 30), 40));
    for (const a of list) r.respond(a);
    const notes = list.flatMap((a) => a.events.filter((e) => e.kind === "commented"));
    expect(notes).toHaveLength(2); // two per kind at most
    for (const n of notes) {
      expect(n.by).toBe("engineer");
      const h = new Date(n.ts).getUTCHours();
      expect(h >= 6 && h < 22).toBe(true);
    }
    const fouled = [0, 1].map((d) => cleared(Date.UTC(2026, 0, 16 + d, 10, 0), 20 * 60, { kind: "effect_loss" }));
    for (const a of fouled) r.respond(a);
    const shelvings = fouled.flatMap((a) => a.events.filter((e) => e.kind === "shelved"));
    expect(shelvings).toHaveLength(1);
    const until = Number(shelvings[0].value);
    expect(until).toBe(shelvings[0].ts - MIN + 4 * HOUR);
    expect(fouled[0].events.find((e) => e.kind === "unshelved")?.ts).toBe(until);
  });
});
