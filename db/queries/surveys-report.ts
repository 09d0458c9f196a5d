// Read models of finished surveys: the list, the full report (spots in web-path order with their
// readings, reductions, photos, findings, actions and cross-checks), actions (the due list shows
// the open ones), and the cross-check history of one fixed meter.
import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../client";
import { areas, devices, lines, meterCrossChecks, people, surveyActions, surveyFindings, surveyPhotos, surveyPlans, surveyReadings, surveys } from "../schema";
import { getRoundPlan } from "./surveys";
import { writeAudit } from "./audit";
import { AppError, notFound } from "../../lib/errors";
import { reductionPct } from "../../lib/surveys/judge";
import type { SurveyActionKind } from "../../lib/surveys/schemas";
import type { CrossCheckView, SurveyActionView, SurveyListItem, SurveyReport } from "../../lib/surveys/types";

export async function listSurveys(db: Db, opts: { planId?: number; limit?: number } = {}): Promise<SurveyListItem[]> {
  const rows = await db
    .select({
      id: surveys.id,
      planId: surveys.planId,
      planName: surveyPlans.name,
      planVersion: surveys.planVersion,
      lineName: lines.name,
      personName: people.name,
      startedTs: surveys.startedTs,
      finishedTs: surveys.finishedTs,
      resurveyOfActionId: surveys.resurveyOfActionId,
    })
    .from(surveys)
    .innerJoin(surveyPlans, eq(surveyPlans.id, surveys.planId))
    .innerJoin(lines, eq(lines.id, surveys.lineId))
    .leftJoin(people, eq(people.id, surveys.personId))
    .where(opts.planId ? eq(surveys.planId, opts.planId) : undefined)
    .orderBy(desc(surveys.startedTs))
    .limit(Math.min(opts.limit ?? 50, 500));
  if (!rows.length) return [];
  const ids = rows.map((r) => r.id);
  const [rc, fc, ac] = await Promise.all([
    db.select({ id: surveyReadings.surveyId, n: sql<number>`count(*)` }).from(surveyReadings).where(inArray(surveyReadings.surveyId, ids)).groupBy(surveyReadings.surveyId),
    db.select({ id: surveyFindings.surveyId, n: sql<number>`count(*)` }).from(surveyFindings).where(inArray(surveyFindings.surveyId, ids)).groupBy(surveyFindings.surveyId),
    db.select({ id: surveyActions.surveyId, n: sql<number>`count(*)` }).from(surveyActions).where(and(inArray(surveyActions.surveyId, ids), eq(surveyActions.state, "open"))).groupBy(surveyActions.surveyId),
  ]);
  const n = (list: { id: number; n: number }[], id: number) => Number(list.find((x) => x.id === id)?.n ?? 0);
  return rows.map((r) => ({ ...r, readingCount: n(rc, r.id), findingCount: n(fc, r.id), openActionCount: n(ac, r.id) }));
}

const actionColumns = {
  id: surveyActions.id,
  surveyId: surveyActions.surveyId,
  findingId: surveyActions.findingId,
  kind: surveyActions.kind,
  text: surveyActions.text,
  ownerId: surveyActions.ownerId,
  ownerName: people.name,
  dueDate: surveyActions.dueDate,
  state: surveyActions.state,
  createdTs: surveyActions.createdTs,
  closedTs: surveyActions.closedTs,
  closeNote: surveyActions.closeNote,
  resurveyId: surveyActions.resurveyId,
  lineName: lines.name,
  planId: surveys.planId,
};

export async function listSurveyActions(db: Db, opts: { surveyId?: number; state?: "open" | "closed"; ids?: number[] } = {}): Promise<SurveyActionView[]> {
  const where = [];
  if (opts.surveyId) where.push(eq(surveyActions.surveyId, opts.surveyId));
  if (opts.state) where.push(eq(surveyActions.state, opts.state));
  if (opts.ids) where.push(inArray(surveyActions.id, opts.ids.length ? opts.ids : [-1]));
  const rows = await db
    .select(actionColumns)
    .from(surveyActions)
    .innerJoin(surveys, eq(surveys.id, surveyActions.surveyId))
    .innerJoin(lines, eq(lines.id, surveys.lineId))
    .leftJoin(people, eq(people.id, surveyActions.ownerId))
    .where(where.length ? and(...where) : undefined)
    .orderBy(asc(surveyActions.dueDate), asc(surveyActions.id));
  return rows.map((r) => ({ ...r, ownerName: r.ownerName ?? "—" }));
}

export async function getSurveyReport(db: Db, surveyId: number): Promise<SurveyReport | null> {
  const s = (
    await db
      .select({ survey: surveys, planName: surveyPlans.name, currentPlanVersion: surveyPlans.currentVersion, lineName: lines.name, areaName: areas.name, solventName: lines.solventName, personName: people.name })
      .from(surveys)
      .innerJoin(surveyPlans, eq(surveyPlans.id, surveys.planId))
      .innerJoin(lines, eq(lines.id, surveys.lineId))
      .innerJoin(areas, eq(areas.id, lines.areaId))
      .leftJoin(people, eq(people.id, surveys.personId))
      .where(eq(surveys.id, surveyId))
      .limit(1)
  )[0];
  if (!s) return null;
  const plan = await getRoundPlan(db, s.survey.planId, s.survey.planVersion);
  const [rs, photos, findings, actions, ccs] = await Promise.all([
    db.select().from(surveyReadings).where(eq(surveyReadings.surveyId, surveyId)),
    db.select({ id: surveyPhotos.id, spotKey: surveyPhotos.spotKey }).from(surveyPhotos).where(eq(surveyPhotos.surveyId, surveyId)),
    db.select().from(surveyFindings).where(eq(surveyFindings.surveyId, surveyId)).orderBy(asc(surveyFindings.id)),
    listSurveyActions(db, { surveyId }),
    listCrossChecks(db, { surveyId }),
  ]);
  const meterCodes = new Map(ccs.map((c) => [c.deviceId, c.deviceCode]));
  const spots = (plan?.spots ?? []).map((spot, i, all) => {
    const r = rs.find((x) => x.spotKey === spot.key) ?? null;
    const prev = i > 0 ? rs.find((x) => x.spotKey === all[i - 1].key) : undefined;
    return {
      key: spot.key,
      name: spot.name,
      pointId: spot.pointId,
      afterNeutralizer: spot.afterNeutralizer,
      position: spot.position,
      limitKv: spot.limitKv,
      reductionPct: spot.afterNeutralizer && r && prev ? reductionPct(prev.equivalentKv, r.equivalentKv) : null,
      reading: r
        ? {
            id: r.id,
            spotKey: r.spotKey,
            ts: r.ts,
            enteredValue: r.enteredValue,
            unit: r.unit,
            readKv: r.readKv,
            distanceMm: r.distanceMm,
            equivalentKv: r.equivalentKv,
            running: Boolean(r.running),
            speedMpm: r.speedMpm,
            note: r.note,
            fixedKv: r.fixedKv,
            fixedCode: r.fixedDeviceId ? (meterCodes.get(r.fixedDeviceId) ?? spot.fixedMeter?.code ?? null) : null,
            photoId: photos.find((p) => p.spotKey === r.spotKey)?.id ?? null,
          }
        : null,
    };
  });
  return {
    id: s.survey.id,
    clientId: s.survey.clientId,
    planId: s.survey.planId,
    planName: s.planName,
    planVersion: s.survey.planVersion,
    currentPlanVersion: s.currentPlanVersion,
    lineId: s.survey.lineId,
    lineName: s.lineName,
    areaName: s.areaName,
    solventName: s.solventName,
    personName: s.personName,
    startedTs: s.survey.startedTs,
    finishedTs: s.survey.finishedTs,
    meterLabel: s.survey.meterLabel,
    meterCalibratedOn: s.survey.meterCalibratedOn,
    calibratedDistanceMm: s.survey.calibratedDistanceMm,
    note: s.survey.note,
    resurveyOfActionId: s.survey.resurveyOfActionId,
    spots,
    findings: findings.map((f) => ({ id: f.id, kind: f.kind, spotKey: f.spotKey, fromSpotKey: f.fromSpotKey, valueKv: f.valueKv, limitKv: f.limitKv, reductionPct: f.reductionPct, text: f.text })),
    actions,
    crossChecks: ccs,
  };
}

export async function listCrossChecks(db: Db, opts: { deviceId?: number; surveyId?: number; limit?: number }): Promise<CrossCheckView[]> {
  const where = [];
  if (opts.deviceId) where.push(eq(meterCrossChecks.deviceId, opts.deviceId));
  if (opts.surveyId) where.push(eq(meterCrossChecks.surveyId, opts.surveyId));
  const rows = await db
    .select({
      id: meterCrossChecks.id,
      deviceId: meterCrossChecks.deviceId,
      deviceCode: devices.code,
      surveyId: meterCrossChecks.surveyId,
      ts: meterCrossChecks.ts,
      handheldKv: meterCrossChecks.handheldKv,
      fixedKv: meterCrossChecks.fixedKv,
      diffShare: meterCrossChecks.diffShare,
      allowedShare: meterCrossChecks.allowedShare,
      flagged: meterCrossChecks.flagged,
    })
    .from(meterCrossChecks)
    .innerJoin(devices, eq(devices.id, meterCrossChecks.deviceId))
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(meterCrossChecks.ts), desc(meterCrossChecks.id))
    .limit(Math.min(opts.limit ?? 100, 1000));
  return rows.map((r) => ({ ...r, flagged: Boolean(r.flagged) }));
}

export async function listOwnerOptions(db: Db): Promise<{ id: number; name: string }[]> {
  return db.select({ id: people.id, name: people.name }).from(people).where(and(eq(people.active, true), inArray(people.role, ["shift_lead", "engineer", "admin"]))).orderBy(asc(people.name));
}

export async function createSurveyAction(
  db: Db,
  input: { surveyId: number; findingId?: number; kind: SurveyActionKind; text: string; ownerId: number; dueDate: string },
  personId: number,
  nowMs = Date.now(),
): Promise<number> {
  const survey = (await db.select({ id: surveys.id }).from(surveys).where(eq(surveys.id, input.surveyId)).limit(1))[0];
  if (!survey) throw notFound("No such survey.");
  if (input.findingId) {
    const f = (await db.select({ surveyId: surveyFindings.surveyId }).from(surveyFindings).where(eq(surveyFindings.id, input.findingId)).limit(1))[0];
    if (!f || f.surveyId !== input.surveyId) throw new AppError("bad_input", "That finding is not from this survey.", { findingId: ["Not from this survey"] });
  }
  const owner = (await db.select({ id: people.id }).from(people).where(and(eq(people.id, input.ownerId), eq(people.active, true))).limit(1))[0];
  if (!owner) throw new AppError("bad_input", "Pick an active person as owner.", { ownerId: ["Pick an active person"] });
  const [res] = await db.insert(surveyActions).values({ ...input, findingId: input.findingId ?? null, state: "open", createdTs: nowMs, createdBy: personId });
  await writeAudit(db, { personId, action: "survey.action", subjectType: "survey_action", subjectId: res.insertId, summary: `Action from survey #${input.surveyId}: ${input.text.slice(0, 200)}` }, nowMs);
  return res.insertId;
}

export async function closeSurveyAction(db: Db, input: { actionId: number; note: string }, personId: number, nowMs = Date.now()): Promise<void> {
  const a = (await db.select({ state: surveyActions.state }).from(surveyActions).where(eq(surveyActions.id, input.actionId)).limit(1))[0];
  if (!a) throw notFound("No such action.");
  if (a.state === "closed") throw new AppError("conflict", "This action is already closed.");
  await db.update(surveyActions).set({ state: "closed", closedTs: nowMs, closedBy: personId, closeNote: input.note }).where(and(eq(surveyActions.id, input.actionId), eq(surveyActions.state, "open")));
  await writeAudit(db, { personId, action: "survey.action.close", subjectType: "survey_action", subjectId: input.actionId, summary: `Closed: ${input.note.slice(0, 200)}` }, nowMs);
}

/** A stored survey photo's keys, for the photo route. */
export async function getSurveyPhoto(db: Db, id: number) {
  return (await db.select().from(surveyPhotos).where(eq(surveyPhotos.id, id)).limit(1))[0] ?? null;
}

export async function getSurveyIdByClientId(db: Db, clientId: string): Promise<number | null> {
  return (await db.select({ id: surveys.id }).from(surveys).where(eq(surveys.clientId, clientId)).limit(1))[0]?.id ?? null;
}

export async function insertSurveyPhoto(db: Db, values: typeof surveyPhotos.$inferInsert): Promise<{ id: number; created: boolean }> {
  const [res] = await db.insert(surveyPhotos).ignore().values(values);
  if (res.affectedRows === 1) return { id: res.insertId, created: true };
  const row = (await db.select({ id: surveyPhotos.id }).from(surveyPhotos).where(and(eq(surveyPhotos.surveyId, values.surveyId), eq(surveyPhotos.spotKey, values.spotKey))).limit(1))[0];
  return { id: row?.id ?? 0, created: false };
}
