// Pure parts of the report builders: limits precedence, alert codes, why a neutralizer needs
// attention, due dates, report parameters.
import { describe, expect, it } from "vitest";
import { chargeLimitAt, rhLowLimitAt, type StoredRule } from "@/lib/rules/limits-in-force";
import { neutralizerAttention, type HandoverNeutralizerInput } from "@/lib/reports/handover";
import { DAY_MS, alertStateCodeAt } from "@/lib/vocabulary";
import { calibrationStatus, dueSoonWindowMs, dueStatus } from "@/lib/reports/compliance";
import { complianceParamsSchema, handoverParamsSchema, resolveComplianceParams, resolveHandoverParams } from "@/lib/reports/params";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";

const rule = (p: Partial<StoredRule> & { ruleId: number; params: unknown }): StoredRule => ({
  kind: "charge_high",
  name: `Rule ${p.ruleId}`,
  enabled: true,
  severity: "medium",
  pointId: null,
  lineId: null,
  areaId: null,
  ...p,
});

describe("limits a report measures against", () => {
  const rules = [
    rule({ ruleId: 1, params: { limitKv: 12, clearKv: 10 } }),
    rule({ ruleId: 2, severity: "high", params: { limitKv: 20, clearKv: 17 } }),
    rule({ ruleId: 3, lineId: 5, params: { limitKv: 15, clearKv: 13 } }),
    rule({ ruleId: 4, pointId: 7, lineId: 5, params: { limitKv: 8, clearKv: 6 } }),
    rule({ ruleId: 5, pointId: 9, enabled: false, params: { limitKv: 3, clearKv: 2 } }),
    rule({ ruleId: 6, kind: "rh_low", params: { limitPct: 30, clearPct: 33 } }),
    rule({ ruleId: 7, kind: "rh_low", areaId: 2, params: { limitPct: 35, clearPct: 38 } }),
  ];
  it("the plant-wide limit applies where nothing more specific is set (lowest of the severities)", () => {
    expect(chargeLimitAt({ pointId: 1, lineId: 1, areaId: 1 }, rules)).toMatchObject({ value: 12, level: "plant", ruleId: 1 });
  });
  it("a line rule overrides the plant-wide one of its severity", () => {
    expect(chargeLimitAt({ pointId: 6, lineId: 5, areaId: 1 }, rules)).toMatchObject({ value: 15, level: "line" });
  });
  it("a point rule overrides the line's", () => {
    expect(chargeLimitAt({ pointId: 7, lineId: 5, areaId: 1 }, rules)).toMatchObject({ value: 8, level: "point" });
  });
  it("a disabled point rule exempts the point from that severity; the high limit still applies", () => {
    expect(chargeLimitAt({ pointId: 9, lineId: 1, areaId: 1 }, rules)).toMatchObject({ value: 20, severity: "high" });
  });
  it("humidity: the hall's own minimum overrides the plant-wide one", () => {
    expect(rhLowLimitAt({ areaId: 2 }, rules)?.value).toBe(35);
    expect(rhLowLimitAt({ areaId: 3 }, rules)?.value).toBe(30);
    expect(rhLowLimitAt({ areaId: 3 }, [])).toBeNull();
  });
});

describe("alert codes", () => {
  it("code by kind, shelved while shelved, normal once ended", () => {
    expect(alertStateCodeAt({ kind: "charge_high", shelvedUntilTs: null, endTs: null }, 0)).toBe("over");
    expect(alertStateCodeAt({ kind: "rh_forecast", shelvedUntilTs: null, endTs: null }, 0)).toBe("near");
    expect(alertStateCodeAt({ kind: "sensor_silent", shelvedUntilTs: null, endTs: 5 }, 0)).toBe("silent");
    expect(alertStateCodeAt({ kind: "charge_high", shelvedUntilTs: 100, endTs: null }, 50)).toBe("shelved");
    expect(alertStateCodeAt({ kind: "charge_high", shelvedUntilTs: 100, endTs: null }, 150)).toBe("over");
    // an alert that cleared before the end of the shift reads "OK", as on the alert list
    expect(alertStateCodeAt({ kind: "charge_high", shelvedUntilTs: null, endTs: 40 }, 50)).toBe("normal");
    expect(alertStateCodeAt({ kind: "charge_high", shelvedUntilTs: 100, endTs: 40 }, 50)).toBe("normal");
  });
});

describe("why a neutralizer needs attention", () => {
  const at = 1_000 * DAY_MS;
  const ok: HandoverNeutralizerInput = {
    id: 1,
    tag: "N-1",
    kind: "ionizing_bar",
    state: "in_service",
    pointId: 1,
    cleaningIntervalDays: 14,
    checkIntervalDays: 90,
    lastCleanedTs: at - 3 * DAY_MS,
    installedTs: at - 400 * DAY_MS,
    lastCheck: { ts: at - 10 * DAY_MS, passed: true, failReasons: null },
  };
  it("nothing for a clean, checked bar", () => {
    expect(neutralizerAttention(ok, at)).toEqual({ reasons: [], code: "normal" });
  });
  it("overdue cleaning and check are near; a failed check or a fault is over", () => {
    expect(neutralizerAttention({ ...ok, lastCleanedTs: at - 20 * DAY_MS }, at)).toEqual({ reasons: ["Cleaning overdue by 6 d"], code: "near" });
    expect(neutralizerAttention({ ...ok, lastCheck: { ts: at - 95 * DAY_MS, passed: true, failReasons: null } }, at).reasons).toEqual(["Check overdue by 5 d"]);
    expect(neutralizerAttention({ ...ok, lastCheck: { ts: at - 1, passed: false, failReasons: "Offset 50 V is outside ±35 V." } }, at)).toEqual({
      reasons: ["Last check failed: Offset 50 V is outside ±35 V."],
      code: "over",
    });
    expect(neutralizerAttention({ ...ok, state: "faulty" }, at).code).toBe("over");
    expect(neutralizerAttention(ok, at, [at - 5]).reasons[0]).toBe("Losing effect (1 alert this shift)");
  });
  it("cleaning falling due within a day is listed, in hours", () => {
    expect(neutralizerAttention({ ...ok, lastCleanedTs: at - 14 * DAY_MS + 5 * 3_600_000 }, at).reasons).toEqual(["Cleaning due in 5 h"]);
  });
  it("a bar never checked is judged from its installation date", () => {
    expect(neutralizerAttention({ ...ok, lastCheck: null }, at).reasons).toEqual(["Check overdue by 310 d"]);
    expect(neutralizerAttention({ ...ok, lastCheck: null, installedTs: null }, at).reasons).toEqual(["No check on record"]);
  });
});

describe("due dates", () => {
  it("overdue, due soon (14 days), ok, unknown", () => {
    expect(dueStatus(100, 100 + 3 * DAY_MS)).toMatchObject({ status: "overdue", days: 3, code: "over" });
    expect(dueStatus(10 * DAY_MS, 0)).toMatchObject({ status: "due_soon", days: 10, code: "near" });
    expect(dueStatus(30 * DAY_MS, 0)).toMatchObject({ status: "ok", days: 30, code: "normal" });
    expect(dueStatus(null, 0)).toMatchObject({ status: "unknown", code: "silent" });
  });
  it("looks ahead at most a quarter of the interval: a weekly cleaning is due soon only in its last 1.75 days", () => {
    expect(dueSoonWindowMs(90)).toBe(14 * DAY_MS);
    expect(dueSoonWindowMs(7)).toBe(1.75 * DAY_MS);
    expect(dueStatus(3 * DAY_MS, 0, dueSoonWindowMs(7)).status).toBe("ok");
    expect(dueStatus(1 * DAY_MS, 0, dueSoonWindowMs(7)).status).toBe("due_soon");
  });
  it("calibration on a calendar date: due on the day, overdue after it", () => {
    const asOf = Date.UTC(2026, 0, 12, 12);
    expect(calibrationStatus("2026-01-12", asOf, "Europe/London")).toEqual({ status: "due_soon", days: 0 });
    expect(calibrationStatus("2026-01-10", asOf, "Europe/London")).toEqual({ status: "overdue", days: 2 });
    expect(calibrationStatus("2026-03-01", asOf, "Europe/London")).toEqual({ status: "ok", days: 48 });
  });
});

describe("report parameters", () => {
  const settings = { timeZone: "Europe/London", shifts: DEFAULT_PLANT_SETTINGS.shifts };
  it("open the handover on the last completed shift", () => {
    expect(resolveHandoverParams({}, settings, Date.UTC(2026, 0, 12, 15))).toEqual({ date: "2026-01-12", shift: "Early" });
    expect(resolveHandoverParams({ date: "2026-01-10", shift: "Night" }, settings, 0)).toEqual({ date: "2026-01-10", shift: "Night" });
  });
  it("refuse bad dates and reversed ranges with words for the field", () => {
    const h = handoverParamsSchema.safeParse({ date: "2026-13-01" });
    expect(h.success).toBe(false);
    expect(h.error!.issues[0].message).toBe("There is no such shift date");
    const c = complianceParamsSchema.safeParse({ from: "2026-02-10", to: "2026-02-01" });
    expect(c.error!.issues[0]).toMatchObject({ path: ["to"], message: "The last day must not be before the first day" });
    expect(handoverParamsSchema.parse({ date: "", shift: "" })).toEqual({ date: undefined, shift: undefined });
  });
  it("default the compliance period to the last 90 days", () => {
    expect(resolveComplianceParams({}, "Europe/London", Date.UTC(2026, 2, 31, 12))).toEqual({ from: "2026-01-01", to: "2026-03-31" });
  });
});
