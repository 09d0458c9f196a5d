// Planned work: maintenance windows running now, planned and recently ended (with what happened
// during them), and the form to plan one. Everyone who may view sees them; shift leads and up
// plan, extend and end them (each action checks again). ?target=line:3 prefills the form.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { listMaintenanceTargets, listMaintenanceWindows } from "@/db/queries/maintenance-windows";
import { listRosterPeople } from "@/db/queries/oncall";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { MAX_WINDOW_MS } from "@/lib/alerts/maintenance-windows";
import { can } from "@/lib/permissions";
import { formatDuration } from "@/lib/vocabulary";
import { formatPlantTime, toPlantLocalInput } from "@/lib/plant-time";
import { maintenanceStatus, MAINTENANCE_TARGET_WORDS, type MaintenanceWindowView } from "@/lib/views/maintenance";
import { HighVoltageCaution } from "../equipment/_components/caution";
import { EndWindowButton, ExtendWindowForm, OpenWindowForm } from "./_components/maintenance-forms";

export const metadata: Metadata = { title: "Planned work" };
export const dynamic = "force-dynamic";

type Search = { target?: string | string[]; reason?: string | string[] };

export default async function MaintenancePage({ searchParams }: { searchParams: Promise<Search> }) {
  const { allowed, session } = await requirePagePermission("view", "/maintenance");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Planned work" />
        <Forbidden what="see planned work" />
      </div>
    );
  }
  const db = getDb();
  const nowMs = Date.now();
  const canPlan = can(session.role, "maintenance.plan");
  const [plant, lists, targets, people] = await Promise.all([
    getPlantSettings(db),
    listMaintenanceWindows(db, nowMs),
    canPlan ? listMaintenanceTargets(db) : Promise.resolve([]),
    canPlan ? listRosterPeople(db) : Promise.resolve([]),
  ]);
  const tz = plant.timeZone;
  const sp = await searchParams;
  const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) ?? "";
  const wanted = first(sp.target);
  const defaultTarget = targets.some((g) => g.options.some((o) => o.value === wanted)) ? wanted : "";
  const startMs = Math.floor(nowMs / 60_000) * 60_000;
  const maxHours = MAX_WINDOW_MS / 3_600_000;

  return (
    <div>
      <PageHeader
        title="Planned work"
        subtitle="While work is planned on a hall, line, point or bar, the alerts it explains are recorded but on call is not told. When it ends, what happened is summed up and anything still wrong is sent as usual."
      />
      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,1fr)_26rem]">
        <div className="min-w-0 space-y-5">
          <WindowSection title="Running now" empty="No planned work is running." windows={lists.active} nowMs={nowMs} tz={tz} canPlan={canPlan} testId="maint-active" />
          <WindowSection title="Planned" empty="Nothing planned." windows={lists.planned} nowMs={nowMs} tz={tz} canPlan={canPlan} testId="maint-planned" />
          <WindowSection title="Ended in the last 14 days" empty="No planned work ended in the last 14 days." windows={lists.recent} nowMs={nowMs} tz={tz} canPlan={false} testId="maint-recent" />
        </div>
        <div className="space-y-4">
          {canPlan ? (
            <Card title="Plan work" className="scroll-mt-4" aside={<span id="plan" />}>
              <OpenWindowForm
                targets={targets}
                people={people.map((p) => ({ id: p.id, name: p.name }))}
                defaultTarget={defaultTarget}
                defaultOwnerId={session.personId}
                defaultStart={toPlantLocalInput(startMs, tz)}
                defaultEnd={toPlantLocalInput(startMs + 2 * 3_600_000, tz)}
                defaultReason={first(sp.reason).slice(0, 300)}
                maxHours={maxHours}
              />
            </Card>
          ) : (
            <p className="rounded-card border border-paper-line bg-paper-raised px-4 py-3 text-sm text-ink-soft" data-testid="maint-read-only">
              Shift leads, engineers and admins plan work; your role can see it.
            </p>
          )}
          <HighVoltageCaution compact />
        </div>
      </div>
    </div>
  );
}

function WindowSection({ title, empty, windows, nowMs, tz, canPlan, testId }: { title: string; empty: string; windows: MaintenanceWindowView[]; nowMs: number; tz: string; canPlan: boolean; testId: string }) {
  return (
    <Card title={`${title} (${windows.length})`}>
      {windows.length === 0 ? (
        <p className="text-sm text-ink-faint">{empty}</p>
      ) : (
        <ul className="divide-y divide-paper-line" data-testid={testId}>
          {windows.map((w) => (
            <WindowRow key={w.id} w={w} nowMs={nowMs} tz={tz} canPlan={canPlan} />
          ))}
        </ul>
      )}
    </Card>
  );
}

const STATUS_WORDS = { planned: "Planned", active: "Running", ended: "Ended" } as const;

function WindowRow({ w, nowMs, tz, canPlan }: { w: MaintenanceWindowView; nowMs: number; tz: string; canPlan: boolean }) {
  const status = maintenanceStatus(w, nowMs);
  const when = (ts: number) => formatPlantTime(ts, tz, "EEE d MMM HH:mm");
  return (
    <li className="py-3 first:pt-0 last:pb-0" data-testid="maint-window" data-window-id={w.id} data-status={status}>
      <div className="flex flex-col gap-2 sm:flex-row sm:items-start sm:justify-between sm:gap-3">
        <div className="min-w-0 flex-1">
          <p className="flex flex-wrap items-center gap-x-2 gap-y-1">
            <StatusMark status={status} />
            <span className="text-xs text-ink-faint">{MAINTENANCE_TARGET_WORDS[w.targetKind]}</span>
            {w.lineId !== null ? (
              <Link href={`/lines/${w.lineId}`} className="font-medium text-ink hover:text-brand hover:underline">
                {w.targetName}
              </Link>
            ) : (
              <span className="font-medium text-ink">{w.targetName}</span>
            )}
          </p>
          <p className="mt-0.5 text-sm text-ink">{w.reason}</p>
          <p className="num mt-0.5 text-xs text-ink-soft">
            {when(w.startTs)} – {formatPlantTime(w.endTs, tz, "HH:mm")} ({formatDuration(w.endTs - w.startTs)}) · owner {w.ownerName}
            {w.createdByName !== w.ownerName ? ` · planned by ${w.createdByName}` : ""}
            {w.endedEarlyTs !== null ? " · ended early" : ""}
          </p>
          {w.extendReason ? <p className="mt-0.5 text-xs text-ink-soft">Longer because: {w.extendReason}</p> : null}
          {status === "ended" ? (
            <p className="mt-1 rounded bg-paper-sunk px-2 py-1 text-xs text-ink-soft" data-testid="maint-summary">
              {w.summary ?? "Summary follows within a minute of the end."}
            </p>
          ) : null}
        </div>
        {canPlan && status !== "ended" ? (
          <div className="flex shrink-0 flex-wrap items-start gap-2">
            <ExtendWindowForm id={w.id} defaultEnd={toPlantLocalInput(w.endTs + 3_600_000, tz)} />
            <EndWindowButton id={w.id} planned={status === "planned"} />
          </div>
        ) : null}
      </div>
    </li>
  );
}

/** The status as a shape and a word (the chart band's hatching for work running now). */
function StatusMark({ status }: { status: keyof typeof STATUS_WORDS }) {
  return (
    <span className="inline-flex items-center gap-1 rounded border border-paper-line bg-paper px-1.5 py-0.5 text-[11px] font-medium text-ink-soft">
      <svg viewBox="0 0 10 10" className="h-2.5 w-2.5" aria-hidden="true">
        {status === "active" ? (
          <>
            <rect x="0.5" y="0.5" width="9" height="9" fill="none" stroke="currentColor" />
            <path d="M0 10 L10 0 M-2 5 L5 -2 M5 12 L12 5" stroke="currentColor" strokeWidth="1.2" />
          </>
        ) : status === "planned" ? (
          <rect x="0.5" y="0.5" width="9" height="9" fill="none" stroke="currentColor" strokeDasharray="2 1.5" />
        ) : (
          <rect x="0.5" y="0.5" width="9" height="9" fill="currentColor" opacity="0.35" />
        )}
      </svg>
      {STATUS_WORDS[status]}
    </span>
  );
}
