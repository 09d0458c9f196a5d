// A survey plan: create ("new") or edit (a change is saved as a new version; rounds keep the
// version they were taken with). Engineers and admins.
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { getPlanForEdit, listSurveyLines } from "@/db/queries/surveys";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { PlanEditor } from "@/components/surveys/plan-editor";
import { fmtDateTime } from "../../../equipment/_components/format";
import { savePlan } from "../../actions";

export const metadata: Metadata = { title: "Survey plan" };
export const dynamic = "force-dynamic";

export default async function PlanPage({ params }: { params: Promise<{ planId: string }> }) {
  const { planId } = await params;
  const { allowed } = await requirePagePermission("survey.plan", `/surveys/plans/${planId}`);
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Survey plan" />
        <Forbidden what="edit survey plans" />
      </div>
    );
  }
  const db = getDb();
  const isNew = planId === "new";
  if (!isNew && !/^\d{1,9}$/.test(planId)) notFound();
  const [lines, plan, plant] = await Promise.all([listSurveyLines(db), isNew ? null : getPlanForEdit(db, Number(planId)), getPlantSettings(db)]);
  if (!isNew && !plan) notFound();
  return (
    <div className="max-w-3xl space-y-4">
      <nav className="text-xs text-ink-faint">
        <Link href="/surveys" className="hover:underline">
          Surveys
        </Link>{" "}
        / {isNew ? "New plan" : plan!.name}
      </nav>
      <PageHeader title={isNew ? "New survey plan" : `${plan!.name} · version ${plan!.currentVersion}`} subtitle="Spots in web-path order: the line's measuring points and survey-only spots, with the neutralizer each spot sits after." />
      <Card>
        <PlanEditor lines={lines} plan={plan ? { id: plan.id, lineId: plan.lineId, name: plan.name, spots: plan.spots } : null} saveAction={savePlan} />
      </Card>
      {plan ? (
        <Card title="Versions">
          <ul className="space-y-1 text-sm">
            {plan.versions.map((v) => (
              <li key={v.version} className="text-ink-soft">
                <b className="font-medium text-ink">v{v.version}</b> · {fmtDateTime(v.createdTs, plant.timeZone)} · {v.spotCount} spots{v.comment ? ` · ${v.comment}` : ""}
              </li>
            ))}
          </ul>
        </Card>
      ) : null}
    </div>
  );
}
