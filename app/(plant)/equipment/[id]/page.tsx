// One neutralizer: its record, effect (charge before vs after it), decay-time trend across checks
// with the projected cleaning date, checks with their attachments, history, uploads; engineers
// record a cleaning, edit it, add notes and files here.
import { SettingsWarnings } from "@/components/equipment/settings-warnings";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { CHECK_LIMIT_SOURCES, NEUTRALIZER_KIND_LABELS, type DecayProjection } from "@/db/queries/checks";
import { NEUTRALIZER_KIND_SPECS } from "@/lib/physics/neutralizer-kinds";
import { CHECK_STANDARD_EDITIONS } from "@/lib/physics/neutralizer";
import { getNeutralizerDetail, getPlaceOptions, getPlantSettings, type EffectFigure } from "@/db/queries/equipment";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { neutralizerWarnings } from "@/lib/equipment-warnings";
import { can } from "@/lib/permissions";
import { CheckResultBadge, DueBadge, EffectValue, NeutralizerStateBadge } from "../_components/badges";
import { HighVoltageCaution } from "../_components/caution";
import { DecayChart } from "../_components/decay-chart";
import { fmtDate, fmtDateTime, fmtIsoDate, fmtNumber, fmtSigned, toLocalInput } from "../_components/format";
import { HistoryList } from "../_components/history-list";
import { NeutralizerForm } from "../_components/neutralizer-form";
import { CleanedForm, NoteForm } from "../_components/small-forms";
import { UploadForm } from "../_components/upload-form";
import { UploadsGallery } from "../_components/uploads-gallery";
import { updateNeutralizer } from "../actions";

export const metadata: Metadata = { title: "Neutralizer" };
export const dynamic = "force-dynamic";

export default async function NeutralizerPage({ params }: { params: Promise<{ id: string }> }) {
  const { id: raw } = await params;
  const { allowed, session } = await requirePagePermission("view", `/equipment/${raw}`);
  if (!allowed) return <Forbidden what="see the equipment" />;
  if (!/^[1-9]\d{0,9}$/.test(raw)) notFound();
  const db = getDb();
  const nowMs = Date.now();
  const [detail, places, plant] = await Promise.all([getNeutralizerDetail(db, Number(raw), nowMs), getPlaceOptions(db), getPlantSettings(db)]);
  if (!detail) notFound();
  const { neutralizer: n, limits, checks, projection, effects, topology, events, uploads } = detail;
  const tz = plant.timeZone;
  const canEdit = can(session.role, "equipment.edit");
  const canRecord = can(session.role, "check.record");
  const canUpload = can(session.role, "upload.add");
  const solventLine = places.lines.find((l) => l.id === n.lineId)?.solvent ?? false;
  const warnings = neutralizerWarnings({ ...n, solventLine });
  const kindSpec = NEUTRALIZER_KIND_SPECS[n.kind];
  const checkUploads = (checkId: number) => uploads.filter((u) => u.subjectType === "check" && u.subjectId === checkId);

  return (
    <div>
      <nav className="mb-2 text-xs text-ink-faint">
        <Link href="/equipment" className="hover:underline">
          Equipment
        </Link>{" "}
        / {n.areaName ?? "Not placed"} / {n.lineName ?? "—"}
      </nav>
      <PageHeader
        title={n.tag}
        subtitle={
          <>
            {NEUTRALIZER_KIND_LABELS[n.kind]}
            {n.airAssisted ? " (air-assisted)" : ""} · {n.lineName ? `${n.lineName}, before point ${n.position}. ${n.pointName}` : "not placed"}
          </>
        }
        actions={
          <>
            <NeutralizerStateBadge state={n.state} />
            {can(session.role, "maintenance.plan") ? (
              <Link href={`/maintenance?target=neutralizer:${n.id}#plan`} className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk" data-testid="plan-work-link">
                Plan work here
              </Link>
            ) : null}
            {canRecord ? (
              <Link href={`/checks?neutralizer=${n.id}#record`} className="rounded bg-brand px-3 py-1.5 text-sm font-medium text-white hover:bg-brand-deep">
                Record a check
              </Link>
            ) : null}
          </>
        }
      />
      <div className="mb-5">
        <HighVoltageCaution />
      </div>

      <SettingsWarnings warnings={warnings} />

      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,1fr)_25rem]">
        <div className="space-y-5">
          <Card title="Effect on the web" aside={<span className="text-xs text-ink-faint">1 − |charge after| / |charge before|, while the line runs</span>}>
            {topology?.beforePoint ? (
              <p className="mb-3 text-sm text-ink-soft">
                Charge at <b className="font-medium text-ink">{topology.beforePoint.name}</b> (before) against <b className="font-medium text-ink">{topology.afterPoint.name}</b> (after), from the 1-minute
                averages.
              </p>
            ) : null}
            <div className="grid gap-3 sm:grid-cols-3" data-testid="effect-figures">
              {effects.map((e) => (
                <EffectTile key={e.key} e={e} tz={tz} />
              ))}
            </div>
          </Card>

          <Card
            title="Decay time across checks"
            aside={<span className="text-xs text-ink-faint">limit {limits.maxDecayS} s ({limits.source === "plant" ? "plant setting" : "default"})</span>}
          >
            <div className="mb-3 text-sm" data-testid="decay-projection">
              {projection.dueTs !== null ? (
                projection.dueTs <= nowMs ? (
                  <p className="font-medium text-over">The trend has reached the {limits.maxDecayS} s limit: cleaning is due now.</p>
                ) : (
                  <p>
                    <span className="font-medium text-ink">Cleaning likely due around {fmtDate(projection.dueTs, tz)}</span>
                    <span className="text-ink-soft"> — where the fitted line reaches {limits.maxDecayS} s (+{fmtNumber(projection.slopeSPerDay, 2)} s per day).</span>
                  </p>
                )
              ) : projection.points.length >= 2 ? (
                <p className="text-ink-soft">The decay time is not rising; no cleaning date can be projected from it.</p>
              ) : (
                <p className="text-ink-soft">Two or more checks are needed to project when the decay time will reach its limit.</p>
              )}
            </div>
            <SlowdownNote projection={projection} lastCleanedTs={n.lastCleanedTs} tz={tz} />
            <DecayChart projection={projection} nowMs={nowMs} timeZone={tz} />
            <p className="mt-2 text-xs text-ink-faint" data-testid="kind-spec">
              {kindSpec.label}: usually {kindSpec.mountingMinMm !== null ? `${kindSpec.mountingMinMm}–${kindSpec.mountingMaxMm} mm from the web` : "no set range"}, a clean unit decays in {kindSpec.typicalDecayS}; default limit {kindSpec.defaultMaxDecayS} s. Source: {kindSpec.source}
              {kindSpec.checkNote ? ` ${kindSpec.checkNote}` : ""}
            </p>
            <p className="mt-1 text-xs text-ink-faint">{CHECK_LIMIT_SOURCES.maxDecayS}</p>
            <p className="mt-1 text-xs text-ink-faint">{CHECK_LIMIT_SOURCES.maxOffsetAbsV}</p>
          </Card>

          <Card title={`Checks (${checks.length})`}>
            {checks.length === 0 ? (
              <p className="text-sm text-ink-faint">No checks recorded yet.</p>
            ) : (
              <div className="relative -mx-4 -my-2 overflow-x-auto" tabIndex={0} role="region" aria-label="Checks (scrolls sideways on a narrow screen)">
                <table className="w-full min-w-[44rem] text-sm" data-testid="check-table">
                  <thead className="text-left text-xs text-ink-faint">
                    <tr>
                      <th className="px-4 py-2 font-medium">When</th>
                      <th className="py-2 pr-3 text-right font-medium">Decay +</th>
                      <th className="py-2 pr-3 text-right font-medium">Decay −</th>
                      <th className="py-2 pr-3 text-right font-medium">Offset</th>
                      <th className="py-2 pr-3 font-medium">Plate · distance</th>
                      <th className="py-2 pr-3 font-medium">Result</th>
                      <th className="py-2 pr-4 font-medium">By / instrument</th>
                    </tr>
                  </thead>
                  <tbody>
                    {checks.map((c) => (
                      <tr key={c.id} className="border-t border-paper-line align-top">
                        <td className="num px-4 py-2 text-ink-soft">
                          {fmtDateTime(c.ts, tz)}
                          {c.method === "periodic" ? <span className="block text-xs text-ink-faint">periodic ({CHECK_STANDARD_EDITIONS.periodic})</span> : null}
                          {c.imported ? <span className="block text-xs text-ink-faint">imported</span> : null}
                        </td>
                        <td className={`num py-2 pr-3 text-right ${c.decayPosS !== null && c.decayPosS > limits.maxDecayS ? "font-semibold text-over" : ""}`}>{fmtNumber(c.decayPosS, 1, "s")}</td>
                        <td className={`num py-2 pr-3 text-right ${c.decayNegS !== null && c.decayNegS > limits.maxDecayS ? "font-semibold text-over" : ""}`}>{fmtNumber(c.decayNegS, 1, "s")}</td>
                        <td className={`num py-2 pr-3 text-right ${c.offsetV !== null && Math.abs(c.offsetV) > limits.maxOffsetAbsV ? "font-semibold text-over" : ""}`}>{fmtSigned(c.offsetV, 0, "V")}</td>
                        <td className="num py-2 pr-3 text-xs text-ink-soft" data-testid="check-plate">
                          {c.plateCapacitancePf !== null ? `${fmtNumber(c.plateCapacitancePf, 0, "pF")}` : "plate —"}
                          {c.plateWidthMm !== null && c.plateLengthMm !== null ? `, ${c.plateWidthMm} × ${c.plateLengthMm} mm` : ""}
                          <span className="block text-ink-faint">{c.plateDistanceMm !== null ? `at ${c.plateDistanceMm} mm` : "distance —"}</span>
                        </td>
                        <td className="py-2 pr-3">
                          <CheckResultBadge passed={c.passed} />
                          {c.failReasons ? <span className="mt-0.5 block max-w-[16rem] text-xs text-ink-soft">{c.failReasons}</span> : null}
                        </td>
                        <td className="py-2 pr-4 text-xs text-ink-soft">
                          {c.personName ?? "—"}
                          {c.instrument ? <span className="block text-ink-faint">{c.instrument}</span> : null}
                          {checkUploads(c.id).length ? (
                            <span className="mt-1 flex gap-1">
                              {checkUploads(c.id).map((u) => (
                                <a key={u.id} href={`/api/uploads/${u.id}`} target="_blank" rel="noopener" className="text-brand hover:underline">
                                  {u.thumbnailKey ? "photo" : "PDF"}
                                </a>
                              ))}
                            </span>
                          ) : null}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
          </Card>

          <Card title="Details">
            {canEdit ? (
              <NeutralizerForm action={updateNeutralizer} places={places} submitLabel="Save changes" initial={{ ...n }} wide />
            ) : (
              <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="text-ink-soft">Length</dt>
                <dd>{n.lengthMm !== null ? `${n.lengthMm} mm` : "—"}</dd>
                <dt className="text-ink-soft">Mounting distance</dt>
                <dd>{n.mountingDistanceMm !== null ? `${n.mountingDistanceMm} mm to the web` : "—"}</dd>
                <dt className="text-ink-soft">Power unit</dt>
                <dd>
                  {n.powerUnit ?? "—"}
                  {n.outputKv !== null ? `, ${n.outputKv} kV` : ""}
                </dd>
                <dt className="text-ink-soft">Installed on</dt>
                <dd>{fmtIsoDate(n.installedOn)}</dd>
                {n.notes ? (
                  <>
                    <dt className="text-ink-soft">Notes</dt>
                    <dd className="whitespace-pre-line">{n.notes}</dd>
                  </>
                ) : null}
              </dl>
            )}
          </Card>

          <Card title="History">
            <HistoryList events={events} timeZone={tz} />
          </Card>
        </div>

        <div className="space-y-5">
          <Card title="Cleaning and verification">
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm">
              <dt className="text-ink-soft">Cleaning</dt>
              <dd>{n.state === "removed" ? "—" : <DueBadge dueTs={n.state === "needs_cleaning" ? Math.min(n.cleaningDueTs ?? nowMs, nowMs - 1) : n.cleaningDueTs} nowMs={nowMs} />}</dd>
              <dt className="text-ink-soft">Last cleaned</dt>
              <dd>
                {n.lastCleanedTs !== null ? fmtDateTime(n.lastCleanedTs, tz) : "not recorded"} <span className="text-ink-faint">· every {n.cleaningIntervalDays} days</span>
              </dd>
              <dt className="text-ink-soft">Verification</dt>
              <dd>{n.state === "removed" ? "—" : <DueBadge dueTs={n.checkDueTs} nowMs={nowMs} />}</dd>
              <dt className="text-ink-soft">Last check</dt>
              <dd className="flex flex-wrap items-center gap-x-2">
                {n.lastCheck ? (
                  <>
                    <CheckResultBadge passed={n.lastCheck.passed} /> {fmtDate(n.lastCheck.ts, tz)}
                  </>
                ) : (
                  "none yet"
                )}
                <span className="text-ink-faint">· every {n.checkIntervalDays} days</span>
              </dd>
              <dt className="text-ink-soft">Limits</dt>
              <dd>
                decay ≤ {limits.maxDecayS} s each polarity, offset within ±{limits.maxOffsetAbsV} V
              </dd>
            </dl>
            {canRecord ? (
              <div className="mt-4 border-t border-paper-line pt-3">
                <h3 className="mb-1 text-sm font-semibold">Record a cleaning</h3>
                <p className="mb-2 text-xs text-ink-soft">Isolate the power unit and follow the lockout procedure first.</p>
                <CleanedForm id={n.id} nowLocal={toLocalInput(nowMs, tz)} />
              </div>
            ) : null}
          </Card>

          <Card title="Photos and documents">
            <UploadsGallery uploads={uploads} role={session.role} timeZone={tz} />
            {canUpload ? (
              <div className="mt-4 border-t border-paper-line pt-3">
                <UploadForm subjectType="neutralizer" subjectId={n.id} />
              </div>
            ) : null}
          </Card>

          {canEdit ? (
            <Card title="Add a note or report a fault">
              <NoteForm subjectType="neutralizer" subjectId={n.id} />
            </Card>
          ) : null}
        </div>
      </div>
    </div>
  );
}

function EffectTile({ e, tz }: { e: EffectFigure; tz: string }) {
  const pct = e.effect !== null ? Math.max(0, Math.min(1, e.effect)) : 0;
  return (
    <div className="rounded border border-paper-line bg-paper px-3 py-2.5">
      <div className="text-xs text-ink-soft" title={`${fmtDateTime(e.fromTs, tz)} – ${fmtDateTime(e.toTs, tz)}`}>
        {e.label}
      </div>
      <div className="mt-0.5 text-2xl font-semibold">
        <EffectValue effect={e.effect} />
      </div>
      {e.effect !== null ? (
        <>
          {/* a bar with the 50 % line the live effect rule alerts below by default */}
          <div className="relative mt-1.5 h-1.5 rounded bg-paper-sunk">
            <div className={`h-1.5 rounded ${e.effect < 0.5 ? "bg-over" : e.effect < 0.7 ? "bg-near" : "bg-ink-soft"}`} style={{ width: `${pct * 100}%` }} />
            <div className="absolute top-[-2px] h-2.5 w-px bg-ink-faint" style={{ left: "50%" }} />
          </div>
          <p className="num mt-1.5 text-xs text-ink-faint">
            {fmtNumber(e.meanBeforeKv, 1)} → {fmtNumber(e.meanAfterKv, 1)} kV · {e.runningMinutes} min running
          </p>
        </>
      ) : (
        <p className="mt-1 text-xs text-ink-faint">{e.reason}</p>
      )}
    </div>
  );
}

/** "Slower than its own baseline by ×N", from the same series the trend is fitted to. */
function SlowdownNote({ projection, lastCleanedTs, tz }: { projection: DecayProjection; lastCleanedTs: number | null; tz: string }) {
  const s = projection.slowdown;
  if (!s) return null;
  const latestTs = projection.points[projection.points.length - 1]?.ts ?? 0;
  const cleanedSince = lastCleanedTs !== null && lastCleanedTs > latestTs;
  const basis = projection.basis === "since_cleaning" ? "its first checks since the last cleaning" : "its earlier checks this year";
  if (!s.warn) {
    return (
      <p className="mb-2 text-sm text-ink-soft" data-testid="decay-slowdown">
        Latest decay {s.currentS.toFixed(1)} s, ×{s.factor.toFixed(1)} its own baseline of {s.baselineS.toFixed(1)} s ({basis}).
      </p>
    );
  }
  return (
    <p className="mb-2 rounded border border-near/40 bg-near-soft/60 px-3 py-1.5 text-sm text-ink" data-testid="decay-slowdown">
      <b className="font-semibold text-near">▲ Slower than its own baseline by ×{s.factor.toFixed(1)}</b>: the latest check took {s.currentS.toFixed(1)} s against {s.baselineS.toFixed(1)} s from {basis}
      {cleanedSince ? `; it has been cleaned since (${fmtDate(lastCleanedTs, tz)}), so check it again.` : ". It is fouling even if it still passes: plan a cleaning."}
    </p>
  );
}
