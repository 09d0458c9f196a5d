// One survey's report: printable, and as PDF and CSV. Findings turn into actions on the due list.
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { getSurveyReport, listOwnerOptions } from "@/db/queries/surveys-report";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { PrintButton } from "@/components/reports/print-button";
import { NewActionForm, SurveyActionList } from "@/components/surveys/survey-actions";
import { SurveyCautions } from "@/components/surveys/survey-cautions";
import { LineSketch, SpotReadings } from "@/components/surveys/survey-report-view";
import { StateBadge } from "@/components/ui/state-badge";
import { can } from "@/lib/permissions";
import { FINDING_LABELS } from "@/lib/surveys/findings";
import { fmtDateTime, toLocalDateIso } from "../../equipment/_components/format";
import { closeSurveyAction, createSurveyAction } from "../actions";

export const metadata: Metadata = { title: "Survey report" };
export const dynamic = "force-dynamic";

export default async function SurveyReportPage({ params }: { params: Promise<{ surveyId: string }> }) {
  const { surveyId } = await params;
  const { allowed, session } = await requirePagePermission("view", `/surveys/${surveyId}`);
  if (!allowed) return <Forbidden what="see survey reports" />;
  if (!/^\d{1,9}$/.test(surveyId)) notFound();
  const db = getDb();
  const [rep, plant, owners] = await Promise.all([getSurveyReport(db, Number(surveyId)), getPlantSettings(db), listOwnerOptions(db)]);
  if (!rep) notFound();
  const tz = plant.timeZone;
  const canRecord = can(session.role, "survey.record");
  const nowMs = Date.now();
  const today = toLocalDateIso(nowMs, tz);
  const actionFor = new Set(rep.actions.map((a) => a.findingId));
  return (
    <div className="max-w-4xl space-y-4">
      <nav className="no-print text-xs text-ink-faint">
        <Link href="/surveys" className="hover:underline">
          Surveys
        </Link>{" "}
        / Survey #{rep.id}
      </nav>
      <PageHeader
        title={`${rep.lineName} — survey #${rep.id}`}
        subtitle={
          <>
            {rep.areaName} · plan “{rep.planName}” version {rep.planVersion}
            {rep.planVersion !== rep.currentPlanVersion ? ` (the plan is now at version ${rep.currentPlanVersion}; this round is kept against the version it was taken with)` : ""} · {fmtDateTime(rep.startedTs, tz)}
            {rep.finishedTs ? ` – ${fmtDateTime(rep.finishedTs, tz)}` : " · not finished"} · {rep.personName ?? "—"}
          </>
        }
        actions={
          <span className="no-print flex flex-wrap gap-2">
            <a href={`/api/surveys/${rep.id}/pdf`} className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk" data-testid="pdf-link">
              PDF
            </a>
            <a href={`/api/surveys/${rep.id}/csv`} className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk">
              CSV
            </a>
            <PrintButton />
          </span>
        }
      />
      <p className="text-sm text-ink-soft">
        Meter: {rep.meterLabel} · calibrated {rep.meterCalibratedOn ?? "(date not given)"} · reads at {rep.calibratedDistanceMm} mm. Values are the flat-surface equivalent at that distance.
        {rep.note ? ` Note: ${rep.note}` : ""}
      </p>
      <SurveyCautions solventName={rep.solventName} />
      <Card title="Line in web-path order">
        <LineSketch spots={rep.spots} />
      </Card>
      <Card title="Findings" aside={<span className="text-xs text-ink-faint">{rep.findings.length} found</span>}>
        {rep.findings.length === 0 ? (
          <p className="text-sm text-ink-faint">{rep.finishedTs ? "No findings: every point within its limit, bars reducing well, no charge building up." : "Findings are worked out when the round is finished."}</p>
        ) : (
          <ul className="divide-y divide-paper-line" data-testid="findings">
            {rep.findings.map((f) => (
              <li key={f.id} className="py-2" data-testid="finding" data-kind={f.kind}>
                <p className="flex flex-wrap items-center gap-2 text-sm">
                  <StateBadge state={f.kind === "over_limit" ? "over" : "near"} label={FINDING_LABELS[f.kind]} />
                  <span className="text-ink">{f.text}</span>
                </p>
                {canRecord && !actionFor.has(f.id) ? <NewActionForm surveyId={rep.id} finding={f} owners={owners} defaultDue={toLocalDateIso(nowMs + 7 * 86_400_000, tz)} createAction={createSurveyAction} /> : null}
              </li>
            ))}
          </ul>
        )}
      </Card>
      <Card title="Actions">
        <SurveyActionList actions={rep.actions} canClose={canRecord} closeAction={closeSurveyAction} today={today} />
      </Card>
      <Card title="Readings">
        <SpotReadings report={rep} />
      </Card>
      {rep.crossChecks.length ? (
        <Card title="Fixed-meter cross-checks">
          <ul className="space-y-1 text-sm" data-testid="cross-checks">
            {rep.crossChecks.map((c) => (
              <li key={c.id}>
                <Link href={`/devices/${c.deviceId}`} className="text-brand hover:underline">
                  {c.deviceCode}
                </Link>
                : fixed {c.fixedKv.toFixed(1)} kV against handheld {c.handheldKv.toFixed(1)} kV, {Math.round(c.diffShare * 100)} % apart (allowed {Math.round(c.allowedShare * 100)} %){" "}
                {c.flagged ? <StateBadge state="over" label="Check calibration" /> : <StateBadge state="normal" label="Agrees" />}
              </li>
            ))}
          </ul>
        </Card>
      ) : null}
    </div>
  );
}
