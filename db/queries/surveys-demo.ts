// Writes the demo survey-only line and its survey history (lib/surveys/demo.ts) through the same
// code the app uses (savePlan, storeRound, createSurveyAction), so the demo shows real findings.
import { eq } from "drizzle-orm";
import type { Db } from "../client";
import { areas, lines, people, surveyFindings } from "../schema";
import { savePlan } from "./surveys";
import { storeRound } from "./surveys-rounds";
import { createSurveyAction } from "./surveys-report";
import { DEMO_FIRST_SURVEY, DEMO_FULL_PLAN, DEMO_METER, DEMO_QUICK_PLAN, DEMO_RESURVEY, DEMO_SURVEY_LINE } from "../../lib/surveys/demo";
import { DAY_MS } from "../../lib/vocabulary/time";

const isoDate = (ms: number) => new Date(ms).toISOString().slice(0, 10);

export async function seedDemoSurveys(db: Db, nowMs: number): Promise<void> {
  const area = (await db.select({ id: areas.id }).from(areas).where(eq(areas.slug, DEMO_SURVEY_LINE.areaSlug)).limit(1))[0];
  if (!area) return;
  const person = async (email: string) => (await db.select({ id: people.id }).from(people).where(eq(people.email, email)).limit(1))[0]?.id ?? null;
  const engineerId = await person("engineer@harrowfen.example");
  const leadId = await person("lead@harrowfen.example");
  if (!engineerId || !leadId) return;
  const [res] = await db.insert(lines).values({
    areaId: area.id,
    slug: DEMO_SURVEY_LINE.slug,
    name: DEMO_SURVEY_LINE.name,
    kind: DEMO_SURVEY_LINE.kind,
    nominalSpeedMpm: DEMO_SURVEY_LINE.nominalSpeedMpm,
    material: DEMO_SURVEY_LINE.material,
    displayOrder: 50,
  });
  const lineId = res.insertId;
  const full = await savePlan(db, { lineId, name: DEMO_FULL_PLAN.name, comment: "Every idler group and both bars", spots: DEMO_FULL_PLAN.spots }, engineerId, nowMs - 30 * DAY_MS);
  await savePlan(db, { lineId, name: DEMO_QUICK_PLAN.name, comment: "Unwind, knife, rewind", spots: DEMO_QUICK_PLAN.spots }, engineerId, nowMs - 30 * DAY_MS);

  const round = (s: typeof DEMO_FIRST_SURVEY, resurveyOfActionId: number | null) => {
    const start = nowMs - s.daysAgo * DAY_MS;
    return {
      clientId: s.clientId,
      planId: full.planId,
      planVersion: full.version,
      startedTs: start,
      finishedTs: start + (s.readings.length + 2) * 60_000,
      meterLabel: DEMO_METER.label,
      meterCalibratedOn: DEMO_METER.calibratedOn,
      calibratedDistanceMm: DEMO_METER.calibratedDistanceMm,
      note: resurveyOfActionId ? "Re-survey after cleaning bar S2-1." : "Winter round; web charging hard at the unwind.",
      resurveyOfActionId,
      readings: s.readings.map(([spotKey, value, distanceMm], i) => ({ spotKey, ts: start + (i + 1) * 60_000, value, unit: "kV" as const, distanceMm, running: true, speedMpm: 380, note: null })),
    };
  };
  const first = await storeRound(db, round(DEMO_FIRST_SURVEY, null), leadId, nowMs - DEMO_FIRST_SURVEY.daysAgo * DAY_MS);
  const findings = await db.select({ id: surveyFindings.id, kind: surveyFindings.kind, spotKey: surveyFindings.spotKey }).from(surveyFindings).where(eq(surveyFindings.surveyId, first.surveyId));
  const low = findings.find((f) => f.kind === "low_reduction");
  const build = findings.find((f) => f.kind === "charge_build");
  const firstStart = nowMs - DEMO_FIRST_SURVEY.daysAgo * DAY_MS;
  const cleanId = await createSurveyAction(
    db,
    { surveyId: first.surveyId, findingId: low?.id, kind: "clean_bar", text: "Clean bar S2-1 at the unwind (ink mist on the emitters), then re-survey the unwind.", ownerId: leadId, dueDate: isoDate(firstStart + 10 * DAY_MS) },
    leadId,
    firstStart + 3_600_000,
  );
  await createSurveyAction(
    db,
    { surveyId: first.surveyId, findingId: build?.id, kind: "check_earthing", text: "Check the earthing of the idlers between the knife and the rewind bar.", ownerId: engineerId, dueDate: isoDate(nowMs + 5 * DAY_MS) },
    leadId,
    firstStart + 3_700_000,
  );
  await storeRound(db, round(DEMO_RESURVEY, cleanId), leadId, nowMs - DEMO_RESURVEY.daysAgo * DAY_MS);
}
