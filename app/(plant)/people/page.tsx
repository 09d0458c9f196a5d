import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { listPeople } from "@/db/queries/people";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { AddPersonForm, PersonRow } from "./people-forms";

export const metadata: Metadata = { title: "People" };
export const dynamic = "force-dynamic";

export default async function PeoplePage() {
  const { allowed, session } = await requirePagePermission("people.manage", "/people");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="People" />
        <Forbidden what="manage people" />
      </div>
    );
  }
  const people = await listPeople(getDb());
  return (
    <div>
      <PageHeader title="People" subtitle="Who can sign in, and what each role may do." />
      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <Card title={`${people.length} people`}>
          <div className="relative -mx-4 overflow-x-auto px-4" tabIndex={0} role="region" aria-label="People (scrolls sideways on a narrow screen)">
            <table className="w-full text-sm">
              <thead className="text-left text-xs text-ink-faint">
                <tr>
                  <th className="pb-2 font-medium">Name</th>
                  <th className="pb-2 font-medium">Role</th>
                  <th className="pb-2 font-medium">Status</th>
                  <th className="pb-2 font-medium">Reset password</th>
                </tr>
              </thead>
              <tbody>
                {people.map((p) => (
                  <PersonRow key={p.id} person={p} isSelf={p.id === session.personId} />
                ))}
              </tbody>
            </table>
          </div>
        </Card>
        <Card title="Add a person">
          <AddPersonForm />
          <div className="mt-4 border-t border-paper-line pt-3 text-xs leading-relaxed text-ink-faint">
            <p><b>Viewer</b>: sees the Floor, lines, alerts and reports.</p>
            <p><b>Shift lead</b>: also acknowledges and shelves alerts, adds line notes.</p>
            <p><b>Engineer</b>: also edits limits and equipment, records checks, uploads, imports.</p>
            <p><b>Admin</b>: also manages people, the on-call roster and devices.</p>
          </div>
        </Card>
      </div>
    </div>
  );
}
