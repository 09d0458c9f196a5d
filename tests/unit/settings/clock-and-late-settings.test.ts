// The clock-skew limit and the late re-check settings (lib/settings.ts): defaults, overrides and
// refusals, and the flag they drive (lib/clock-skew.ts isClockOff).
import { describe, expect, it } from "vitest";
import { isClockOff } from "../../../lib/clock-skew";
import { parseSettings, SettingsError } from "../../../lib/settings";

const test = { STILLFIELD_MODE: "test" };

describe("clock-skew and late re-check settings", () => {
  it("default to 30 s of skew, 5 s of settling and 15 minutes before a late finding stays quiet", () => {
    // 30 s: the limit README.md ("Connecting a Sparkplug gateway") documents
    const s = parseSettings(test);
    expect(s.CLOCK_SKEW_LIMIT_MS).toBe(30_000);
    expect(s.LATE_RECHECK_SETTLE_MS).toBe(5000);
    expect(s.LATE_FINDING_QUIET_AFTER_MS).toBe(900_000);
  });

  it("take a plant's own values, and the flag follows the limit it is given", () => {
    const s = parseSettings({ ...test, CLOCK_SKEW_LIMIT_MS: "120000", LATE_FINDING_QUIET_AFTER_MS: "60000" });
    expect(s.CLOCK_SKEW_LIMIT_MS).toBe(120_000);
    expect(s.LATE_FINDING_QUIET_AFTER_MS).toBe(60_000);
    expect(isClockOff(45_000, parseSettings(test).CLOCK_SKEW_LIMIT_MS)).toBe(true);
    expect(isClockOff(45_000, s.CLOCK_SKEW_LIMIT_MS)).toBe(false);
    expect(isClockOff(-121_000, s.CLOCK_SKEW_LIMIT_MS)).toBe(true);
  });

  it("refuse a skew limit under a second or a negative quiet time", () => {
    expect(() => parseSettings({ ...test, CLOCK_SKEW_LIMIT_MS: "500" })).toThrow(SettingsError);
    expect(() => parseSettings({ ...test, LATE_FINDING_QUIET_AFTER_MS: "-1" })).toThrow(SettingsError);
    expect(() => parseSettings({ ...test, CLOCK_SKEW_LIMIT_MS: "half a minute" })).toThrow(SettingsError);
  });
});
