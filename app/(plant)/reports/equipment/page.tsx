// Equipment compliance for a period (default: the last 90 days).
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getComplianceReport } from "@/db/use-cases/compliance-report";
import { formatDay, formatDayTime } from "@/lib/reports/format";
import { complianceParamsSchema, resolveComplianceParams } from "@/lib/reports/params";
import { Forbidden, PageHeader } from "@/components/ui/page";
import { ComplianceReportView } from "@/components/reports/compliance-report";
import { PrintButton } from "@/components/reports/print-button";
import { controlInput, controlLabel, Downloads, Notice, PrintHeader, primaryButton, ReportTabs, StateLegend } from "@/components/reports/report-parts";
import { firstErrors, firstValues, type RawSearchParams } from "@/components/reports/search-params";

export const metadata: Metadata = { title: "Equipment compliance" };
export const dynamic = "force-dynamic";

export default async function EquipmentReportPage({ searchParams }: { searchParams: Promise<RawSearchParams> }) {
  const { allowed, session } = await requirePagePermission("view", "/reports/equipment");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Equipment compliance" />
        <Forbidden what="see reports" />
      </div>
    );
  }
  const db = await getReadDb();
  const now = Date.now();
  const settings = await getPlantSettings(db);
  const raw = firstValues(await searchParams);
  const parsed = complianceParamsSchema.safeParse(raw);
  const errors = parsed.success ? {} : firstErrors(parsed.error.issues);
  const range = resolveComplianceParams(parsed.success ? parsed.data : {}, settings.timeZone, now);

  const controls = (
    <form method="get" className="mb-4 flex flex-wrap items-end gap-3 print:hidden" data-testid="compliance-controls">
      <label className="block">
        <span className={controlLabel}>First day</span>
        <input type="date" name="from" defaultValue={raw.from ?? range.from} className={controlInput} />
        {errors.from ? <span className="mt-0.5 block text-xs text-over">{errors.from}</span> : null}
      </label>
      <label className="block">
        <span className={controlLabel}>Last day</span>
        <input type="date" name="to" defaultValue={raw.to ?? range.to} className={controlInput} />
        {errors.to ? <span className="mt-0.5 block text-xs text-over">{errors.to}</span> : null}
      </label>
      <button type="submit" className={primaryButton}>
        Show
      </button>
    </form>
  );

  if (!parsed.success) {
    return (
      <div>
        <PageHeader title="Equipment compliance" />
        <ReportTabs active="equipment" />
        {controls}
        <Notice tone="warn">Correct the dates to see the report.</Notice>
      </div>
    );
  }

  const report = await getComplianceReport(db, range, now);
  const zone = report.window.timeZone;
  const period = `${formatDay(report.window.startTs, zone)} to ${formatDay(report.window.endTs - 1, zone)} (${zone})`;
  const q = `from=${range.from}&to=${range.to}`;
  return (
    <div>
      <PrintHeader title="Equipment compliance" period={period} plantName={report.plantName} generated={`Printed ${formatDayTime(now, zone)} by ${session.name}`} />
      <div className="print:hidden">
        <PageHeader title="Equipment compliance" subtitle={period} actions={<PrintButton label="Print report" />} />
        <ReportTabs active="equipment" />
      </div>
      {controls}
      <ComplianceReportView report={report} />
      <Downloads
        links={[
          { href: `/api/reports/equipment/csv?${q}&table=neutralizers`, label: "Neutralizers" },
          { href: `/api/reports/equipment/csv?${q}&table=meters`, label: "Calibration" },
        ]}
      />
      <StateLegend />
    </div>
  );
}
