// CSV import: an instrument's check log, or the humidity history of a logger that was not
// connected. Preview with the detected columns and units, map them, import; every rejected row
// is listed with its line number and reason.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { getPlaceOptions, getPlantSettings } from "@/db/queries/equipment";
import { listRecentImports } from "@/db/queries/imports";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { fmtDateTime } from "../../equipment/_components/format";
import { ImportWizard } from "./import-wizard";

export const metadata: Metadata = { title: "Import CSV" };
export const dynamic = "force-dynamic";

export default async function ImportPage() {
  const { allowed } = await requirePagePermission("import.run", "/checks/import");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Import CSV" />
        <Forbidden what="import files" />
      </div>
    );
  }
  const db = getDb();
  const [places, recent, plant] = await Promise.all([getPlaceOptions(db), listRecentImports(db, 10), getPlantSettings(db)]);
  return (
    <div>
      <nav className="mb-2 text-xs text-ink-faint">
        <Link href="/checks" className="hover:underline">
          Checks
        </Link>{" "}
        / Import
      </nav>
      <PageHeader title="Import CSV" subtitle="A check log exported by a charged-plate instrument, or the history of a standalone temperature/humidity logger." />
      <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <ImportWizard halls={places.areas} rawRetentionDays={getEnv().RAW_RETENTION_DAYS} timeZone={plant.timeZone} />
        <div className="space-y-5">
          <Card title="What the import understands">
            <ul className="list-disc space-y-1 pl-4 text-sm text-ink-soft">
              <li>Commas, semicolons, tabs; decimal commas; a byte-order mark; lines of instrument details before the column names.</li>
              <li>Dates as 2026-12-03 14:05, 03/12/2026 14:05, 03.12.2026, with or without a separate time column; times without a zone are plant time ({plant.timeZone}) unless the column says UTC.</li>
              <li>Units in the column names: s or ms, V or mV, °C or °F.</li>
              <li>The same file or overlapping rows imported again add nothing twice.</li>
            </ul>
          </Card>
          <Card title="Recent imports">
            {recent.length === 0 ? (
              <p className="text-sm text-ink-faint">None yet.</p>
            ) : (
              <ul className="divide-y divide-paper-line text-sm">
                {recent.map((r) => (
                  <li key={r.id} className="py-1.5">
                    <span className="font-medium">{r.originalName}</span>
                    <span className="block text-xs text-ink-faint">
                      {r.kind === "check_log" ? "Check log" : "Humidity history"} · {fmtDateTime(r.createdTs, plant.timeZone)} · {r.rowsImported} new, {r.rowsRejected} rejected
                      {r.personName ? ` · ${r.personName}` : ""}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </Card>
        </div>
      </div>
    </div>
  );
}
