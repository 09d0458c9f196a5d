// A line's page: one chart per measuring point, the hall's climate, the line's speed, notes and
// alerts on a shared time axis. The server checks the role and renders the structure; the
// charts fetch history and follow the live stream in the browser.
import type { Metadata } from "next";
import { z } from "zod";
import { notFound, requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getFloorStructure, getPlantSettings } from "@/db/queries/floor";
import { Forbidden } from "@/components/ui/page";
import { LineDashboard } from "@/components/charts/line-dashboard";
import { can } from "@/lib/permissions";
import { addNote } from "./actions";

export const dynamic = "force-dynamic";

type Params = { lineId: string };

async function findLine(lineIdText: string) {
  const id = z.coerce.number().int().positive().safeParse(lineIdText);
  if (!id.success) return null;
  const areas = await getFloorStructure(getDb());
  for (const area of areas) {
    const line = area.lines.find((l) => l.id === id.data);
    if (line) return { area, line };
  }
  return null;
}

export async function generateMetadata({ params }: { params: Promise<Params> }): Promise<Metadata> {
  const found = await findLine((await params).lineId);
  return { title: found ? found.line.name : "Line" };
}

export default async function LinePage({ params }: { params: Promise<Params> }) {
  const { lineId } = await params;
  const { session, allowed } = await requirePagePermission("view", `/lines/${lineId}`);
  if (!allowed) return <Forbidden what="see line charts" />;
  const found = await findLine(lineId);
  if (!found) notFound();
  const settings = await getPlantSettings(getDb());
  const canAddNote = can(session.role, "note.add");
  const canPlan = can(session.role, "maintenance.plan");
  return (
    <LineDashboard
      area={found.area}
      line={found.line}
      settings={settings}
      canAddNote={canAddNote}
      addNote={canAddNote ? addNote : undefined}
      serverNow={Date.now()}
      planWorkHref={canPlan ? `/maintenance?target=line:${found.line.id}#plan` : undefined}
    />
  );
}
