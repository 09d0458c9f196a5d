// The Floor (landing page after sign-in): every hall and line at a glance, live.
// The server renders the first snapshot so the page is complete before any script runs; the
// client keeps it current from the live stream.
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getCachedFloor } from "@/app/_server/floor-cache";
import { Forbidden } from "@/components/ui/page";
import { FloorBoard } from "@/components/floor/floor-board";
import { DryAirBanner } from "@/components/floor/dry-air-banner";
import { getDb } from "@/db/client";
import { loadDryAirWarnings } from "@/db/queries/forecast";
import { roleRank } from "@/lib/permissions";

export const metadata: Metadata = { title: "Floor" };
export const dynamic = "force-dynamic";

export default async function FloorPage() {
  const { session, allowed } = await requirePagePermission("view", "/floor");
  if (!allowed) return <Forbidden what="see the Floor" />;
  // tomorrow's dry-air warning is for engineers and up (they plan the humidification)
  const [{ snapshot }, dryAir] = await Promise.all([getCachedFloor(), roleRank(session.role) >= roleRank("engineer") ? loadDryAirWarnings(getDb(), Date.now()) : Promise.resolve(null)]);
  return <FloorBoard initial={snapshot} notice={dryAir ? <DryAirBanner warnings={dryAir} /> : null} />;
}
