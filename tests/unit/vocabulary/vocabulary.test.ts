// The one vocabulary (lib/vocabulary): where two copies used to disagree, the meaning kept.
import { describe, expect, it } from "vitest";
import {
  ALERT_STATES,
  DAY_MS,
  HOUR_MS,
  MINUTE_MS,
  NEUTRALIZER_STATE_CODE,
  NEUTRALIZER_STATES,
  RULE_KIND_STATE,
  RULE_KINDS,
  SEVERITIES,
  SEVERITY_RANK,
  STATE_RANK,
  alertStateCode,
  alertStateCodeAt,
  formatDuration,
  worstState,
} from "@/lib/vocabulary";
import { alerts, rules } from "@/db/schema/alerts";
import { neutralizers } from "@/db/schema/plant";

describe("formatDuration", () => {
  it("keeps the seconds up to 10 minutes", () => {
    // 150 s is two minutes and thirty seconds (arithmetic); the old alert-list copy said "3 min"
    expect(formatDuration(150_000)).toBe("2 min 30 s");
    expect(formatDuration(45_000)).toBe("45 s");
    expect(formatDuration(119_000)).toBe("119 s");
    expect(formatDuration(120_000)).toBe("2 min");
    expect(formatDuration(341_000)).toBe("5 min 41 s");
  });
  it("whole minutes to 2 h, hours and minutes to 2 days, then days and hours", () => {
    expect(formatDuration(12 * MINUTE_MS)).toBe("12 min");
    expect(formatDuration(119 * MINUTE_MS)).toBe("119 min");
    expect(formatDuration(2 * HOUR_MS + 5 * MINUTE_MS)).toBe("2 h 5 min");
    expect(formatDuration(3 * HOUR_MS)).toBe("3 h");
    expect(formatDuration(47 * HOUR_MS + 59 * MINUTE_MS)).toBe("47 h 59 min");
    expect(formatDuration(2 * DAY_MS + 4 * HOUR_MS)).toBe("2 d 4 h");
    expect(formatDuration(3 * DAY_MS)).toBe("3 d");
    expect(formatDuration(-5)).toBe("0 s");
  });
});

describe("alert state codes", () => {
  it("a cleared or closed alert shows normal, on the list and in a report alike", () => {
    for (const kind of RULE_KINDS) {
      expect(alertStateCode({ kind, state: "cleared_unacked", shelved: false })).toBe("normal");
      expect(alertStateCode({ kind, state: "closed", shelved: false })).toBe("normal");
      // the report's view at the end of a shift, of an alert that cleared during it
      expect(alertStateCodeAt({ kind, endTs: 1_000, shelvedUntilTs: null }, 2_000)).toBe("normal");
    }
  });
  it("an active alert shows its kind's code, or shelved while shelved", () => {
    for (const kind of RULE_KINDS) {
      expect(alertStateCode({ kind, state: "active_acked", shelved: false })).toBe(RULE_KIND_STATE[kind]);
      expect(alertStateCodeAt({ kind, endTs: null, shelvedUntilTs: null }, 2_000)).toBe(RULE_KIND_STATE[kind]);
      expect(alertStateCode({ kind, state: "active_unacked", shelved: true })).toBe("shelved");
      expect(alertStateCodeAt({ kind, endTs: 5_000, shelvedUntilTs: 3_000 }, 2_000)).toBe("shelved");
    }
    expect(RULE_KIND_STATE.charge_high).toBe("over");
    expect(RULE_KIND_STATE.charge_rate).toBe("near");
    expect(RULE_KIND_STATE.sensor_flat).toBe("silent");
  });
});

describe("ranks", () => {
  it("orders severities and point states worst first", () => {
    expect([...SEVERITIES].sort((a, b) => SEVERITY_RANK[b] - SEVERITY_RANK[a])).toEqual(["high", "medium", "low"]);
    expect(worstState(["shelved", "silent"])).toBe("silent");
    expect(STATE_RANK.over).toBeGreaterThan(STATE_RANK.near);
    expect(NEUTRALIZER_STATE_CODE.needs_cleaning).toBe("near");
  });
});

describe("the schema's enums use the vocabulary's lists", () => {
  it("rule kinds, severities, alert states and neutralizer states", () => {
    expect(rules.kind.enumValues).toEqual([...RULE_KINDS]);
    expect(alerts.severity.enumValues).toEqual([...SEVERITIES]);
    expect(alerts.state.enumValues).toEqual([...ALERT_STATES]);
    expect(neutralizers.state.enumValues).toEqual([...NEUTRALIZER_STATES]);
  });
});
