// Weekly review of Gravure Press 1 and the equipment compliance report on seeded data in their
// own database; expected values are recomputed here from the fixture's generators with the
// closed-form least-squares formulas (not simple-statistics) and plain counting.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { getComplianceReport } from "@/db/use-cases/compliance-report";
import { getWeeklyReport } from "@/db/use-cases/weekly-report";
import { addDaysToDate, localTimeToTs } from "@/lib/plant-time";
import type { WeeklyReport } from "@/lib/reports/weekly";
import type { ComplianceReport } from "@/lib/reports/compliance";
import { DAY, FIXTURE_TZ, HOUR, hourlyAt, MIN, seedReportFixture, type ReportFixture } from "./reports-fixture";

let t: TestDatabase;
let fx: ReportFixture;
let weekly: WeeklyReport;
const NOW = Date.now();

/** Closed-form ordinary least squares: slope = Sxy/Sxx, intercept = ȳ − slope·x̄, r² = Sxy²/(Sxx·Syy). */
function closedForm(pairs: Array<[number, number]>) {
  const n = pairs.length;
  const mx = pairs.reduce((a, [x]) => a + x, 0) / n;
  const my = pairs.reduce((a, [, y]) => a + y, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (const [x, y] of pairs) {
    sxy += (x - mx) * (y - my);
    sxx += (x - mx) ** 2;
    syy += (y - my) ** 2;
  }
  const slope = sxy / sxx;
  return { n, slope, intercept: my - slope * mx, r2: (sxy * sxy) / (sxx * syy) };
}

beforeAll(async () => {
  t = await createTestDatabase("reports_weekly", { seed: true });
  fx = await seedReportFixture(t.db, NOW);
  weekly = (await getWeeklyReport(t.db, { lineId: fx.ids.gravure, date: fx.day }, NOW))!;
});
afterAll(async () => {
  await t?.close();
});

describe("weekly review of a line", () => {
  it("covers the ISO week (Monday to Sunday, local) holding the day", () => {
    expect(weekly.window.startTs).toBe(fx.week.startTs);
    expect(new Date(weekly.window.startTs).getUTCDay()).toBe(1);
    expect(weekly.line.name).toBe("Gravure Press 1");
  });

  it("counts only hours in which the line ran (running ≥ 90 % of the hour)", () => {
    const hours = Math.round((fx.week.endTs - fx.week.startTs) / HOUR);
    const ran = Array.from({ length: hours }, (_, h) => hourlyAt(h)).filter((v) => v.running >= 0.9).length;
    expect(weekly.runningHours).toBe(ran);
    // 16 running hours a day for 7 days, less hour 30 which ran only half
    expect(ran).toBe(16 * 7 - 1);
  });

  it("least-squares fit of |charge| against hall RH per point matches the closed form", () => {
    const hours = Math.round((fx.week.endTs - fx.week.startTs) / HOUR);
    for (let p = 1; p <= 4; p++) {
      const pairs: Array<[number, number]> = [];
      const speedPairs: Array<[number, number]> = [];
      for (let h = 0; h < hours; h++) {
        const v = hourlyAt(h);
        if (v.running < 0.9) continue;
        pairs.push([v.rh, Math.abs(v.charge(p))]);
        speedPairs.push([v.speed, Math.abs(v.charge(p))]);
      }
      const want = closedForm(pairs);
      const row = weekly.points.find((x) => x.position === p)!;
      expect(row.rh.n).toBe(want.n);
      expect(row.rh.fit!.slope).toBeCloseTo(want.slope, 9);
      expect(row.rh.fit!.intercept).toBeCloseTo(want.intercept, 8);
      expect(row.rh.fit!.rSquared!).toBeCloseTo(want.r2, 9);
      // the generator makes charge fall as RH rises
      expect(row.rh.fit!.slope).toBeLessThan(0);
      const wantSpeed = closedForm(speedPairs);
      expect(row.speed.fit!.slope).toBeCloseTo(wantSpeed.slope, 9);
      expect(row.speed.fit!.rSquared!).toBeCloseTo(wantSpeed.r2, 9);
    }
  });

  it("time over limit from 1-minute rollups: minutes with a reading over the limit", () => {
    // unwind: every 10th minute of the day reaches −15 kV (limit 12) → 144 min;
    // rewind: every 4th minute reaches 9 kV (its own 8 kV limit) → 360 min; the others never
    const byPos = new Map(weekly.points.map((p) => [p.position, p]));
    expect(byPos.get(1)!.overMs).toBe((1440 / 10) * MIN);
    expect(byPos.get(4)!.overMs).toBe((1440 / 4) * MIN);
    expect(byPos.get(4)!.limitKv).toBe(8);
    expect(byPos.get(2)!.overMs).toBe(0);
    expect(byPos.get(1)!.worst).toEqual({ ts: fx.dayStart, value: -15 });
    expect(byPos.get(1)!.coveredMs).toBe(1440 * MIN);
  });

  it("hall humidity: minutes below the alert limit and below the band", () => {
    expect(weekly.hall.belowLimitMs).toBe(60 * MIN);
    expect(weekly.hall.belowBandMs).toBe(1440 * MIN);
    expect(weekly.hall.lowest).toEqual({ ts: fx.dayStart + 600 * MIN, value: 28 });
  });

  it("alert counts and the noisiest rules", () => {
    const pointIds = new Set([fx.ids.unwind, fx.ids.infeed, fx.ids.rewind, fx.lookup.point("gravure-1", 3).id]);
    const mine = fx.alerts.filter(
      (a) =>
        a.startTs >= fx.week.startTs &&
        a.startTs < fx.week.endTs &&
        (a.lineId === fx.ids.gravure || (a.pointId != null && pointIds.has(a.pointId)) || (a.areaId === fx.ids.pressHall && a.lineId == null && a.pointId == null)),
    );
    expect(weekly.alerts.total).toBe(mine.length);
    const kinds = new Map<string, number>();
    for (const a of mine) kinds.set(a.kind, (kinds.get(a.kind) ?? 0) + 1);
    expect(Object.fromEntries(weekly.alerts.byKind.map((k) => [k.kind, k.count]))).toEqual(Object.fromEntries(kinds));
    const rules = new Map<number, number>();
    for (const a of mine) rules.set(a.ruleId, (rules.get(a.ruleId) ?? 0) + 1);
    const top = [...rules.entries()].sort((a, b) => b[1] - a[1])[0];
    expect(weekly.alerts.noisiestRules[0]).toMatchObject({ ruleId: top[0], count: top[1], ruleName: "Charge over limit" });
    expect(weekly.alerts.chattering).toBe(mine.filter((a) => a.chattering).length);
    expect(weekly.alerts.chattering).toBe(2);
    // hall-level alerts (humidity) counted for the hall
    expect(weekly.hall.alerts).toBe(mine.filter((a) => a.lineId == null && a.pointId == null).length);
    expect(weekly.hall.alerts).toBe(2);
  });

  it("returns null for a line that does not exist", async () => {
    expect(await getWeeklyReport(t.db, { lineId: 999_999, date: fx.day }, NOW)).toBeNull();
  });
});

describe("equipment compliance", () => {
  let report: ComplianceReport;
  beforeAll(async () => {
    report = await getComplianceReport(t.db, { from: addDaysToDate(fx.day, -29), to: fx.day }, NOW);
  });

  it("counts checks done in the period and the pass rate", () => {
    const from = localTimeToTs(addDaysToDate(fx.day, -29), 0, FIXTURE_TZ);
    const to = localTimeToTs(addDaysToDate(fx.day, 1), 0, FIXTURE_TZ);
    const inPeriod = fx.checks.filter((c) => c.ts! >= from && c.ts! < to);
    const passed = inPeriod.filter((c) => c.passed).length;
    expect(report.summary.checksDone).toBe(inPeriod.length);
    expect(report.summary.checksPassed).toBe(passed);
    expect(report.summary.passRate).toBeCloseTo(passed / inPeriod.length, 12);
    // 16 routine passes and one failure (the slitter unwind); the check 200 days ago and the
    // one after the period are outside it
    expect(inPeriod.length).toBe(17);
    expect(passed).toBe(16);
  });

  it("finds what is overdue at the end of the period", () => {
    const asOf = localTimeToTs(addDaysToDate(fx.day, 1), 0, FIXTURE_TZ);
    expect(report.asOfTs).toBe(asOf);
    // only the bag machine unwind bar was never checked: installed 2024-03-04 with a 90-day interval
    const overdue = report.neutralizers.filter((n) => n.check.status === "overdue").map((n) => n.tag);
    expect(overdue).toEqual(["N-BAGGER-1-UNWIND"]);
    const expectedDays = Math.floor((asOf - (localTimeToTs("2024-03-04", 0, FIXTURE_TZ) + 90 * DAY)) / DAY);
    expect(report.neutralizers.find((n) => n.tag === "N-BAGGER-1-UNWIND")!.check.days).toBe(expectedDays);
    // cleaning: the laminator rewind (30 days ago, 14-day interval) is overdue
    expect(report.neutralizers.filter((n) => n.cleaning.status === "overdue").map((n) => n.tag)).toEqual(["N-LAMINATOR-1-REWIND"]);
    expect(report.summary.checksOverdue).toBe(1);
    expect(report.summary.cleaningOverdue).toBe(1);
    const slitter = report.neutralizers.find((n) => n.tag === "N-SLITTER-1-UNWIND")!;
    expect(slitter.lastCheck?.passed).toBe(false);
    expect(slitter.failedInPeriod).toHaveLength(1);
  });

  it("field meter calibration: overdue after its date, due soon within 14 days", () => {
    const unwind = report.meters.find((m) => m.deviceCode === "fm-gravure-1-unwind")!;
    // due 3 days before the fixture day; as of the day after it: 4 days overdue
    expect(unwind).toMatchObject({ status: "overdue", days: 4, code: "over" });
    expect(report.meters.find((m) => m.deviceCode === "fm-gravure-1-rewind")).toMatchObject({ status: "due_soon", days: 4, code: "near" });
    expect(report.summary.metersCalibrationOverdue).toBe(1);
  });
});
