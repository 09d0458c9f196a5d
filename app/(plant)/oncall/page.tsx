// On-call: who gets the alert e-mails now and in the coming weeks, in which escalation order,
// and when e-mails go out. Everyone sees it; admins change it (the actions check again).
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/equipment";
import { getAlertingSettings, listOnCallAt, listRosterPeople, listShifts, type RosterShift } from "@/db/queries/oncall";
import { countMailsByState, listRecentMails } from "@/db/queries/outbox";
import { SEVERITY_WORDS } from "@/lib/vocabulary";
import { Card, EmptyState, Forbidden, PageHeader } from "@/components/ui/page";
import { can } from "@/lib/permissions";
import { formatPlantTime, toPlantLocalInput } from "@/lib/plant-time";
import { AddShiftForm, AlertingSettingsForm, RemoveShiftButton } from "./oncall-forms";
import { PlantLocationForm } from "./location-form";

export const metadata: Metadata = { title: "On-call" };
export const dynamic = "force-dynamic";

const WEEKS_SHOWN = 4;

export default async function OnCallPage() {
  const { allowed, session } = await requirePagePermission("view", "/oncall");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="On-call" />
        <Forbidden what="see the on-call roster" />
      </div>
    );
  }
  const db = getDb();
  const now = Date.now();
  const isAdmin = can(session.role, "oncall.manage");
  const [plant, settings, onCallNow, shifts, people, mails, mailCounts] = await Promise.all([
    getPlantSettings(db),
    getAlertingSettings(db),
    listOnCallAt(db, now),
    listShifts(db, now, now + WEEKS_SHOWN * 7 * 86_400_000),
    isAdmin ? listRosterPeople(db) : Promise.resolve([]),
    listRecentMails(db, 12),
    countMailsByState(db),
  ]);
  const tz = plant.timeZone;
  const when = (ts: number) => formatPlantTime(ts, tz, "EEE d MMM HH:mm");

  // group the roster by its time windows
  const windows = new Map<string, { startTs: number; endTs: number; shifts: RosterShift[] }>();
  for (const s of shifts) {
    const key = `${s.startTs}-${s.endTs}`;
    const w = windows.get(key) ?? { startTs: s.startTs, endTs: s.endTs, shifts: [] };
    w.shifts.push(s);
    windows.set(key, w);
  }
  const maxOrder = Math.max(1, ...shifts.map((s) => s.escalationOrder));
  const orders = Array.from({ length: maxOrder }, (_, i) => i + 1);

  return (
    <div>
      <PageHeader title="On-call" subtitle="Who is e-mailed when an alert is not acknowledged on the floor, and who next." />
      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="space-y-5">
          <Card title="On call now">
            {onCallNow.length === 0 ? (
              <p className="rounded bg-near-soft px-3 py-2 text-sm text-near">
                Nobody is on call right now: alerts that are not acknowledged will not be e-mailed to anyone.
              </p>
            ) : (
              <ol className="grid gap-3 sm:grid-cols-3" data-testid="oncall-now">
                {onCallNow.map((s) => (
                  <li key={s.id} className="rounded border border-paper-line bg-paper px-3 py-2">
                    <div className="text-xs text-ink-faint">{s.escalationOrder === 1 ? "Called first" : `Order ${s.escalationOrder}: if still unacknowledged`}</div>
                    <div className="font-semibold text-ink">{s.personName}</div>
                    <div className="text-xs text-ink-soft">until {when(s.endTs)}</div>
                  </li>
                ))}
              </ol>
            )}
            <p className="mt-3 text-sm text-ink-soft" data-testid="alerting-summary">
              Alerts of <b>{SEVERITY_WORDS[settings.notifyMinSeverity].toLowerCase()}</b> severity and above that stay unacknowledged for{" "}
              <b>{Math.round(settings.notifyAfterS / 60)} min</b> are e-mailed to order 1; after a further <b>{Math.round(settings.escalateAfterS / 60)} min</b> without an
              acknowledgement, to the next order. Shelved alerts are not e-mailed. The daily digest goes out at {String(settings.digestHourLocal).padStart(2, "0")}:00.
            </p>
          </Card>

          <Card title={`Roster, the next ${WEEKS_SHOWN} weeks`} aside={<span className="text-xs text-ink-faint">plant time ({tz})</span>}>
            {windows.size === 0 ? (
              <EmptyState title="Nothing on the roster">{isAdmin ? "Add shifts with the form beside." : "An admin fills the roster."}</EmptyState>
            ) : (
              <div className="relative -mx-4 overflow-x-auto px-4" tabIndex={0} role="region" aria-label="Roster (scrolls sideways on a narrow screen)">
                <table className="w-full text-sm" data-testid="roster">
                  <thead className="text-left text-xs text-ink-faint">
                    <tr>
                      <th className="pb-2 pr-3 font-medium">From</th>
                      <th className="pb-2 pr-3 font-medium">Until</th>
                      {orders.map((o) => (
                        <th key={o} className="pb-2 pr-3 font-medium">
                          {o === 1 ? "First called" : `Order ${o}`}
                        </th>
                      ))}
                    </tr>
                  </thead>
                  <tbody>
                    {[...windows.values()].map((w) => (
                      <tr key={`${w.startTs}-${w.endTs}`} className="border-t border-paper-line align-top">
                        <td className="num py-1.5 pr-3 whitespace-nowrap">{when(w.startTs)}</td>
                        <td className="num py-1.5 pr-3 whitespace-nowrap">{when(w.endTs)}</td>
                        {orders.map((o) => (
                          <td key={o} className="py-1.5 pr-3">
                            {w.shifts
                              .filter((s) => s.escalationOrder === o)
                              .map((s) => (
                                <div key={s.id} className="flex items-baseline gap-2">
                                  <span className={s.personActive ? "" : "text-ink-faint line-through"}>{s.personName}</span>
                                  {s.note ? <span className="text-xs text-ink-faint">{s.note}</span> : null}
                                  {isAdmin ? <RemoveShiftButton id={s.id} label={`${s.personName} from ${when(s.startTs)}`} /> : null}
                                </div>
                              ))}
                          </td>
                        ))}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
          </Card>

          <Card title="Recent e-mails" aside={<span className="text-xs text-ink-faint">{mailCounts.pending + mailCounts.sending} waiting · {mailCounts.sent} sent · {mailCounts.failed} failed</span>}>
            {mails.length === 0 ? (
              <p className="text-sm text-ink-faint">No e-mail has been queued yet.</p>
            ) : (
              <div className="relative -mx-4 overflow-x-auto px-4" tabIndex={0} role="region" aria-label="Recent e-mails (scrolls sideways on a narrow screen)">
                <table className="w-full min-w-[30rem] text-sm" data-testid="recent-mails">
                  <tbody>
                    {mails.map((m) => (
                      <tr key={m.id} className="border-t border-paper-line first:border-0 align-top">
                        <td className="num w-32 py-1.5 pr-3 text-xs text-ink-faint">{when(m.createdTs)}</td>
                        <td className="py-1.5 pr-3">
                          <div>{m.subject}</div>
                          <div className="text-xs text-ink-faint">to {isAdmin ? m.toAddress : m.toAddress.replace(/^[^@]*/, "…")}</div>
                        </td>
                        <td className="w-40 py-1.5 text-xs">
                          {m.state === "sent" && m.sentTs !== null ? `sent ${formatPlantTime(m.sentTs, tz, "HH:mm")}` : m.state === "failed" ? <span className="text-over">failed: {m.lastError}</span> : `waiting (${m.attempts} tries)`}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
          </Card>
        </div>

        <div className="space-y-5">
          {isAdmin ? (
            <>
              <Card title="Add to the roster">
                <AddShiftForm
                  people={people.map((p) => ({ id: p.id, name: p.name }))}
                  defaultStart={toPlantLocalInput(Math.ceil(now / 3_600_000) * 3_600_000, tz)}
                  defaultEnd={toPlantLocalInput(Math.ceil(now / 3_600_000) * 3_600_000 + 7 * 86_400_000, tz)}
                />
              </Card>
              <Card title="Alert e-mails">
                <AlertingSettingsForm
                  notifyMinSeverity={settings.notifyMinSeverity}
                  notifyAfterMin={settings.notifyAfterS / 60}
                  escalateAfterMin={settings.escalateAfterS / 60}
                  digestHourLocal={settings.digestHourLocal}
                />
              </Card>
              <Card title="Plant location">
                <p className="mb-2 text-sm text-ink-soft">For the outdoor forecast behind tomorrow&apos;s dry-air warning.</p>
                <PlantLocationForm latitude={plant.latitude ?? null} longitude={plant.longitude ?? null} />
              </Card>
            </>
          ) : (
            <Card title="Changes">
              <p className="text-sm text-ink-soft">Admins fill the roster and set when alerts are e-mailed. Ask one if you need to swap a shift.</p>
            </Card>
          )}
        </div>
      </div>
    </div>
  );
}
