// Devices: every sensor that sends readings, with last seen, message rate, rejections, distances
// and calibration; admins add devices and issue their secrets (shown once).
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { DEVICE_KIND_LABELS, getPlaceOptions, getPlantSettings, listDevices, type DeviceListItem } from "@/db/queries/equipment";
import { latestCrossChecks } from "@/db/queries/surveys-rounds";
import { Card, EmptyState, Forbidden, PageHeader } from "@/components/ui/page";
import { StateBadge } from "@/components/ui/state-badge";
import { deviceWarnings } from "@/lib/equipment-warnings";
import { can } from "@/lib/permissions";
import { fmtAgo, fmtIsoDate, toLocalDateIso } from "../equipment/_components/format";
import { reasonLabel, SILENT_AFTER_MS } from "./_components/device-bits";
import { AddDeviceForm } from "./_components/device-forms";
import { ClockFlag, type ClockView } from "./_components/device-clock";
import { getDeviceClocks } from "@/db/queries/gateways";

export const metadata: Metadata = { title: "Devices" };
export const dynamic = "force-dynamic";


export default async function DevicesPage() {
  const { allowed, session } = await requirePagePermission("view", "/devices");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Devices" />
        <Forbidden what="see the devices" />
      </div>
    );
  }
  const db = getDb();
  const nowMs = Date.now();
  const [devs, places, plant, crossChecks] = await Promise.all([listDevices(db, nowMs), getPlaceOptions(db), getPlantSettings(db), latestCrossChecks(db)]);
  const clocks = await getDeviceClocks(db);
  const today = toLocalDateIso(nowMs, plant.timeZone);
  const soon = toLocalDateIso(nowMs + 14 * 86_400_000, plant.timeZone);
  const isAdmin = can(session.role, "devices.manage");
  const kinds = ["field_meter", "th_logger", "speed_gateway"] as const;

  return (
    <div>
      <nav className="mb-2 text-xs text-ink-faint">
        <Link href="/equipment" className="hover:underline">
          Equipment
        </Link>{" "}
        / Devices
      </nav>
      <PageHeader title="Devices" subtitle="Sensors that send readings: fixed field meters, temperature/humidity loggers and line-speed gateways." />
      {isAdmin ? (
        <Card title="Add a device" className="mb-5">
          <AddDeviceForm places={places} today={today} />
          <p className="mt-3 border-t border-paper-line pt-3 text-xs leading-relaxed text-ink-faint">
            Each device signs in to the broker with its id and secret and may publish only under its own topic. The secret is shown once, when it is issued; Stillfield stores only a salted hash.
          </p>
        </Card>
      ) : null}
      <Card title={`${devs.length} devices`} aside={<span className="text-xs text-ink-faint">silent = nothing received for {SILENT_AFTER_MS / 60_000} min</span>}>
        {devs.length === 0 ? (
          <EmptyState title="No devices yet">{isAdmin ? "Add the first one with the form above." : "An admin adds devices here."}</EmptyState>
        ) : (
          <div className="-mx-4 -my-2 overflow-x-auto">
            <table className="w-full min-w-[62rem] text-sm" data-testid="device-table">
              <thead className="whitespace-nowrap text-left text-xs text-ink-faint">
                <tr>
                  <th className="px-4 py-2 font-medium">Device</th>
                  <th className="py-2 pr-3 font-medium">Where</th>
                  <th className="py-2 pr-3 font-medium">Last seen</th>
                  <th className="py-2 pr-3 text-right font-medium" title="Messages in the last minute as counted by the ingest workers; without them, readings per minute over 10 min">
                    Rate
                  </th>
                  <th className="py-2 pr-3 text-right font-medium">Rejected 24 h</th>
                  <th className="py-2 pr-3 font-medium">Calibrated / mounted</th>
                  <th className="py-2 pr-4 font-medium">Calibration due</th>
                </tr>
              </thead>
              <tbody>
                {kinds.map((k) => {
                  const rows = devs.filter((d) => d.kind === k);
                  if (!rows.length) return null;
                  return <KindRows key={k} label={DEVICE_KIND_LABELS[k]} rows={rows} nowMs={nowMs} today={today} soon={soon} crossChecks={crossChecks} clocks={clocks} />;
                })}
              </tbody>
            </table>
          </div>
        )}
      </Card>
    </div>
  );
}

function KindRows({ label, rows, nowMs, today, soon, crossChecks, clocks }: { label: string; rows: DeviceListItem[]; nowMs: number; today: string; soon: string; crossChecks: Awaited<ReturnType<typeof latestCrossChecks>>; clocks: Map<number, NonNullable<ClockView>> }) {
  return (
    <>
      <tr className="border-t border-paper-line bg-paper/60">
        <th colSpan={7} className="px-4 py-1.5 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">
          {label}s
        </th>
      </tr>
      {rows.map((d) => {
        const silent = d.enabled && (d.lastSeenTs === null || nowMs - d.lastSeenTs > SILENT_AFTER_MS);
        const warn = deviceWarnings(d, today).filter((w) => w.code === "meter_distance_mismatch");
        return (
          <tr key={d.id} className="border-t border-paper-line align-middle" data-testid="device-row" data-code={d.code}>
            <td className="px-4 py-2">
              <Link href={`/devices/${d.id}`} className="font-medium text-brand hover:underline">
                {d.code}
              </Link>
              {!d.enabled ? <StateBadge state="shelved" label="Disabled" className="ml-2" /> : null}
              {crossChecks.get(d.id)?.flagged ? (
                <span className="ml-2" data-testid="check-calibration" title={`Last survey cross-check: ${Math.round(crossChecks.get(d.id)!.diffShare * 100)} % from the handheld meter (allowed ${Math.round(crossChecks.get(d.id)!.allowedShare * 100)} %)`}>
                  <StateBadge state="over" label="Check calibration" />
                </span>
              ) : null}
              <span className="block max-w-[18rem] truncate text-xs text-ink-faint">{d.label}</span>
            </td>
            <td className="py-2 pr-3 text-ink-soft">{d.placeLabel}</td>
            <td className="whitespace-nowrap py-2 pr-3">
              {silent ? <StateBadge state="silent" label={d.lastSeenTs === null ? "Never seen" : `Silent · ${fmtAgo(d.lastSeenTs, nowMs)}`} /> : <span className="text-ink-soft">{fmtAgo(d.lastSeenTs, nowMs)}</span>}
              <ClockFlag clock={clocks.get(d.id)} />
            </td>
            <td className="num whitespace-nowrap py-2 pr-3 text-right">
              {d.messagesPerMin !== null ? (
                <>
                  {d.messagesPerMin} <span className="text-xs text-ink-faint">msg/min</span>
                </>
              ) : (
                <>
                  {d.readingsPerMin} <span className="text-xs text-ink-faint">readings/min</span>
                </>
              )}
            </td>
            <td className="num py-2 pr-3 text-right" title={d.lastRejection ? `${reasonLabel(d.lastRejection.reason)}: ${d.lastRejection.detail ?? ""}` : undefined}>
              {d.rejections24h ? <span className="font-medium text-near">{d.rejections24h}</span> : <span className="text-ink-faint">0</span>}
              {d.lastRejection && d.rejections24h ? <span className="block max-w-[10rem] truncate text-xs text-ink-faint">{reasonLabel(d.lastRejection.reason)}</span> : null}
            </td>
            <td className="num whitespace-nowrap py-2 pr-3 text-ink-soft">
              {d.kind === "field_meter" ? (
                <span className={warn.length ? "font-medium text-near" : ""} title={warn[0]?.message}>
                  {d.calibratedDistanceMm ?? "—"} / {d.mountingDistanceMm ?? "—"} mm{warn.length ? " ▲" : ""}
                </span>
              ) : (
                <span className="text-ink-faint">—</span>
              )}
            </td>
            <td className="whitespace-nowrap py-2 pr-4">
              {d.calibrationDue === null ? (
                <span className="text-ink-faint">—</span>
              ) : d.calibrationDue < today ? (
                <StateBadge state="over" label={`Overdue · ${fmtIsoDate(d.calibrationDue)}`} />
              ) : d.calibrationDue <= soon ? (
                <StateBadge state="near" label={fmtIsoDate(d.calibrationDue)} />
              ) : (
                <span className="text-ink-soft">{fmtIsoDate(d.calibrationDue)}</span>
              )}
            </td>
          </tr>
        );
      })}
    </>
  );
}
