import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantLayout } from "@/db/queries/plant";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Floor" };
export const dynamic = "force-dynamic";

export default async function FloorPage() {
  const { allowed } = await requirePagePermission("view", "/floor");
  if (!allowed) return <Forbidden what="see the Floor" />;
  const plant = await getPlantLayout(getDb());
  return (
    <div>
      <PageHeader title="Floor" subtitle="Every hall and line at a glance." />
      <div className="grid gap-4 lg:grid-cols-3">
        {plant.map((area) => (
          <Card key={area.id} title={area.name}>
            <ul className="space-y-2">
              {area.lines.map((line) => (
                <li key={line.id} data-testid="floor-line">
                  <Link href={`/lines/${line.id}`} className="font-medium text-brand hover:underline">
                    {line.name}
                  </Link>
                  <span className="ml-2 text-sm text-ink-faint">{line.points.map((p) => p.name).join(" → ")}</span>
                </li>
              ))}
            </ul>
          </Card>
        ))}
      </div>
    </div>
  );
}
