// The wallboard for one hall: full screen, dark, large figures, live.
import type { Metadata } from "next";
import { z } from "zod";
import { notFound, requirePagePermission } from "@/app/_server/session";
import { getCachedFloor } from "@/app/_server/floor-cache";
import { Wallboard } from "@/components/floor/wallboard";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Wallboard" };

export default async function WallboardPage({ params }: { params: Promise<{ areaId: string }> }) {
  const { areaId } = await params;
  const { allowed } = await requirePagePermission("view", `/wallboard/${areaId}`);
  if (!allowed) return <p className="p-10 text-2xl">Your role cannot see the wallboard (403).</p>;
  const id = z.coerce.number().int().positive().safeParse(areaId);
  if (!id.success) notFound();
  const { snapshot } = await getCachedFloor(id.data);
  if (snapshot.areas.length === 0) notFound();
  return <Wallboard initial={snapshot} areaId={id.data} />;
}
