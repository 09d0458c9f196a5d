// Checks: the due list by hall (and the weekly e-mail of it), the technician's check form with
// pass/fail against the limits per neutralizer kind, recent checks, and the limits with their
// sources.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { CHECK_LIMIT_SOURCES, getCheckLimits, listChecks, NEUTRALIZER_KIND_LABELS } from "@/db/queries/checks";
import { getDueList } from "@/db/queries/due-list";
import { listSurveyActions } from "@/db/queries/surveys-report";
import { SurveyActionList } from "@/components/surveys/survey-actions";
import { closeSurveyAction } from "../surveys/actions";
import { getPlantSettings, listNeutralizers } from "@/db/queries/equipment";
import { NEUTRALIZER_KINDS, NEUTRALIZER_KIND_SPECS } from "@/lib/physics/neutralizer-kinds";
import { CHECK_STANDARD_EDITIONS } from "@/lib/physics/neutralizer";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { can } from "@/lib/permissions";
import { CheckResultBadge } from "../equipment/_components/badges";
import { HighVoltageCaution } from "../equipment/_components/caution";
import { fmtDate, fmtDateTime, fmtNumber, fmtSigned, toLocalDateIso, toLocalInput } from "../equipment/_components/format";
import { DueListView } from "./_components/due-list";
import { LimitsForm } from "./_components/limits-form";
import { RecordCheckForm } from "./_components/record-check-form";
import { SendDueListButton } from "./_components/send-due-list";

export const metadata: Metadata = { title: "Checks" };
export const dynamic = "force-dynamic";

export default async function ChecksPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { allowed, session } = await requirePagePermission("view", "/checks");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Checks" />
        <Forbidden what="see the checks" />
      </div>
    );
  }
  const sp = await searchParams;
  const pre = typeof sp.neutralizer === "string" && /^\d{1,9}$/.test(sp.neutralizer) ? Number(sp.neutralizer) : null;
  const db = getDb();
  const nowMs = Date.now();
  const [due, recent, limits, ns, plant] = await Promise.all([getDueList(db, nowMs), listChecks(db, { limit: 15 }), getCheckLimits(db), listNeutralizers(db), getPlantSettings(db)]);
  const tz = plant.timeZone;
  const surveyActions = await listSurveyActions(db, { state: "open" });
  const canRecord = can(session.role, "check.record");
  const canEdit = can(session.role, "equipment.edit");
  const options = ns.filter((n) => n.state !== "removed").map((n) => ({ id: n.id, tag: n.tag, group: n.lineName ? `${n.areaName} — ${n.lineName}` : "Not placed" }));

  return (
    <div>
      <PageHeader
        title="Checks"
        subtitle={`Verification of neutralizers by the charged-plate method (${CHECK_STANDARD_EDITIONS.testMethodAnsi}, ${CHECK_STANDARD_EDITIONS.testMethodIec}) or a periodic check (${CHECK_STANDARD_EDITIONS.periodic}), and what is due.`}
        actions={
          can(session.role, "import.run") ? (
            <Link href="/checks/import" className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk">
              Import a CSV log
            </Link>
          ) : null
        }
      />
      <div className="mb-5">
        <HighVoltageCaution />
      </div>

      <div className="grid grid-cols-[minmax(0,1fr)] gap-5 xl:grid-cols-[minmax(0,1fr)_26rem]">
        <div className="space-y-5">
          <Card
            title={
              <span className="flex items-center gap-2">
                Due list
                <span className="text-xs font-normal text-ink-soft" data-testid="due-counts">
                  {due.overdueCount} overdue · {due.dueSoonCount} due within {due.horizonDays} days
                </span>
              </span>
            }
            aside={canEdit ? <SendDueListButton /> : null}
          >
            <DueListView list={due} timeZone={tz} />
            <p className="mt-3 text-xs text-ink-faint">
              The list goes by e-mail every week to the people on the maintenance list. A neutralizer never cleaned or checked is due from its installation date.
            </p>
          </Card>

          <Card title={`Actions from surveys (${surveyActions.length} open)`}>
            <SurveyActionList actions={surveyActions} canClose={can(session.role, "survey.record")} closeAction={closeSurveyAction} today={toLocalDateIso(nowMs, tz)} />
          </Card>

          <Card title="Recent checks">
            {recent.length === 0 ? (
              <p className="text-sm text-ink-faint">No checks recorded yet.</p>
            ) : (
              <div className="-mx-4 -my-2 overflow-x-auto">
                <table className="w-full min-w-[44rem] text-sm" data-testid="recent-checks">
                  <thead className="text-left text-xs text-ink-faint">
                    <tr>
                      <th className="px-4 py-2 font-medium">When</th>
                      <th className="py-2 pr-3 font-medium">Neutralizer</th>
                      <th className="py-2 pr-3 text-right font-medium">Decay +</th>
                      <th className="py-2 pr-3 text-right font-medium">Decay −</th>
                      <th className="py-2 pr-3 text-right font-medium">Offset</th>
                      <th className="py-2 pr-3 font-medium">Result</th>
                      <th className="py-2 pr-4 font-medium">By</th>
                    </tr>
                  </thead>
                  <tbody>
                    {recent.map((c) => (
                      <tr key={c.id} className="border-t border-paper-line" data-testid="recent-check" data-tag={c.tag}>
                        <td className="num px-4 py-1.5 text-ink-soft">{fmtDateTime(c.ts, tz)}</td>
                        <td className="py-1.5 pr-3">
                          <Link href={`/equipment/${c.neutralizerId}`} className="text-brand hover:underline">
                            {c.tag}
                          </Link>
                        </td>
                        <td className="num py-1.5 pr-3 text-right">{fmtNumber(c.decayPosS, 1, "s")}</td>
                        <td className="num py-1.5 pr-3 text-right">{fmtNumber(c.decayNegS, 1, "s")}</td>
                        <td className="num py-1.5 pr-3 text-right">{fmtSigned(c.offsetV, 0, "V")}</td>
                        <td className="py-1.5 pr-3">
                          <CheckResultBadge passed={c.passed} />
                        </td>
                        <td className="py-1.5 pr-4 text-xs text-ink-soft">{c.imported ? `${c.personName ?? "—"} (import)` : (c.personName ?? "—")}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
          </Card>
        </div>

        <div className="space-y-5">
          {canRecord ? (
            <Card title={<span id="record">Record a check</span>}>
              <RecordCheckForm options={options} preselect={pre} nowLocal={toLocalInput(nowMs, tz)} />
            </Card>
          ) : null}
          <Card title="Limits per kind" aside={limits.updatedAt ? <span className="text-xs text-ink-faint">saved {fmtDate(limits.updatedAt, tz)}{limits.updatedByName ? ` by ${limits.updatedByName}` : ""}</span> : null}>
            <LimitsForm
              canEdit={canEdit}
              rows={NEUTRALIZER_KINDS.map((k) => ({ kind: k, label: NEUTRALIZER_KIND_LABELS[k], ...limits.byKind[k] }))}
            />
            <div className="mt-3 space-y-1.5 border-t border-paper-line pt-3 text-xs leading-relaxed text-ink-soft" data-testid="limit-sources">
              <p>
                <b className="font-medium text-ink">Decay time.</b> {CHECK_LIMIT_SOURCES.maxDecayS}
              </p>
              <p>
                <b className="font-medium text-ink">Offset.</b> {CHECK_LIMIT_SOURCES.maxOffsetAbsV}
              </p>
              <p>
                <b className="font-medium text-ink">Plate.</b> {CHECK_LIMIT_SOURCES.plate}
              </p>
              <table className="mt-2 w-full text-xs" data-testid="kind-defaults">
                <thead className="text-left text-ink-faint">
                  <tr>
                    <th className="pb-1 font-medium">Kind</th>
                    <th className="pb-1 text-right font-medium">Usual distance</th>
                    <th className="pb-1 text-right font-medium">Default decay</th>
                  </tr>
                </thead>
                <tbody>
                  {NEUTRALIZER_KINDS.map((k) => {
                    const spec = NEUTRALIZER_KIND_SPECS[k];
                    return (
                      <tr key={k} className="border-t border-paper-line align-top" title={spec.source}>
                        <td className="py-1 pr-2">
                          {spec.label}
                          <span className="block text-ink-faint">{spec.source}</span>
                          {spec.checkNote ? <span className="block text-ink-faint">{spec.checkNote}</span> : null}
                        </td>
                        <td className="num py-1 pr-2 text-right whitespace-nowrap">{spec.mountingMinMm !== null ? `${spec.mountingMinMm}–${spec.mountingMaxMm} mm` : "—"}</td>
                        <td className="num py-1 text-right whitespace-nowrap">{spec.defaultMaxDecayS} s</td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
              <p>A check passes when both decay times are at or under the limit and the offset is within ± the limit; a part not measured fails.</p>
            </div>
          </Card>
        </div>
      </div>
    </div>
  );
}
