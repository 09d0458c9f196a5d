// My notifications: a person's own mobile number and which alert severities reach them by text
// and by push, and push on this phone. An admin may open anyone's (?person=<id>).
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getNotificationSettings } from "@/db/queries/my-notifications";
import { listRosterPeople } from "@/db/queries/oncall";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { formatPhone } from "@/lib/phone";
import { can } from "@/lib/permissions";
import { AllowPushButton, NotificationSettingsForm } from "./notification-forms";

export const metadata: Metadata = { title: "My notifications" };
export const dynamic = "force-dynamic";

export default async function NotificationsPage({ searchParams }: { searchParams: Promise<{ person?: string }> }) {
  const { session, allowed } = await requirePagePermission("view", "/notifications");
  if (!allowed) return <Forbidden what="see notification settings" />;
  const isAdmin = can(session.role, "people.manage");
  const asked = Number((await searchParams).person);
  const personId = Number.isInteger(asked) && asked > 0 && asked !== session.personId ? asked : session.personId;
  if (personId !== session.personId && !isAdmin) return <Forbidden what="change someone else's notifications" />;
  const db = getDb();
  const [s, roster] = await Promise.all([getNotificationSettings(db, personId), isAdmin ? listRosterPeople(db) : Promise.resolve([])]);
  if (!s) return <Forbidden what="see this person's notifications" />;
  const own = personId === session.personId;
  return (
    <div className="max-w-2xl">
      <PageHeader title={own ? "My notifications" : `Notifications: ${s.name}`} subtitle="Texts and push for alerts, besides the e-mails the on-call roster sends." />
      <div className="space-y-5">
        <Card title="Texts and push">
          <p className="mb-3 text-sm text-ink-soft">Now: {s.phoneE164 ? formatPhone(s.phoneE164) : "no mobile number"} · {s.pushDevices === 1 ? "1 phone" : `${s.pushDevices} phones`} allowed push.</p>
          <NotificationSettingsForm personId={personId} phone={s.phoneE164 ?? ""} smsSeverities={s.smsSeverities} pushSeverities={s.pushSeverities} />
        </Card>
        {own ? (
          <Card title="Push on this phone">
            <AllowPushButton />
          </Card>
        ) : null}
        {isAdmin ? (
          <Card title="Someone else's">
            <form method="get" className="flex flex-wrap items-end gap-2">
              <label className="text-sm text-ink">
                Person{" "}
                <select name="person" defaultValue={personId} className="min-h-11 rounded border border-paper-line bg-paper-raised px-2">
                  {roster.map((p) => (
                    <option key={p.id} value={p.id}>
                      {p.name}
                    </option>
                  ))}
                </select>
              </label>
              <button type="submit" className="min-h-11 rounded border border-paper-line px-3 text-sm text-ink hover:bg-paper-sunk">
                Open
              </button>
            </form>
          </Card>
        ) : null}
      </div>
    </div>
  );
}
