// Alerts: every alert, open ones first, live. Anyone signed in sees the list; shift leads and up
// acknowledge, comment and shelve (the actions check the role again on the server).
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { countOpenAlerts, listAlerts } from "@/db/queries/alert-list";
import { getPlantSettings } from "@/db/queries/equipment";
import { getPlantLayout } from "@/db/queries/plant";
import { AlertsBoard } from "@/components/alerts/alerts-board";
import { parseAlertFilters } from "@/components/alerts/filters";
import { Forbidden, PageHeader } from "@/components/ui/page";
import { can } from "@/lib/permissions";
import { ackAlert, ackAlertGroup, commentAlert, shelveAlert, unshelveAlert } from "./actions";

export const metadata: Metadata = { title: "Alerts" };
export const dynamic = "force-dynamic";

export default async function AlertsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { allowed, session } = await requirePagePermission("view", "/alerts");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Alerts" />
        <Forbidden what="see alerts" />
      </div>
    );
  }
  const filters = parseAlertFilters(await searchParams);
  const db = getDb();
  const now = Date.now();
  const fromTs = filters.hours !== null ? Math.floor((now - filters.hours * 3_600_000) / 60_000) * 60_000 : undefined;
  const [alerts, counts, layout, plant] = await Promise.all([
    listAlerts(db, {
      areaId: filters.area ?? undefined,
      lineId: filters.line ?? undefined,
      openOnly: filters.state === "open",
      states: filters.state !== "open" && filters.state !== "all" ? [filters.state] : undefined,
      fromTs,
      limit: 300,
    }),
    countOpenAlerts(db),
    getPlantLayout(db),
    getPlantSettings(db),
  ]);
  const canRespond = can(session.role, "alert.respond");
  return (
    <div>
      <PageHeader
        title="Alerts"
        subtitle={canRespond ? "Acknowledge what you have seen, comment on what you did, shelve a nuisance alert for a stated time." : "You can see every alert; shift leads and up respond to them."}
      />
      <AlertsBoard
        initial={{ alerts, counts, serverTs: now }}
        initialFilters={filters}
        areas={layout.map((a) => ({ id: a.id, name: a.name, lines: a.lines.map((l) => ({ id: l.id, name: l.name })) }))}
        canRespond={canRespond}
        timeZone={plant.timeZone}
        actions={{ ack: ackAlert, ackGroup: ackAlertGroup, comment: commentAlert, shelve: shelveAlert, unshelve: unshelveAlert }}
      />
    </div>
  );
}
