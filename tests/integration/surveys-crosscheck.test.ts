// Walk-down surveys against the real MariaDB: the fixed-meter cross-check (flag and history per
// meter), a round sent twice stored once, a round kept against the plan version it was taken
// with, refusals of impossible readings, and the seeded demo history.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import * as s from "../../db/schema";
import { savePlan } from "../../db/queries/surveys";
import { countSurveys, latestCrossChecks, storeRound } from "../../db/queries/surveys-rounds";
import { getSurveyReport, listCrossChecks, listSurveyActions } from "../../db/queries/surveys-report";
import { AppError } from "../../lib/errors";
import type { RoundPayload } from "../../lib/surveys/schemas";

let t: TestDatabase;
let personId: number;
let meterId: number;
let planId: number;
const now = Date.now();

const uuid = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, "0")}`;

function round(n: number, readings: RoundPayload["readings"], extra: Partial<RoundPayload> = {}): RoundPayload {
  return {
    clientId: uuid(n),
    planId,
    planVersion: 1,
    startedTs: readings[0]?.ts ?? now - 3_600_000,
    finishedTs: null,
    meterLabel: "Test handheld",
    meterCalibratedOn: "2026-01-10",
    calibratedDistanceMm: 25,
    note: null,
    resurveyOfActionId: null,
    readings,
    ...extra,
  };
}
const reading = (spotKey: string, ts: number, value: number, more: Partial<RoundPayload["readings"][number]> = {}) => ({ spotKey, ts, value, unit: "kV" as const, distanceMm: 25, running: true, speedMpm: 240, note: null, ...more });

async function fixedReadings(ts: number, valueKv: number) {
  const rows = [-40_000, -20_000, 0, 20_000, 40_000].map((d, i) => ({ deviceId: meterId, channel: "charge_kv", ts: ts + d, value: valueKv + (i % 2 ? 0.1 : -0.1) }));
  await t.db.insert(s.readings).values(rows);
}

beforeAll(async () => {
  t = await createTestDatabase("surveys", { seed: true });
  personId = (await t.db.select({ id: s.people.id }).from(s.people).where(eq(s.people.email, "lead@harrowfen.example")))[0].id;
  const meter = (await t.db.select({ id: s.devices.id, pointId: s.devices.pointId, lineId: s.devices.lineId }).from(s.devices).where(eq(s.devices.code, "fm-gravure-1-unwind")))[0];
  meterId = meter.id;
  const infeed = (await t.db.select({ id: s.points.id }).from(s.points).where(and(eq(s.points.lineId, meter.lineId!), eq(s.points.position, 2))))[0];
  const p = await savePlan(
    t.db,
    {
      lineId: meter.lineId!,
      name: "Unwind check",
      comment: "",
      spots: [
        { key: "unwind", name: "Unwind", pointId: meter.pointId, afterNeutralizer: null },
        { key: "infeed", name: "Infeed idlers", pointId: infeed.id, afterNeutralizer: "N-GRAVURE-1-INFEED" },
        { key: "extra", name: "Before dryer", pointId: null, afterNeutralizer: null },
      ],
    },
    personId,
    now - 7_200_000,
  );
  planId = p.planId;
});

afterAll(async () => {
  await t?.close();
});

describe("fixed-meter cross-check", () => {
  it("flags a fixed meter more than 20 % away from the handheld, and keeps the history per meter", async () => {
    const ts1 = now - 3_000_000;
    await fixedReadings(ts1, -13); // handheld −10 kV: 30 % apart
    const r1 = await storeRound(t.db, round(1, [reading("unwind", ts1, -10)]), personId, now);
    expect(r1.readings[0].fixedKv).toBeCloseTo(-13, 1);
    let latest = await latestCrossChecks(t.db, [meterId]);
    expect(latest.get(meterId)?.flagged).toBe(true);
    expect(latest.get(meterId)?.diffShare).toBeCloseTo(0.3, 2);

    const ts2 = now - 1_800_000;
    await fixedReadings(ts2, -10.5); // handheld −10 kV: 5 % apart
    await storeRound(t.db, round(2, [reading("unwind", ts2, -10)]), personId, now);
    latest = await latestCrossChecks(t.db, [meterId]);
    expect(latest.get(meterId)?.flagged).toBe(false);
    const history = await listCrossChecks(t.db, { deviceId: meterId });
    expect(history.map((h) => h.flagged)).toEqual([false, true]);
  });

  it("does not judge a reading taken while the line was stopped", async () => {
    const ts = now - 900_000;
    await fixedReadings(ts, -20);
    await storeRound(t.db, round(3, [reading("unwind", ts, -10, { running: false })]), personId, now);
    expect(await listCrossChecks(t.db, { deviceId: meterId })).toHaveLength(2);
  });
});

describe("rounds", () => {
  it("stores a round sent twice once, and works out findings when it is finished", async () => {
    const ts = now - 600_000;
    const rs = [reading("unwind", ts, -20), reading("infeed", ts + 60_000, -15), reading("extra", ts + 120_000, 3)];
    const first = await storeRound(t.db, round(10, rs, { finishedTs: ts + 180_000 }), personId, now);
    const again = await storeRound(t.db, round(10, rs, { finishedTs: ts + 180_000 }), personId, now);
    expect(first.created).toBe(true);
    expect(again.created).toBe(false);
    expect(again.readingsStored).toBe(0);
    expect(await countSurveys(t.db, uuid(10))).toBe(1);
    const rep = await getSurveyReport(t.db, first.surveyId);
    expect(rep!.spots.filter((x) => x.reading)).toHaveLength(3);
    // −20 kV → −15 kV across the infeed bar is 25 %: low reduction; both over the 12 kV plant limit
    expect(rep!.findings.map((f) => f.kind).sort()).toEqual(["low_reduction", "over_limit", "over_limit"]);
    expect(rep!.spots[1].reductionPct).toBeCloseTo(25, 6);
    expect(rep!.startedTs).toBe(ts);
  });

  it("keeps a round against the plan version it was taken with", async () => {
    const plan = await t.db.select().from(s.surveyPlanVersions).where(eq(s.surveyPlanVersions.planId, planId));
    const v2 = await savePlan(t.db, { planId, lineId: (await t.db.select().from(s.surveyPlans).where(eq(s.surveyPlans.id, planId)))[0].lineId, name: "Unwind check", comment: "dropped the extra spot", spots: plan[0].spots.slice(0, 2) }, personId, now);
    expect(v2.version).toBe(2);
    const ts = now - 300_000;
    const r = await storeRound(t.db, round(11, [reading("extra", ts, 2.5)]), personId, now);
    const rep = await getSurveyReport(t.db, r.surveyId);
    expect(rep!.planVersion).toBe(1);
    expect(rep!.currentPlanVersion).toBe(2);
    expect(rep!.spots.map((x) => x.key)).toEqual(["unwind", "infeed", "extra"]);
  });

  it("refuses a reading beyond the breakdown ceiling or at a distance of zero, storing nothing", async () => {
    const ts = now - 200_000;
    await expect(storeRound(t.db, round(12, [reading("unwind", ts, 90)]), personId, now)).rejects.toThrow(/Air cannot hold this/);
    const zero = storeRound(t.db, round(13, [reading("unwind", ts, 5, { distanceMm: 0 })]), personId, now);
    await expect(zero).rejects.toBeInstanceOf(AppError);
    await expect(zero).rejects.toThrow(/more than 0 mm/);
    expect(await countSurveys(t.db, uuid(12))).toBe(0);
    expect(await countSurveys(t.db, uuid(13))).toBe(0);
  });
});

describe("demo history", () => {
  it("seeds two past surveys of the survey-only slitter, one action open and one closed by the re-survey", async () => {
    const line = (await t.db.select({ id: s.lines.id }).from(s.lines).where(eq(s.lines.slug, "slitter-2")))[0];
    expect(await t.db.select().from(s.devices).where(eq(s.devices.lineId, line.id))).toHaveLength(0);
    const rounds = await t.db.select().from(s.surveys).where(eq(s.surveys.lineId, line.id));
    expect(rounds).toHaveLength(2);
    const actions = await listSurveyActions(t.db, {});
    const demo = actions.filter((a) => a.lineName === "Slitter-Rewinder S2");
    expect(demo.map((a) => a.state).sort()).toEqual(["closed", "open"]);
    const closed = demo.find((a) => a.state === "closed")!;
    expect(closed.resurveyId).toBe(rounds.find((r) => r.resurveyOfActionId === closed.id)!.id);
  });
});
