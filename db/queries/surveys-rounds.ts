// Storing a round sent from a phone. Idempotent: the survey is keyed by its client-made id, a
// reading by (survey, spot), a cross-check by its reading; a round sent twice is stored once, a
// spot re-measured later (newer time stamp) replaces its reading. The round is kept against the
// plan version it was taken with, whatever the plan's current version. When the round is first
// marked finished its findings are worked out, and a re-survey closes the action it was for.
import { and, asc, eq, gte, inArray, lte, sql } from "drizzle-orm";
import type { Db } from "../client";
import { lines, meterCrossChecks, readings, surveyActions, surveyFindings, surveyPlans, surveyReadings, surveys } from "../schema";
import { getRoundPlan, getPlanVersionSpots } from "./surveys";
import { writeAudit } from "./audit";
import { AppError, notFound } from "../../lib/errors";
import { crossCheckFixedMeter, CROSSCHECK_WINDOW_MS, DEFAULT_CROSSCHECK_SHARE } from "../../lib/surveys/crosscheck";
import { surveyFindings as computeFindings } from "../../lib/surveys/findings";
import { checkReading, toKv } from "../../lib/surveys/judge";
import type { RoundPayload } from "../../lib/surveys/schemas";

export type StoredRound = {
  surveyId: number;
  /** false when the survey was already stored (a resend) */
  created: boolean;
  readingsStored: number;
  readings: { spotKey: string; equivalentKv: number; fixedKv: number | null }[];
  finished: boolean;
  findingCount: number;
};

/** Mean and values of a fixed meter's charge around a moment (readings table, raw). */
export async function fixedMeterAround(db: Pick<Db, "select">, deviceId: number, ts: number, windowMs = CROSSCHECK_WINDOW_MS): Promise<number[]> {
  const rows = await db
    .select({ value: readings.value })
    .from(readings)
    .where(and(eq(readings.deviceId, deviceId), eq(readings.channel, "charge_kv"), gte(readings.ts, ts - windowMs), lte(readings.ts, ts + windowMs)));
  return rows.map((r) => r.value);
}

export async function storeRound(db: Db, round: RoundPayload, personId: number, nowMs = Date.now(), opts: { allowedShare?: number } = {}): Promise<StoredRound> {
  const plan = (await db.select({ id: surveyPlans.id, lineId: surveyPlans.lineId }).from(surveyPlans).where(eq(surveyPlans.id, round.planId)).limit(1))[0];
  if (!plan) throw notFound("No such survey plan.");
  const spots = await getPlanVersionSpots(db, round.planId, round.planVersion);
  if (!spots) throw notFound(`Version ${round.planVersion} of this plan does not exist.`);
  // judge every reading before storing anything: one refused reading refuses the send
  const judged = round.readings.map((r, i) => {
    const idx = spots.findIndex((s) => s.key === r.spotKey);
    if (idx < 0) throw new AppError("unprocessable", `Spot “${r.spotKey}” is not in version ${round.planVersion} of the plan.`, { [`readings.${i}.spotKey`]: ["Not in this plan version"] });
    const c = checkReading({ value: r.value, unit: r.unit, distanceMm: r.distanceMm, calibratedMm: round.calibratedDistanceMm });
    if (!c.ok) throw new AppError("unprocessable", `${spots[idx].name}: ${c.reason}`, { [`readings.${i}.${c.field}`]: [c.reason] });
    return { r, spot: spots[idx], position: idx + 1, equivalentKv: c.equivalent.equivalentKv };
  });
  const roundPlan = await getRoundPlan(db, round.planId, round.planVersion);

  return db.transaction(async (tx) => {
    const [ins] = await tx
      .insert(surveys)
      .ignore()
      .values({
        clientId: round.clientId,
        planId: round.planId,
        planVersion: round.planVersion,
        lineId: plan.lineId,
        personId,
        startedTs: round.startedTs,
        finishedTs: null,
        receivedTs: nowMs,
        meterLabel: round.meterLabel,
        meterCalibratedOn: round.meterCalibratedOn,
        calibratedDistanceMm: round.calibratedDistanceMm,
        note: round.note,
        resurveyOfActionId: round.resurveyOfActionId,
      });
    const created = ins.affectedRows === 1;
    const survey = (await tx.select().from(surveys).where(eq(surveys.clientId, round.clientId)).for("update").limit(1))[0];
    if (!survey) throw new AppError("internal", "The survey could not be stored.");
    if (survey.planId !== round.planId || survey.planVersion !== round.planVersion) {
      throw new AppError("conflict", "This survey id is already used by a survey of another plan or plan version.");
    }
    const existing = await tx.select({ id: surveyReadings.id, spotKey: surveyReadings.spotKey, ts: surveyReadings.ts }).from(surveyReadings).where(eq(surveyReadings.surveyId, survey.id));
    let stored = 0;
    for (const j of judged) {
      const prev = existing.find((e) => e.spotKey === j.r.spotKey);
      if (prev && prev.ts >= j.r.ts) continue;
      const meter = roundPlan?.spots.find((s) => s.key === j.spot.key)?.fixedMeter ?? null;
      const fixedValues = meter ? await fixedMeterAround(tx, meter.deviceId, j.r.ts) : [];
      const fixedKv = fixedValues.length ? fixedValues.reduce((a, b) => a + b, 0) / fixedValues.length : null;
      const values = {
        surveyId: survey.id,
        spotKey: j.r.spotKey,
        position: j.position,
        pointId: j.spot.pointId,
        ts: j.r.ts,
        enteredValue: j.r.value,
        unit: j.r.unit,
        readKv: toKv(j.r.value, j.r.unit),
        distanceMm: j.r.distanceMm,
        equivalentKv: j.equivalentKv,
        running: j.r.running,
        speedMpm: j.r.speedMpm,
        note: j.r.note,
        fixedDeviceId: meter?.deviceId ?? null,
        fixedKv,
      };
      let readingId: number;
      if (prev) {
        await tx.update(surveyReadings).set(values).where(eq(surveyReadings.id, prev.id));
        await tx.delete(meterCrossChecks).where(eq(meterCrossChecks.readingId, prev.id));
        readingId = prev.id;
      } else {
        const [res] = await tx.insert(surveyReadings).values(values);
        readingId = res.insertId;
      }
      stored++;
      if (meter) {
        const cc = crossCheckFixedMeter({ handheldKv: j.equivalentKv, fixedKv: fixedValues, running: j.r.running, allowedShare: opts.allowedShare ?? DEFAULT_CROSSCHECK_SHARE });
        if (cc.judged) {
          await tx.insert(meterCrossChecks).values({
            deviceId: meter.deviceId,
            surveyId: survey.id,
            readingId,
            ts: j.r.ts,
            handheldKv: cc.handheldKv,
            fixedKv: cc.fixedMeanKv,
            diffShare: cc.diffShare,
            allowedShare: cc.allowedShare,
            flagged: cc.flagged,
          });
        }
      }
    }

    let findingCount = 0;
    const newlyFinished = round.finishedTs !== null && survey.finishedTs === null;
    if (newlyFinished) {
      await tx.update(surveys).set({ finishedTs: round.finishedTs }).where(eq(surveys.id, survey.id));
      const all = await tx.select({ spotKey: surveyReadings.spotKey, equivalentKv: surveyReadings.equivalentKv }).from(surveyReadings).where(eq(surveyReadings.surveyId, survey.id));
      const findings = computeFindings(
        spots.map((s) => ({
          key: s.key,
          name: s.name,
          afterNeutralizer: s.afterNeutralizer,
          limitKv: roundPlan?.spots.find((x) => x.key === s.key)?.limitKv ?? null,
          equivalentKv: all.find((r) => r.spotKey === s.key)?.equivalentKv ?? null,
        })),
      );
      if (findings.length) await tx.insert(surveyFindings).values(findings.map((f) => ({ ...f, surveyId: survey.id })));
      findingCount = findings.length;
      if (survey.resurveyOfActionId) await closeByResurvey(tx, survey.resurveyOfActionId, survey.id, plan.lineId, personId, round.finishedTs ?? nowMs);
    }
    if (created) await writeAudit(tx, { personId, action: "survey.record", subjectType: "survey", subjectId: survey.id, summary: `Survey round received (plan ${round.planId} v${round.planVersion}, ${round.readings.length} readings)` }, nowMs);
    const after = await tx.select({ spotKey: surveyReadings.spotKey, equivalentKv: surveyReadings.equivalentKv, fixedKv: surveyReadings.fixedKv }).from(surveyReadings).where(eq(surveyReadings.surveyId, survey.id)).orderBy(asc(surveyReadings.position));
    return { surveyId: survey.id, created, readingsStored: stored, readings: after, finished: round.finishedTs !== null || survey.finishedTs !== null, findingCount };
  });
}

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

async function closeByResurvey(tx: Tx, actionId: number, surveyId: number, lineId: number, personId: number, ts: number): Promise<void> {
  const action = (await tx.select({ id: surveyActions.id, state: surveyActions.state, surveyId: surveyActions.surveyId }).from(surveyActions).where(eq(surveyActions.id, actionId)).limit(1))[0];
  if (!action || action.state !== "open") return;
  const origin = (await tx.select({ lineId: surveys.lineId }).from(surveys).where(eq(surveys.id, action.surveyId)).limit(1))[0];
  if (!origin || origin.lineId !== lineId) return;
  await tx
    .update(surveyActions)
    .set({ state: "closed", closedTs: ts, closedBy: personId, closeNote: `Closed by re-survey #${surveyId}.`, resurveyId: surveyId })
    .where(and(eq(surveyActions.id, actionId), eq(surveyActions.state, "open")));
}

/** Latest cross-check per fixed meter (for the Devices page): flagged ones say "check calibration". */
export async function latestCrossChecks(db: Db, deviceIds?: number[]): Promise<Map<number, { ts: number; flagged: boolean; diffShare: number; allowedShare: number; count: number }>> {
  const rows = await db
    .select({ deviceId: meterCrossChecks.deviceId, ts: meterCrossChecks.ts, flagged: meterCrossChecks.flagged, diffShare: meterCrossChecks.diffShare, allowedShare: meterCrossChecks.allowedShare })
    .from(meterCrossChecks)
    .where(deviceIds ? inArray(meterCrossChecks.deviceId, deviceIds.length ? deviceIds : [-1]) : undefined)
    .orderBy(asc(meterCrossChecks.ts), asc(meterCrossChecks.id));
  const out = new Map<number, { ts: number; flagged: boolean; diffShare: number; allowedShare: number; count: number }>();
  for (const r of rows) out.set(r.deviceId, { ts: r.ts, flagged: Boolean(r.flagged), diffShare: r.diffShare, allowedShare: r.allowedShare, count: (out.get(r.deviceId)?.count ?? 0) + 1 });
  return out;
}

/** How many surveys a line has had (used by tests and the demo). */
export async function countSurveys(db: Db, clientId?: string): Promise<number> {
  const rows = await db.select({ n: sql<number>`count(*)` }).from(surveys).where(clientId ? eq(surveys.clientId, clientId) : undefined);
  return Number(rows[0]?.n ?? 0);
}

export async function lineIdOfPlan(db: Db, planId: number): Promise<number | null> {
  const row = (await db.select({ lineId: surveyPlans.lineId }).from(surveyPlans).innerJoin(lines, eq(lines.id, surveyPlans.lineId)).where(eq(surveyPlans.id, planId)).limit(1))[0];
  return row?.lineId ?? null;
}
