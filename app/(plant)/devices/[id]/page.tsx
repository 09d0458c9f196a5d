// One device: where it is, whether it reports, what was rejected, its calibration; engineers
// edit its placement and distances, admins issue a new secret or disable it.
import { SettingsWarnings } from "@/components/equipment/settings-warnings";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { listRecentRejections } from "@/db/queries/ingest-diagnostics";
import { listCrossChecks } from "@/db/queries/surveys-report";
import { CrossCheckHistory } from "@/components/surveys/cross-check-history";
import { DEVICE_KIND_LABELS, getDevice, getPlaceOptions, getPlantSettings, listEquipmentEvents, listUploads } from "@/db/queries/equipment";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { StateBadge } from "@/components/ui/state-badge";
import { deviceWarnings } from "@/lib/equipment-warnings";
import { can } from "@/lib/permissions";
import { fmtAgo, fmtDateTime, fmtIsoDate, toLocalDateIso } from "../../equipment/_components/format";
import { HistoryList } from "../../equipment/_components/history-list";
import { NoteForm } from "../../equipment/_components/small-forms";
import { UploadForm } from "../../equipment/_components/upload-form";
import { UploadsGallery } from "../../equipment/_components/uploads-gallery";
import { EditDeviceForm, EnableForm, RotateSecretForm } from "../_components/device-forms";
import { reasonLabel, SILENT_AFTER_MS } from "../_components/device-bits";
import { DeviceClockCard } from "../_components/device-clock";
import { getDeviceClocks } from "@/db/queries/gateways";

export const metadata: Metadata = { title: "Device" };
export const dynamic = "force-dynamic";

export default async function DevicePage({ params }: { params: Promise<{ id: string }> }) {
  const { id: raw } = await params;
  const { allowed, session } = await requirePagePermission("view", `/devices/${raw}`);
  if (!allowed) return <Forbidden what="see the devices" />;
  if (!/^[1-9]\d{0,9}$/.test(raw)) notFound();
  const db = getDb();
  const nowMs = Date.now();
  const id = Number(raw);
  const [d, places, plant] = await Promise.all([getDevice(db, id, nowMs), getPlaceOptions(db), getPlantSettings(db)]);
  if (!d) notFound();
  const [events, uploads, rejections, crossChecks] = await Promise.all([listEquipmentEvents(db, "device", id), listUploads(db, "device", [id]), listRecentRejections(db, { deviceCode: d.code, limit: 20 }), listCrossChecks(db, { deviceId: id, limit: 50 })]);
  const clock = (await getDeviceClocks(db, [id])).get(id);
  const tz = plant.timeZone;
  const today = toLocalDateIso(nowMs, tz);
  const warnings = deviceWarnings(d, today);
  const silent = d.enabled && (d.lastSeenTs === null || nowMs - d.lastSeenTs > SILENT_AFTER_MS);
  const isAdmin = can(session.role, "devices.manage");
  const canEdit = can(session.role, "equipment.edit");

  return (
    <div>
      <nav className="mb-2 text-xs text-ink-faint">
        <Link href="/equipment" className="hover:underline">
          Equipment
        </Link>{" "}
        /{" "}
        <Link href="/devices" className="hover:underline">
          Devices
        </Link>
      </nav>
      <PageHeader
        title={d.code}
        subtitle={`${DEVICE_KIND_LABELS[d.kind]} · ${d.label} · ${d.placeLabel}`}
        actions={!d.enabled ? <StateBadge state="shelved" label="Disabled" /> : silent ? <StateBadge state="silent" label="Silent" /> : <StateBadge state="normal" label="Reporting" />}
      />
      <SettingsWarnings warnings={warnings} />
      <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_25rem]">
        <div className="space-y-5">
          <Card title="Reporting">
            <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
              <Figure label="Last seen" value={fmtAgo(d.lastSeenTs, nowMs)} sub={d.lastSeenTs !== null ? fmtDateTime(d.lastSeenTs, tz) : undefined} />
              <Figure label="Messages / min" value={d.messagesPerMin !== null ? String(d.messagesPerMin) : "—"} sub={d.messagesPerMin === null ? "no ingest worker reporting" : "last minute"} />
              <Figure label="Readings / min" value={String(d.readingsPerMin)} sub="last 10 min" />
              <Figure label="Rejected, 24 h" value={String(d.rejections24h)} sub={d.online ? "connected now" : "not connected"} />
            </dl>
          </Card>
          <DeviceClockCard deviceId={id} clock={clock} mayEdit={can(session.role, "gateways.map")} />
          <Card title="Details">
            {canEdit ? (
              <EditDeviceForm device={d} places={places} today={today} />
            ) : (
              <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="text-ink-soft">Calibrated distance</dt>
                <dd>{d.calibratedDistanceMm !== null ? `${d.calibratedDistanceMm} mm` : "—"}</dd>
                <dt className="text-ink-soft">Mounting distance</dt>
                <dd>{d.mountingDistanceMm !== null ? `${d.mountingDistanceMm} mm` : "—"}</dd>
                <dt className="text-ink-soft">Calibration due</dt>
                <dd>{fmtIsoDate(d.calibrationDue)}</dd>
              </dl>
            )}
          </Card>
          <Card title="Recent rejected messages">
            {rejections.length === 0 ? (
              <p className="text-sm text-ink-faint">None kept for this device.</p>
            ) : (
              <table className="w-full text-sm" data-testid="rejections">
                <tbody>
                  {rejections.map((r) => (
                    <tr key={r.id} className="border-t border-paper-line first:border-t-0 align-top">
                      <td className="num w-44 py-1.5 pr-3 text-xs text-ink-faint">{fmtDateTime(r.ts, tz)}</td>
                      <td className="py-1.5">
                        <span className="font-medium">{reasonLabel(r.reason)}</span>
                        {r.detail ? <span className="block text-xs text-ink-soft">{r.detail}</span> : null}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </Card>
          {d.kind === "field_meter" ? (
            <Card title="Cross-checks against handheld surveys">
              <CrossCheckHistory checks={crossChecks} fmt={(ts) => fmtDateTime(ts, plant.timeZone)} />
            </Card>
          ) : null}
          <Card title="History">
            <HistoryList events={events} timeZone={tz} />
          </Card>
        </div>
        <div className="space-y-5">
          {isAdmin ? (
            <Card title="Secret and access">
              <p className="mb-3 text-sm text-ink-soft">
                Secret last issued {d.secretRotatedAt !== null ? fmtDateTime(d.secretRotatedAt, tz) : "when the plant was set up"}.
              </p>
              <details className="mb-3">
                <summary className="cursor-pointer text-sm font-medium text-brand">Issue a new secret…</summary>
                <div className="mt-2">
                  <RotateSecretForm id={d.id} code={d.code} />
                </div>
              </details>
              <EnableForm id={d.id} enabled={d.enabled} />
            </Card>
          ) : null}
          <Card title="Photos and documents">
            <UploadsGallery uploads={uploads} role={session.role} timeZone={tz} />
            {can(session.role, "upload.add") ? (
              <div className="mt-4 border-t border-paper-line pt-3">
                <UploadForm subjectType="device" subjectId={d.id} />
              </div>
            ) : null}
          </Card>
          {canEdit ? (
            <Card title="Add a note or report a fault">
              <NoteForm subjectType="device" subjectId={d.id} />
            </Card>
          ) : null}
        </div>
      </div>
    </div>
  );
}

function Figure({ label, value, sub }: { label: string; value: string; sub?: string }) {
  return (
    <div className="rounded border border-paper-line bg-paper px-3 py-2">
      <dt className="text-xs text-ink-soft">{label}</dt>
      <dd className="num mt-0.5 text-lg font-semibold">{value}</dd>
      {sub ? <dd className="text-xs text-ink-faint">{sub}</dd> : null}
    </div>
  );
}
