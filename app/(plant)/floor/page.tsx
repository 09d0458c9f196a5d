// The Floor (landing page after sign-in): every hall and line at a glance, live.
// The server renders the first snapshot so the page is complete before any script runs; the
// client keeps it current from the live stream.
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getCachedFloor } from "@/app/_server/floor-cache";
import { Forbidden } from "@/components/ui/page";
import { FloorBoard } from "@/components/floor/floor-board";

export const metadata: Metadata = { title: "Floor" };
export const dynamic = "force-dynamic";

export default async function FloorPage() {
  const { allowed } = await requirePagePermission("view", "/floor");
  if (!allowed) return <Forbidden what="see the Floor" />;
  const { snapshot } = await getCachedFloor();
  return <FloorBoard initial={snapshot} />;
}
