// Equipment: every neutralizer by hall and line (web-path order) with its state, cleaning due,
// last check and effect; a summary of the sensors; engineers add neutralizers here.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { NEUTRALIZER_KIND_LABELS } from "@/db/queries/checks";
import { computeNeutralizerEffects, getPlaceOptions, getPlantSettings, listDevices, listNeutralizers, type NeutralizerListItem } from "@/db/queries/equipment";
import { Card, EmptyState, Forbidden, PageHeader } from "@/components/ui/page";
import { StateBadge } from "@/components/ui/state-badge";
import { neutralizerWarnings } from "@/lib/equipment-warnings";
import { can } from "@/lib/permissions";
import { SILENT_AFTER_MS } from "../devices/_components/device-bits";
import { CheckResultBadge, DueBadge, EffectValue, NeutralizerStateBadge } from "./_components/badges";
import { fmtDate, toLocalDateIso } from "./_components/format";
import { NeutralizerForm } from "./_components/neutralizer-form";
import { createNeutralizer } from "./actions";

export const metadata: Metadata = { title: "Equipment" };
export const dynamic = "force-dynamic";

const linkButton = "rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk";

export default async function EquipmentPage() {
  const { allowed, session } = await requirePagePermission("view", "/equipment");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Equipment" />
        <Forbidden what="see the equipment" />
      </div>
    );
  }
  const db = getDb();
  const nowMs = Date.now();
  const [ns, devs, places, plant] = await Promise.all([listNeutralizers(db), listDevices(db, nowMs), getPlaceOptions(db), getPlantSettings(db)]);
  const effects = await computeNeutralizerEffects(
    db,
    ns.filter((n) => n.state !== "removed").map((n) => n.id),
    [{ key: "day", label: "Last 24 h", fromTs: nowMs - 86_400_000, toTs: nowMs }],
  );
  const canEdit = can(session.role, "equipment.edit");
  const tz = plant.timeZone;

  const halls = new Map<string, NeutralizerListItem[]>();
  for (const n of ns) {
    const key = n.areaName ?? "Not placed";
    halls.set(key, [...(halls.get(key) ?? []), n]);
  }
  const counts = {
    inService: ns.filter((n) => n.state === "in_service").length,
    needsCleaning: ns.filter((n) => n.state === "needs_cleaning").length,
    faulty: ns.filter((n) => n.state === "faulty").length,
    cleaningOverdue: ns.filter((n) => n.state !== "removed" && n.cleaningDueTs !== null && n.cleaningDueTs < nowMs).length,
  };
  const silent = devs.filter((d) => d.enabled && (d.lastSeenTs === null || nowMs - d.lastSeenTs > SILENT_AFTER_MS)).length;
  const calibrationSoon = devs.filter((d) => d.enabled && d.calibrationDue !== null && d.calibrationDue <= toLocalDateIso(nowMs + 14 * 86_400_000, tz)).length;
  const kindCount = (k: string) => devs.filter((d) => d.kind === k).length;

  return (
    <div>
      <PageHeader
        title="Equipment"
        subtitle="Neutralizers and sensors: where each one is, its state, and when it is due for cleaning and verification."
        actions={
          <>
            <Link href="/checks" className={linkButton}>
              Checks and due list
            </Link>
            <Link href="/devices" className={linkButton}>
              Devices
            </Link>
            {can(session.role, "import.run") ? (
              <Link href="/checks/import" className={linkButton}>
                Import CSV
              </Link>
            ) : null}
          </>
        }
      />

      <div className="mb-5 grid grid-cols-2 gap-3 md:grid-cols-4" data-testid="equipment-summary">
        <Stat label="In service" value={counts.inService} />
        <Stat label="Needs cleaning" value={counts.needsCleaning} state={counts.needsCleaning ? "near" : undefined} />
        <Stat label="Faulty" value={counts.faulty} state={counts.faulty ? "over" : undefined} />
        <Stat label="Cleaning overdue" value={counts.cleaningOverdue} state={counts.cleaningOverdue ? "over" : undefined} />
      </div>

      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="space-y-5">
          {ns.length === 0 ? <EmptyState title="No neutralizers recorded yet">{canEdit ? "Add the first one with the form on the right." : "An engineer adds them here."}</EmptyState> : null}
          {[...halls.entries()].map(([hall, items]) => (
            <Card key={hall} title={hall} aside={<span className="text-xs text-ink-faint">{items.length} neutralizers</span>}>
              <ul className="-mx-4 -my-2 md:hidden" data-testid="neutralizer-cards">
                {groupByLine(items).map(([line, rows]) => (
                  <LineCards key={line} line={line} rows={rows} nowMs={nowMs} tz={tz} effects={effects} places={places} />
                ))}
              </ul>
              <div className="relative -mx-4 -my-2 hidden overflow-x-auto md:block" tabIndex={0} role="region" aria-label={`Neutralizers in ${hall} (scrolls sideways on a narrow screen)`}>
                <table className="w-full min-w-[56rem] table-fixed text-sm" data-testid="neutralizer-table">
                  <colgroup>
                    <col className="w-[15rem]" />
                    <col className="w-[9.5rem]" />
                    <col className="w-[8.5rem]" />
                    <col className="w-[4.5rem]" />
                    <col className="w-[8rem]" />
                    <col className="w-[8.5rem]" />
                    <col className="w-[11rem]" />
                    <col className="w-[6rem]" />
                  </colgroup>
                  <thead className="whitespace-nowrap text-left text-xs text-ink-faint">
                    <tr>
                      <th className="px-4 py-2 font-medium">Tag</th>
                      <th className="py-2 pr-3 font-medium">Point</th>
                      <th className="py-2 pr-3 font-medium">Kind</th>
                      <th className="py-2 pr-3 text-right font-medium">To web</th>
                      <th className="py-2 pr-3 font-medium">State</th>
                      <th className="py-2 pr-3 font-medium">Cleaning</th>
                      <th className="py-2 pr-3 font-medium">Last check</th>
                      <th className="py-2 pr-4 text-right font-medium" title="1 − |charge after| / |charge before|, last 24 h while running">
                        Effect 24 h
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {groupByLine(items).map(([line, rows]) => (
                      <LineRows key={line} line={line} rows={rows} nowMs={nowMs} tz={tz} effects={effects} places={places} />
                    ))}
                  </tbody>
                </table>
              </div>
            </Card>
          ))}
        </div>

        <div className="space-y-5">
          <Card title="Sensors" aside={<Link href="/devices" className="text-xs text-brand hover:underline">Open Devices →</Link>}>
            <dl className="grid grid-cols-[1fr_auto] gap-y-1 text-sm">
              <dt className="text-ink-soft">Field meters</dt>
              <dd className="num text-right">{kindCount("field_meter")}</dd>
              <dt className="text-ink-soft">Temperature/humidity loggers</dt>
              <dd className="num text-right">{kindCount("th_logger")}</dd>
              <dt className="text-ink-soft">Line-speed gateways</dt>
              <dd className="num text-right">{kindCount("speed_gateway")}</dd>
            </dl>
            <div className="mt-3 flex flex-wrap gap-2 border-t border-paper-line pt-3">
              {silent ? <StateBadge state="silent" label={`${silent} silent (nothing for ${SILENT_AFTER_MS / 60_000} min)`} /> : <StateBadge state="normal" label="All sensors reporting" />}
              {calibrationSoon ? <StateBadge state="near" label={`${calibrationSoon} calibration${calibrationSoon === 1 ? "" : "s"} due within 14 days`} /> : null}
            </div>
          </Card>
          {canEdit ? (
            <Card title="Add a neutralizer">
              <NeutralizerForm action={createNeutralizer} places={places} submitLabel="Add neutralizer" />
            </Card>
          ) : null}
        </div>
      </div>
    </div>
  );
}

function Stat({ label, value, state }: { label: string; value: number; state?: "near" | "over" }) {
  return (
    <div className="rounded-card border border-paper-line bg-paper-raised px-4 py-3">
      <div className="flex items-center justify-between text-xs text-ink-soft">
        {label}
        {state ? <StateBadge state={state} label={state === "over" ? "Act" : "Check"} /> : null}
      </div>
      <div className="num mt-1 text-2xl font-semibold text-ink">{value}</div>
    </div>
  );
}

function groupByLine(items: NeutralizerListItem[]): Array<[string, NeutralizerListItem[]]> {
  const m = new Map<string, NeutralizerListItem[]>();
  for (const n of items) m.set(n.lineName ?? "Not placed", [...(m.get(n.lineName ?? "Not placed") ?? []), n]);
  return [...m.entries()];
}

type Places = Awaited<ReturnType<typeof getPlaceOptions>>;
type RowsProps = { line: string; rows: NeutralizerListItem[]; nowMs: number; tz: string; effects: Map<number, { effect: number | null }[]>; places: Places };

const warningsOf = (n: NeutralizerListItem, places: Places) => neutralizerWarnings({ ...n, solventLine: places.lines.find((l) => l.id === n.lineId)?.solvent ?? false });

function kindText(n: NeutralizerListItem): string {
  const bar = n.kind === "ac_bar" || n.kind === "pulsed_dc_bar" || n.kind === "steady_dc_bar";
  return `${NEUTRALIZER_KIND_LABELS[n.kind]}${n.airAssisted && bar ? ", air" : ""}`;
}

function WarningsMark({ warnings }: { warnings: ReturnType<typeof neutralizerWarnings> }) {
  if (!warnings.length) return null;
  return (
    <span className="ml-2 inline-flex items-center gap-0.5 text-xs text-near" title={warnings.map((w) => w.message).join("\n")}>
      <svg viewBox="0 0 12 12" className="h-2.5 w-2.5" aria-hidden="true">
        <path d="M6 1 L11 11 L1 11 Z" fill="currentColor" />
      </svg>
      {warnings.length} warning{warnings.length === 1 ? "" : "s"}
    </span>
  );
}

function LastCheck({ n, tz }: { n: NeutralizerListItem; tz: string }) {
  if (!n.lastCheck) return <span className="text-xs text-ink-faint">none yet</span>;
  return (
    <span className="inline-flex items-center gap-2">
      <CheckResultBadge passed={n.lastCheck.passed} />
      <span className="text-xs text-ink-faint">{fmtDate(n.lastCheck.ts, tz)}</span>
    </span>
  );
}

/** Phones: each neutralizer as a small stacked card (tag and state, where, cleaning, last check, effect). */
function LineCards({ line, rows, nowMs, tz, effects, places }: RowsProps) {
  return (
    <li className="border-t border-paper-line first:border-t-0">
      <h3 className="bg-paper/60 px-4 py-1.5 text-xs font-semibold uppercase tracking-wide text-ink-soft">{line}</h3>
      <ul>
        {rows.map((n) => (
          <li key={n.id} className="space-y-1.5 border-t border-paper-line px-4 py-2.5 text-sm" data-testid="neutralizer-card" data-tag={n.tag}>
            <div className="flex flex-wrap items-center justify-between gap-x-3 gap-y-1">
              <span className="min-w-0 break-words">
                <Link href={`/equipment/${n.id}`} className="font-medium text-brand hover:underline">
                  {n.tag}
                </Link>
                <WarningsMark warnings={warningsOf(n, places)} />
              </span>
              <NeutralizerStateBadge state={n.state} />
            </div>
            <p className="break-words text-xs text-ink-soft">
              {n.position !== null ? `${n.position}. ${n.pointName}` : "Not placed"} · {kindText(n)}
              {n.mountingDistanceMm !== null ? <span className="num"> · {n.mountingDistanceMm} mm to web</span> : null}
            </p>
            <dl className="grid grid-cols-[auto_minmax(0,1fr)] items-center gap-x-3 gap-y-1 text-xs">
              <dt className="text-ink-faint">Cleaning</dt>
              <dd>{n.state === "removed" ? <span className="text-ink-faint">—</span> : <DueBadge dueTs={n.cleaningDueTs} nowMs={nowMs} />}</dd>
              <dt className="text-ink-faint">Last check</dt>
              <dd>
                <LastCheck n={n} tz={tz} />
              </dd>
              <dt className="text-ink-faint">Effect 24 h</dt>
              <dd className="text-sm">
                <EffectValue effect={effects.get(n.id)?.[0]?.effect ?? null} />
              </dd>
            </dl>
          </li>
        ))}
      </ul>
    </li>
  );
}

function LineRows({ line, rows, nowMs, tz, effects, places }: RowsProps) {
  return (
    <>
      <tr className="border-t border-paper-line bg-paper/60">
        <th colSpan={8} className="px-4 py-1.5 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">
          {line}
        </th>
      </tr>
      {rows.map((n) => {
        const warnings = warningsOf(n, places);
        return (
          <tr key={n.id} className="border-t border-paper-line align-middle" data-testid="neutralizer-row" data-tag={n.tag}>
            <td className="px-4 py-2">
              <Link href={`/equipment/${n.id}`} className="font-medium text-brand hover:underline">
                {n.tag}
              </Link>
              <WarningsMark warnings={warnings} />
            </td>
            <td className="truncate py-2 pr-3 text-ink-soft" title={n.pointName ?? undefined}>
              {n.position !== null ? `${n.position}. ${n.pointName}` : "—"}
            </td>
            <td className="truncate py-2 pr-3 text-ink-soft">
              {kindText(n)}
            </td>
            <td className="num py-2 pr-3 text-right text-ink-soft">{n.mountingDistanceMm !== null ? `${n.mountingDistanceMm} mm` : "—"}</td>
            <td className="py-2 pr-3">
              <NeutralizerStateBadge state={n.state} />
            </td>
            <td className="py-2 pr-3">{n.state === "removed" ? <span className="text-ink-faint">—</span> : <DueBadge dueTs={n.cleaningDueTs} nowMs={nowMs} />}</td>
            <td className="py-2 pr-3">
              <LastCheck n={n} tz={tz} />
            </td>
            <td className="py-2 pr-4 text-right">
              <EffectValue effect={effects.get(n.id)?.[0]?.effect ?? null} />
            </td>
          </tr>
        );
      })}
    </>
  );
}
