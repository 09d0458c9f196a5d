// Survey plans (versioned, spots in web-path order) and the lines they can be made for, and the
// plan as the round page needs it (limits, last survey, fixed meters per spot).
import { and, asc, desc, eq, inArray, isNotNull } from "drizzle-orm";
import type { Db } from "../client";
import { areas, devices, lines, neutralizers, points, surveyPlans, surveyPlanVersions, surveyReadings, surveys } from "../schema";
import { listLimitRules } from "./limits";
import { chartChargeLimit } from "../../lib/rules/limits-in-force";
import { AppError, notFound } from "../../lib/errors";
import type { PlanSpot } from "../../lib/surveys/schemas";
import type { RoundPlan, SurveyLineOption, SurveyPlanSummary } from "../../lib/surveys/types";

export async function listSurveyLines(db: Db): Promise<SurveyLineOption[]> {
  const [lineRows, pointRows, meterRows, nRows] = await Promise.all([
    db
      .select({ id: lines.id, name: lines.name, areaName: areas.name, solventName: lines.solventName })
      .from(lines)
      .innerJoin(areas, eq(areas.id, lines.areaId))
      .orderBy(asc(areas.displayOrder), asc(lines.displayOrder), asc(lines.id)),
    db.select({ id: points.id, lineId: points.lineId, name: points.name, position: points.position }).from(points).orderBy(asc(points.position)),
    db.select({ id: devices.id, code: devices.code, pointId: devices.pointId, lineId: devices.lineId }).from(devices).where(and(eq(devices.kind, "field_meter"), eq(devices.enabled, true))),
    db.select({ tag: neutralizers.tag, pointId: neutralizers.pointId, state: neutralizers.state }).from(neutralizers),
  ]);
  return lineRows.map((l) => {
    const pts = pointRows
      .filter((p) => p.lineId === l.id)
      .map((p) => {
        const m = meterRows.find((d) => d.pointId === p.id);
        const n = nRows.find((x) => x.pointId === p.id && x.state !== "removed");
        return { id: p.id, name: p.name, position: p.position, fixedMeterId: m?.id ?? null, fixedMeterCode: m?.code ?? null, neutralizerTag: n?.tag ?? null };
      });
    return { ...l, surveyOnly: !meterRows.some((d) => d.lineId === l.id), points: pts };
  });
}

export async function listPlans(db: Db): Promise<SurveyPlanSummary[]> {
  const [planRows, lineOpts, surveyRows] = await Promise.all([
    db
      .select({ id: surveyPlans.id, lineId: surveyPlans.lineId, name: surveyPlans.name, currentVersion: surveyPlans.currentVersion, spots: surveyPlanVersions.spots })
      .from(surveyPlans)
      .innerJoin(surveyPlanVersions, and(eq(surveyPlanVersions.planId, surveyPlans.id), eq(surveyPlanVersions.version, surveyPlans.currentVersion)))
      .where(eq(surveyPlans.archived, false))
      .orderBy(asc(surveyPlans.lineId), asc(surveyPlans.name)),
    listSurveyLines(db),
    db.select({ planId: surveys.planId, startedTs: surveys.startedTs }).from(surveys),
  ]);
  return planRows.map((p) => {
    const l = lineOpts.find((x) => x.id === p.lineId);
    const mine = surveyRows.filter((s) => s.planId === p.id);
    return {
      id: p.id,
      lineId: p.lineId,
      lineName: l?.name ?? "?",
      areaName: l?.areaName ?? "?",
      surveyOnly: l?.surveyOnly ?? false,
      name: p.name,
      currentVersion: p.currentVersion,
      spotCount: p.spots.length,
      surveyCount: mine.length,
      lastSurveyTs: mine.length ? Math.max(...mine.map((s) => s.startedTs)) : null,
    };
  });
}

export type PlanForEdit = {
  id: number;
  lineId: number;
  name: string;
  currentVersion: number;
  spots: PlanSpot[];
  versions: { version: number; createdTs: number; comment: string | null; spotCount: number }[];
};

export async function getPlanForEdit(db: Db, planId: number): Promise<PlanForEdit | null> {
  const plan = (await db.select().from(surveyPlans).where(eq(surveyPlans.id, planId)).limit(1))[0];
  if (!plan) return null;
  const versions = await db.select().from(surveyPlanVersions).where(eq(surveyPlanVersions.planId, planId)).orderBy(desc(surveyPlanVersions.version));
  const current = versions.find((v) => v.version === plan.currentVersion);
  return {
    id: plan.id,
    lineId: plan.lineId,
    name: plan.name,
    currentVersion: plan.currentVersion,
    spots: current?.spots ?? [],
    versions: versions.map((v) => ({ version: v.version, createdTs: v.createdTs, comment: v.comment, spotCount: v.spots.length })),
  };
}

/** The spots of one version of a plan, or null. */
export async function getPlanVersionSpots(db: Pick<Db, "select">, planId: number, version: number): Promise<PlanSpot[] | null> {
  const row = (await db.select({ spots: surveyPlanVersions.spots }).from(surveyPlanVersions).where(and(eq(surveyPlanVersions.planId, planId), eq(surveyPlanVersions.version, version))).limit(1))[0];
  return row?.spots ?? null;
}

/**
 * Creates a plan, or saves a new version of it when its spots or name changed. Earlier versions
 * stay: surveys taken with them keep pointing at them.
 */
export async function savePlan(
  db: Db,
  input: { planId?: number; lineId: number; name: string; comment: string; spots: PlanSpot[] },
  personId: number,
  nowMs = Date.now(),
): Promise<{ planId: number; version: number; changed: boolean }> {
  const line = (await db.select({ id: lines.id }).from(lines).where(eq(lines.id, input.lineId)).limit(1))[0];
  if (!line) throw notFound("No such line.");
  const pointIds = input.spots.map((s) => s.pointId).filter((x): x is number => x !== null);
  if (pointIds.length) {
    const found = await db.select({ id: points.id }).from(points).where(and(inArray(points.id, pointIds), eq(points.lineId, input.lineId)));
    if (found.length !== new Set(pointIds).size) throw new AppError("bad_input", "A spot names a point that is not on this line.", { spots: ["A point is not on this line"] });
  }
  return db.transaction(async (tx) => {
    if (!input.planId) {
      const [res] = await tx.insert(surveyPlans).values({ lineId: input.lineId, name: input.name, currentVersion: 1, createdTs: nowMs });
      await tx.insert(surveyPlanVersions).values({ planId: res.insertId, version: 1, spots: input.spots, comment: input.comment || "First version", personId, createdTs: nowMs });
      return { planId: res.insertId, version: 1, changed: true };
    }
    const plan = (await tx.select().from(surveyPlans).where(eq(surveyPlans.id, input.planId)).for("update").limit(1))[0];
    if (!plan) throw notFound("No such plan.");
    if (plan.lineId !== input.lineId) throw new AppError("bad_input", "A plan stays on its line; make a new plan for another line.", { lineId: ["A plan stays on its line"] });
    const current = await getPlanVersionSpots(tx, plan.id, plan.currentVersion);
    const same = JSON.stringify(current) === JSON.stringify(input.spots);
    if (same) {
      if (plan.name !== input.name) await tx.update(surveyPlans).set({ name: input.name }).where(eq(surveyPlans.id, plan.id));
      return { planId: plan.id, version: plan.currentVersion, changed: plan.name !== input.name };
    }
    const version = plan.currentVersion + 1;
    await tx.insert(surveyPlanVersions).values({ planId: plan.id, version, spots: input.spots, comment: input.comment || null, personId, createdTs: nowMs });
    await tx.update(surveyPlans).set({ currentVersion: version, name: input.name }).where(eq(surveyPlans.id, plan.id));
    return { planId: plan.id, version, changed: true };
  });
}

/** The plan as the round page needs it: spots with limits, the last survey and fixed meters. */
export async function getRoundPlan(db: Db, planId: number, version?: number): Promise<RoundPlan | null> {
  const plan = (await db.select().from(surveyPlans).where(eq(surveyPlans.id, planId)).limit(1))[0];
  if (!plan) return null;
  const v = version ?? plan.currentVersion;
  const spots = await getPlanVersionSpots(db, planId, v);
  if (!spots) return null;
  const line = (await db.select({ id: lines.id, name: lines.name, areaId: lines.areaId, areaName: areas.name, solventName: lines.solventName }).from(lines).innerJoin(areas, eq(areas.id, lines.areaId)).where(eq(lines.id, plan.lineId)).limit(1))[0];
  if (!line) return null;
  const [rules, meters, last] = await Promise.all([
    listLimitRules(db),
    db.select({ id: devices.id, code: devices.code, pointId: devices.pointId }).from(devices).where(and(eq(devices.kind, "field_meter"), eq(devices.enabled, true), eq(devices.lineId, line.id))),
    db
      .select({ id: surveys.id })
      .from(surveys)
      .where(and(eq(surveys.planId, planId), isNotNull(surveys.finishedTs)))
      .orderBy(desc(surveys.startedTs))
      .limit(1),
  ]);
  const lastReadings = last[0] ? await db.select({ spotKey: surveyReadings.spotKey, equivalentKv: surveyReadings.equivalentKv, ts: surveyReadings.ts }).from(surveyReadings).where(eq(surveyReadings.surveyId, last[0].id)) : [];
  return {
    planId,
    planName: plan.name,
    version: v,
    lineId: line.id,
    lineName: line.name,
    areaName: line.areaName,
    solventName: line.solventName,
    spots: spots.map((s, i) => {
      const m = s.pointId !== null ? meters.find((d) => d.pointId === s.pointId) : undefined;
      const lr = lastReadings.find((r) => r.spotKey === s.key);
      return {
        ...s,
        position: i + 1,
        limitKv: chartChargeLimit({ pointId: s.pointId ?? -1, lineId: line.id, areaId: line.areaId }, rules)?.limitKv ?? null,
        last: lr ? { equivalentKv: lr.equivalentKv, ts: lr.ts } : null,
        fixedMeter: m ? { deviceId: m.id, code: m.code } : null,
      };
    }),
  };
}
