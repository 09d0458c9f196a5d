// The demo history tells one story: the backfill plays the rules over the readings it writes
// (simulators/backfill-alert-writer.ts) so alert history, handover, alert load and the stored
// readings agree; the alerts are answered like a plant's and never mailed; the seeded
// maintenance history gives the compliance report one failing-then-fixed bar.
// Real MariaDB (own database), the demo plant seeded, 12 h of history ending at the anchor of
// the demo's scenario (simulators/incident-plan.ts) plus one extra power-unit fault on an unwind
// in the cold snap, so the span holds a charge excursion, a silent meter and dry halls.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, asc, eq, gte, lte } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { alertEvents, alerts, devices, equipmentEvents, lines, neutralizers, outbox, people, readings, rules, ruleVersions } from "@/db/schema";
import { writeHistory } from "@/simulators/backfill";
import { lineState, PlantModel, type Scenario } from "@/simulators/plant-model";
import { demoIncidentPlan } from "@/simulators/incident-plan";
import { groundTruth } from "@/simulators/ground-truth";
import { UNANSWERED_MS } from "@/simulators/backfill-responses";
import { HISTORY_END_REASON } from "@/simulators/backfill-alerts";
import { FAILED_THEN_FIXED } from "@/db/seed-equipment-history";
import { getAlertLoad } from "@/db/queries/alert-load";
import { listNotifyCandidates } from "@/db/queries/alert-notify-candidates";
import { buildHandoverForWindow } from "@/db/use-cases/handover-report";
import { getComplianceReport } from "@/db/use-cases/compliance-report";
import { getWeeklyReport } from "@/db/use-cases/weekly-report";
import { DEMO_LINES, DEMO_PEOPLE, fieldMeterCode } from "@/lib/demo-plant";

const H = 3_600_000;
const DAY = 24 * H;
/** the span is a parameter of the backfill: 12 h here, 30 days in the demo */
const SPAN_DAYS = 0.5;
const anchor = Math.floor(Date.now() / 60_000) * 60_000 - 5 * 60_000;
const fromMs = anchor - SPAN_DAYS * DAY;
const plan = demoIncidentPlan(anchor);
const SEED = 7;
/**
 * The extra fault lasts 30 min while gravure-1 runs throughout: the model's unplanned stops fall
 * on the clock (simulators/plant-model.ts stoppedUntil), and a stop inside the fault rightly
 * clears its alert and raises a second one at the restart. Searched back from anchor - 3 h in
 * 5 min steps; the line's 90 s ramp after a stop is kept out too.
 */
const faultStartMs = (() => {
  const lineIndex = DEMO_LINES.findIndex((l) => l.slug === "gravure-1");
  const bare: Scenario = { anchorMs: anchor, seed: SEED, incidents: plan };
  const runsThroughout = (start: number) => {
    for (let t = start - 2 * 60_000; t <= start + 0.5 * H; t += 10_000) if (!lineState(bare, DEMO_LINES[lineIndex], lineIndex, t).running) return false;
    return true;
  };
  for (let start = anchor - 3 * H; start > anchor - 7 * H; start -= 5 * 60_000) if (runsThroughout(start)) return start;
  throw new Error("no half hour without a stop on gravure-1 in the span");
})();
const faultEndMs = faultStartMs + 0.5 * H;
const scenario: Scenario = {
  anchorMs: anchor,
  seed: SEED,
  incidents: { ...plan, powerFaults: [...plan.powerFaults, { lineSlug: "gravure-1", pointSlug: "unwind", startMs: faultStartMs, endMs: faultEndMs }] },
};

let tdb: TestDatabase;
let stored: Array<typeof alerts.$inferSelect>;
const log: string[] = [];

beforeAll(async () => {
  tdb = await createTestDatabase("backfill_alerts", { seed: true });
  await writeHistory(new PlantModel(scenario), { days: SPAN_DAYS, thin: 10, fullRateHours: 1, rollupThin: 30 }, (m) => log.push(m), { db: tdb.db, pool: tdb.pool, toMs: anchor });
  stored = await tdb.db.select().from(alerts).orderBy(asc(alerts.startTs));
}, 180_000);

afterAll(async () => {
  await tdb?.close();
});

const idOf = {
  line: async (slug: string) => (await tdb.db.select({ id: lines.id }).from(lines).where(eq(lines.slug, slug)))[0].id,
  device: async (code: string) => (await tdb.db.select({ id: devices.id, pointId: devices.pointId }).from(devices).where(eq(devices.code, code)))[0],
};

describe("alerts over the backfilled history", () => {
  it("are played and stored, and the log says so", () => {
    expect(log.join("\n")).toMatch(/alerts played over the history: \d+ readings through the rules/);
    expect(stored.length).toBeGreaterThan(3);
  });

  it("exist for the incidents the simulator played", async () => {
    const incidents = groundTruth(scenario, fromMs, anchor).filter((i) => i.troubleMs !== null && i.startMs >= fromMs);
    const kinds = new Set(incidents.map((i) => i.kind));
    // the span holds what this test is about (simulators/incident-plan.ts demoIncidentPlan + the extra fault)
    expect([...kinds]).toEqual(expect.arrayContaining(["power_unit_fault", "silent_sensor"]));
    for (const inc of incidents) {
      const near = stored.filter((a) => a.startTs >= inc.startMs - 60_000 && a.startTs <= inc.endMs + 10 * 60_000);
      if (inc.kind === "power_unit_fault") {
        const lineId = await idOf.line(inc.where.lineSlug!);
        expect(near.filter((a) => a.lineId === lineId), `${inc.id} ${inc.what}`).not.toHaveLength(0);
      } else if (inc.kind === "silent_sensor") {
        const keys = (inc.where.deviceCodes ?? []).map((c) => `sensor:${c}`);
        expect(near.filter((a) => keys.includes(a.subjectKey) && a.kind === "sensor_silent"), inc.id).toHaveLength(1);
      }
    }
    // the cold snap: the halls are under the 30 % limit from the start of the span
    expect(stored.filter((a) => a.kind === "rh_low" && a.subjectKey.startsWith("area:")).length).toBeGreaterThanOrEqual(1);
    // the extra fault on the unwind in dry air: over 20 kV, so its one alert went up to high (not a second alert)
    const unwind = await idOf.device(fieldMeterCode("gravure-1", "unwind"));
    const charge = stored.filter((a) => a.pointId === unwind.pointId && (a.kind === "charge_high" || a.kind === "charge_rate") && a.startTs >= faultStartMs - 60_000 && a.startTs <= faultEndMs);
    expect(charge).toHaveLength(1);
    expect(charge[0].worsenedTs).toBeGreaterThanOrEqual(charge[0].startTs);
    const events = await tdb.db.select().from(alertEvents).where(eq(alertEvents.alertId, charge[0].id)).orderBy(asc(alertEvents.id));
    expect(events[0].kind).toBe("raised");
    expect(events.filter((e) => e.kind === "worsened").map((e) => e.comment)).toContain("Severity medium → high");
    expect(events.filter((e) => e.kind === "cleared")).toHaveLength(1);
    // stored in the order they happened
    const times = events.map((e) => e.ts);
    expect(times).toEqual([...times].sort((x, y) => x - y));
  });

  it("every charge alert starts where the stored readings are over its rule's limit", async () => {
    const chargeAlerts = [];
    for (const a of stored) {
      const [r] = await tdb.db
        .select({ kind: rules.kind, params: ruleVersions.params })
        .from(rules)
        .innerJoin(ruleVersions, and(eq(ruleVersions.ruleId, rules.id), eq(ruleVersions.version, a.ruleVersion)))
        .where(eq(rules.id, a.ruleId));
      if (r.kind !== "charge_high") continue;
      chargeAlerts.push(a);
      const limitKv = (r.params as { limitKv: number }).limitKv;
      // the reading that completed the on-delay is the one at the raise, over the limit
      const [atRaise] = await tdb.db
        .select({ value: readings.value })
        .from(readings)
        .where(and(eq(readings.deviceId, a.deviceId!), eq(readings.channel, "charge_kv"), eq(readings.ts, a.startTs)));
      expect(atRaise, `alert ${a.id} at ${new Date(a.startTs).toISOString()}`).toBeDefined();
      expect(Math.abs(atRaise.value)).toBeGreaterThan(limitKv);
      expect(Math.abs(a.peakValue!)).toBeGreaterThanOrEqual(Math.abs(atRaise.value));
    }
    expect(chargeAlerts.length).toBeGreaterThanOrEqual(1);
  });

  it("agree with the handover and the alert-load figures", async () => {
    const load = await getAlertLoad(tdb.db, fromMs, anchor, anchor);
    expect(load.total).toBe(stored.filter((a) => a.startTs >= fromMs && a.startTs < anchor).length);
    // the handover of the last eight hours: every point over its limit for more than a minute has an alert beside it
    const window = { name: "Test shift", index: 0, date: new Date(anchor - 8 * H).toISOString().slice(0, 10), startTs: anchor - 8 * H, endTs: anchor, timeZone: "UTC" };
    const report = await buildHandoverForWindow(tdb.db, window, "Harrow Fen Packaging", anchor);
    expect(report.summary.alertsRaised).toBe(stored.filter((a) => a.startTs >= window.startTs && a.startTs < window.endTs).length);
    const over = report.points.filter((p) => p.overMs > 60_000);
    expect(over.length).toBeGreaterThanOrEqual(1);
    for (const p of over) {
      expect(report.alerts.filter((a) => a.pointId === p.pointId), `point ${p.pointId} over for ${p.overMs} ms`).not.toHaveLength(0);
    }
  });

  it("agree with the weekly review of a line", async () => {
    const lineId = await idOf.line("gravure-1");
    // the week holding the extra fault on its unwind
    const weekly = (await getWeeklyReport(tdb.db, { lineId, date: new Date(faultStartMs).toISOString().slice(0, 10) }, anchor))!;
    const hallId = weekly.hall.id;
    // lib/reports/weekly.ts: alerts raised in the week on the line, its points and its hall
    const expected = stored.filter(
      (a) => a.startTs >= weekly.window.startTs && a.startTs < weekly.window.endTs && (a.lineId === lineId || (a.areaId === hallId && a.lineId === null && a.pointId === null)),
    );
    expect(expected.length).toBeGreaterThanOrEqual(1);
    expect(weekly.alerts.total).toBe(expected.length);
  });

  it("are answered like a plant's and never mailed", async () => {
    const byEmail = new Map((await tdb.db.select({ id: people.id, email: people.email }).from(people)).map((p) => [p.email, p.id]));
    const responders = new Set(DEMO_PEOPLE.filter((p) => p.email.startsWith("lead@") || p.email.startsWith("oncall@")).map((p) => byEmail.get(p.email)));
    for (const a of stored) {
      expect(a.state === "active_unacked" || a.state === "active_acked", `alert ${a.id} ${a.state}`).toBe(false);
      expect(a.endTs).not.toBeNull();
      expect(a.notifiedLevel).toBe(0);
      if (a.startTs >= anchor - UNANSWERED_MS) {
        expect(a.state).toBe("cleared_unacked");
        continue;
      }
      expect(a.state).toBe("closed");
      expect(responders.has(a.ackedBy!)).toBe(true);
      // acknowledged within minutes (simulators/backfill-responses.ts: 2–12 min)
      expect(a.ackedTs! - a.startTs).toBeGreaterThanOrEqual(2 * 60_000);
      expect(a.ackedTs! - a.startTs).toBeLessThanOrEqual(12 * 60_000);
      expect(a.closedTs).toBe(Math.max(a.ackedTs!, a.endTs!));
    }
    const comments = await tdb.db.select().from(alertEvents).where(eq(alertEvents.kind, "commented"));
    expect(comments.length).toBeGreaterThanOrEqual(1);
    for (const c of comments) expect(c.personId).toBe(byEmail.get("engineer@harrowfen.example"));
    // alerts open when the history ends were cleared there, saying why
    const atEnd = await tdb.db.select().from(alertEvents).where(and(eq(alertEvents.kind, "cleared"), eq(alertEvents.ts, anchor)));
    for (const e of atEnd) expect(e.comment).toBe(HISTORY_END_REASON);
    // nothing for the escalation runner, nothing in the outbox
    expect(await listNotifyCandidates(tdb.db, ["low", "medium", "high"], anchor + DAY, anchor + DAY)).toEqual([]);
    expect(await tdb.db.select({ id: outbox.id }).from(outbox)).toEqual([]);
  });
});

describe("a second run", () => {
  it("over the same span adds no alert, event, check or cleaning", async () => {
    const count = async () => {
      const [[a], [e], [c], [q]] = await Promise.all([
        tdb.pool.query("SELECT COUNT(*) AS n FROM alerts"),
        tdb.pool.query("SELECT COUNT(*) AS n FROM alert_events"),
        tdb.pool.query("SELECT COUNT(*) AS n FROM checks"),
        tdb.pool.query("SELECT COUNT(*) AS n FROM equipment_events"),
      ]);
      return [a, e, c, q].map((rows) => Number((rows as Array<{ n: number }>)[0].n));
    };
    const before = await count();
    const again: string[] = [];
    await writeHistory(new PlantModel(scenario), { days: SPAN_DAYS, thin: 10, fullRateHours: 1, rollupThin: 30 }, (m) => again.push(m), { db: tdb.db, pool: tdb.pool, toMs: anchor });
    expect(await count()).toEqual(before);
    expect(again.join("\n")).toMatch(/alerts not played over the history: less than 30 min to fill/);
  });
});

describe("seeded maintenance history", () => {
  it("gives the compliance report passing checks and one bar failing, cleaned and passing again", async () => {
    const day = (ts: number) => new Date(ts).toISOString().slice(0, 10);
    const report = await getComplianceReport(tdb.db, { from: day(anchor - 60 * DAY), to: day(anchor) }, anchor);
    const bad = report.neutralizers.find((n) => n.tag === FAILED_THEN_FIXED.tag)!;
    expect(bad.failedInPeriod).toHaveLength(1);
    expect(bad.checksInPeriod).toBe(2);
    expect(bad.lastCheck?.passed).toBe(true);
    const failedTs = bad.failedInPeriod[0].ts;
    const [nz] = await tdb.db.select({ id: neutralizers.id }).from(neutralizers).where(eq(neutralizers.tag, FAILED_THEN_FIXED.tag));
    const cleanedBetween = await tdb.db
      .select({ ts: equipmentEvents.ts })
      .from(equipmentEvents)
      .where(and(eq(equipmentEvents.subjectId, nz.id), eq(equipmentEvents.kind, "cleaned"), gte(equipmentEvents.ts, failedTs), lte(equipmentEvents.ts, bad.lastCheck!.ts)));
    expect(cleanedBetween).toHaveLength(1);
    // most bars have a passing last check; a plant's report is not all red
    const withCheck = report.neutralizers.filter((n) => n.lastCheck !== null);
    expect(withCheck.length).toBeGreaterThanOrEqual(report.neutralizers.length - 2);
    expect(withCheck.filter((n) => n.lastCheck!.passed).length / withCheck.length).toBeGreaterThan(0.8);
    // cleanings on schedule over the months
    const cleanings = await tdb.db.select({ id: equipmentEvents.id }).from(equipmentEvents).where(and(eq(equipmentEvents.kind, "cleaned"), gte(equipmentEvents.ts, anchor - 90 * DAY)));
    expect(cleanings.length).toBeGreaterThan(report.neutralizers.length * 3);
  });
});
