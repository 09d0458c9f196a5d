// Surveys: the walk-down survey plans by line (lines without fixed meters are surveyed only),
// the rounds taken, and the open actions from their findings.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { listPlans } from "@/db/queries/surveys";
import { listSurveyActions, listSurveys } from "@/db/queries/surveys-report";
import { Card, EmptyState, Forbidden, PageHeader } from "@/components/ui/page";
import { SurveyActionList } from "@/components/surveys/survey-actions";
import { can } from "@/lib/permissions";
import { fmtDateTime, toLocalDateIso } from "../equipment/_components/format";
import { closeSurveyAction } from "./actions";

export const metadata: Metadata = { title: "Surveys" };
export const dynamic = "force-dynamic";

export default async function SurveysPage() {
  const { allowed, session } = await requirePagePermission("view", "/surveys");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Surveys" />
        <Forbidden what="see the surveys" />
      </div>
    );
  }
  const db = getDb();
  const [plans, rounds, actions, plant] = await Promise.all([listPlans(db), listSurveys(db, { limit: 30 }), listSurveyActions(db, { state: "open" }), getPlantSettings(db)]);
  const tz = plant.timeZone;
  const canPlan = can(session.role, "survey.plan");
  const canRecord = can(session.role, "survey.record");
  return (
    <div className="max-w-5xl">
      <PageHeader
        title="Surveys"
        subtitle="Walk-down rounds with a handheld field meter, point by point along the web path, before and after each neutralizer."
        actions={
          canPlan ? (
            <Link href="/surveys/plans/new" className="rounded bg-brand px-3 py-1.5 text-sm font-medium text-white hover:bg-brand-deep">
              New plan
            </Link>
          ) : null
        }
      />
      <div className="space-y-5">
        <Card title="Plans">
          {plans.length === 0 ? (
            <EmptyState title="No survey plans yet">{canPlan ? "Make the first one with “New plan”." : "An engineer makes the plans."}</EmptyState>
          ) : (
            <ul className="divide-y divide-paper-line" data-testid="plan-list">
              {plans.map((p) => (
                <li key={p.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2" data-testid="plan-row" data-plan={p.name}>
                  <div className="min-w-0 flex-1">
                    <p className="font-medium text-ink">
                      {p.lineName} · {p.name}
                    </p>
                    <p className="text-xs text-ink-faint">
                      {p.areaName} · {p.spotCount} spots · version {p.currentVersion}
                      {p.surveyOnly ? " · no fixed meters: surveyed only" : ""} · {p.surveyCount} {p.surveyCount === 1 ? "round" : "rounds"}
                      {p.lastSurveyTs ? `, last ${fmtDateTime(p.lastSurveyTs, tz)}` : ""}
                    </p>
                  </div>
                  <div className="flex gap-2">
                    {canPlan ? (
                      <Link href={`/surveys/plans/${p.id}`} className="rounded border border-paper-line px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk">
                        Edit
                      </Link>
                    ) : null}
                    {canRecord ? (
                      <Link href={`/surveys/plans/${p.id}/round`} className="rounded bg-brand px-3 py-1.5 text-sm font-medium text-white hover:bg-brand-deep">
                        Walk the round
                      </Link>
                    ) : null}
                  </div>
                </li>
              ))}
            </ul>
          )}
        </Card>

        <Card title={`Open actions (${actions.length})`}>
          <SurveyActionList actions={actions} canClose={canRecord} closeAction={closeSurveyAction} today={toLocalDateIso(Date.now(), tz)} />
        </Card>

        <Card title="Rounds">
          {rounds.length === 0 ? (
            <EmptyState title="No rounds yet">A round appears here once the phone has sent it.</EmptyState>
          ) : (
            <ul className="divide-y divide-paper-line" data-testid="survey-list">
              {rounds.map((r) => (
                <li key={r.id} className="py-2">
                  <Link href={`/surveys/${r.id}`} className="font-medium text-brand hover:underline">
                    {r.lineName} · {r.planName} v{r.planVersion}
                  </Link>
                  <p className="text-xs text-ink-faint">
                    {fmtDateTime(r.startedTs, tz)} · {r.personName ?? "—"} · {r.readingCount} readings · {r.findingCount} findings
                    {r.openActionCount ? ` · ${r.openActionCount} open actions` : ""}
                    {r.resurveyOfActionId ? " · re-survey" : ""}
                    {r.finishedTs === null ? " · not finished" : ""}
                  </p>
                </li>
              ))}
            </ul>
          )}
        </Card>
      </div>
    </div>
  );
}
