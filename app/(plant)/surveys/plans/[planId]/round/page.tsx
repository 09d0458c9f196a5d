// The round on a phone: the plan's spots in web-path order, entry that works with no network.
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getRoundPlan } from "@/db/queries/surveys";
import { listSurveyActions } from "@/db/queries/surveys-report";
import { Forbidden, PageHeader } from "@/components/ui/page";
import { Round } from "@/components/surveys/round";
import { SurveyCautions } from "@/components/surveys/survey-cautions";
import { DEFAULT_CALIBRATED_DISTANCE_MM } from "@/lib/surveys/judge";

export const metadata: Metadata = { title: "Survey round" };
export const dynamic = "force-dynamic";

export default async function RoundPage({ params, searchParams }: { params: Promise<{ planId: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { planId } = await params;
  const { allowed } = await requirePagePermission("survey.record", `/surveys/plans/${planId}/round`);
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Survey round" />
        <Forbidden what="record survey rounds" />
      </div>
    );
  }
  if (!/^\d{1,9}$/.test(planId)) notFound();
  const db = getDb();
  const plan = await getRoundPlan(db, Number(planId));
  if (!plan) notFound();
  const sp = await searchParams;
  const resurvey = typeof sp.resurvey === "string" && /^\d{1,9}$/.test(sp.resurvey) ? Number(sp.resurvey) : null;
  const action = resurvey ? (await listSurveyActions(db, { ids: [resurvey] }))[0] : undefined;
  return (
    <div className="mx-auto max-w-xl space-y-3">
      <nav className="text-xs text-ink-faint">
        <Link href="/surveys" className="hover:underline">
          Surveys
        </Link>{" "}
        / Round
      </nav>
      <div>
        <h1 className="text-lg font-semibold text-ink">
          {plan.lineName} · {plan.planName}
        </h1>
        <p className="text-xs text-ink-soft">
          {plan.areaName} · version {plan.version} · {plan.spots.length} spots in web-path order
        </p>
        {action && action.state === "open" ? <p className="mt-1 rounded bg-brand-soft px-2 py-1 text-sm text-brand-deep">Re-survey for the action “{action.text}”: finishing this round closes it.</p> : null}
      </div>
      <SurveyCautions solventName={plan.solventName} compact />
      <Round plan={plan} resurveyOfActionId={action && action.state === "open" ? action.id : null} defaultMeter={{ meterLabel: "Handheld field meter", meterCalibratedOn: null, calibratedDistanceMm: DEFAULT_CALIBRATED_DISTANCE_MM }} />
    </div>
  );
}
