// Calculators: the engineer's computations with their formulas, sources and cautions. Interactive
// client components computing with lib/physics; the hall and line presets come from the plant.
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantLayout } from "@/db/queries/plant";
import { listHallAirSupply } from "@/db/queries/reports";
import { Forbidden, PageHeader } from "@/components/ui/page";
import { HumidityPlanner, type HallPreset } from "@/components/calculators/humidity-planner";
import { ChargeExplainer } from "@/components/calculators/charge-explainer";
import { SparkCheck, type SolventLinePreset } from "@/components/calculators/spark-check";
import { RelaxationTime } from "@/components/calculators/relaxation-time";

export const metadata: Metadata = { title: "Calculators" };
export const dynamic = "force-dynamic";

export default async function CalculatorsPage() {
  const { allowed } = await requirePagePermission("view", "/calculators");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Calculators" />
        <Forbidden what="see this page" />
      </div>
    );
  }
  const db = getDb();
  const [plant, hallRows] = await Promise.all([
    getPlantLayout(db),
    listHallAirSupply(db),
  ]);
  const halls: HallPreset[] = plant.map((a) => {
    const extra = hallRows.find((h) => h.id === a.id);
    return { id: a.id, name: a.name, tempSetpointC: a.tempSetpointC, rhMinPct: a.rhMinPct, rhMaxPct: a.rhMaxPct, airflowM3PerH: extra?.airflowM3PerH ?? 0, humidifierKgPerH: extra?.humidifierKgPerH ?? 0 };
  });
  const lines: SolventLinePreset[] = plant.flatMap((a) =>
    a.lines.map((l) => ({ id: l.id, name: l.name, solventName: l.solventName, solventMieMj: l.solventMieMj, conductorCapacitancePf: l.conductorCapacitancePf })),
  );
  const jump = [
    { href: "#humidity", label: "Humidity planner" },
    { href: "#charge", label: "Charge reading" },
    { href: "#spark", label: "Spark hazard" },
    { href: "#relaxation", label: "Relaxation time" },
  ];
  return (
    <div>
      <PageHeader title="Calculators" subtitle="Each shows its formula, source and assumptions. Screening aids for engineers: they do not replace a qualified assessment." />
      <nav aria-label="Calculators" className="mb-4 flex flex-wrap gap-2 text-sm">
        {jump.map((j) => (
          <a key={j.href} href={j.href} className="rounded border border-paper-line bg-paper-raised px-2.5 py-1 text-ink-soft hover:border-brand hover:text-brand-deep">
            {j.label}
          </a>
        ))}
      </nav>
      <div className="grid items-start gap-5 xl:grid-cols-2">
        <HumidityPlanner halls={halls} />
        <ChargeExplainer />
        <SparkCheck lines={lines} />
        <RelaxationTime />
      </div>
    </div>
  );
}
