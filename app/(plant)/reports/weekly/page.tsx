// Weekly review of one line (the ISO week in the plant's time zone holding the chosen day).
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getReadDb } from "@/db/client";
import { getPlantLayout } from "@/db/queries/plant";
import { getPlantSettings } from "@/db/queries/reports";
import { getWeeklyReport } from "@/db/use-cases/weekly-report";
import { addDaysToDate, localDateOf, weekWindow } from "@/lib/plant-time";
import { formatDayTime, formatTs } from "@/lib/reports/format";
import { resolveWeek, weeklyParamsSchema } from "@/lib/reports/params";
import { Forbidden, PageHeader } from "@/components/ui/page";
import { PrintButton } from "@/components/reports/print-button";
import { controlInput, controlLabel, Downloads, Notice, PrintHeader, primaryButton, ReportTabs, StateLegend } from "@/components/reports/report-parts";
import { firstErrors, firstValues, type RawSearchParams } from "@/components/reports/search-params";
import { WeeklyReportView } from "@/components/reports/weekly-report";

export const metadata: Metadata = { title: "Weekly line review" };
export const dynamic = "force-dynamic";

export default async function WeeklyPage({ searchParams }: { searchParams: Promise<RawSearchParams> }) {
  const { allowed, session } = await requirePagePermission("view", "/reports/weekly");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Weekly line review" />
        <Forbidden what="see reports" />
      </div>
    );
  }
  const db = await getReadDb();
  const now = Date.now();
  const [settings, plant] = await Promise.all([getPlantSettings(db), getPlantLayout(db)]);
  const raw = firstValues(await searchParams);
  const parsed = weeklyParamsSchema.safeParse(raw);
  const errors = parsed.success ? {} : firstErrors(parsed.error.issues);
  const firstLine = plant.flatMap((a) => a.lines)[0];
  const lineId = (parsed.success ? parsed.data.line : undefined) ?? firstLine?.id;
  const week = resolveWeek(parsed.success ? parsed.data : {}, settings.timeZone, now);
  const report = parsed.success && lineId !== undefined ? await getWeeklyReport(db, { lineId, date: week }, now) : null;
  if (parsed.success && lineId !== undefined && !report) errors.line = "There is no such line";
  const thisWeek = weekWindow(localDateOf(now, settings.timeZone), settings.timeZone);

  const controls = (
    <form method="get" className="mb-4 flex flex-wrap items-end gap-3 print:hidden" data-testid="weekly-controls">
      <label className="block">
        <span className={controlLabel}>Line</span>
        <select name="line" defaultValue={lineId ?? ""} className={controlInput}>
          {plant.map((a) => (
            <optgroup key={a.id} label={a.name}>
              {a.lines.map((l) => (
                <option key={l.id} value={l.id}>
                  {l.name}
                </option>
              ))}
            </optgroup>
          ))}
        </select>
        {errors.line ? <span className="mt-0.5 block text-xs text-over">{errors.line}</span> : null}
      </label>
      <label className="block">
        <span className={controlLabel}>Any day of the week</span>
        <input type="date" name="week" defaultValue={raw.week ?? week} className={controlInput} />
        {errors.week ? <span className="mt-0.5 block text-xs text-over">{errors.week}</span> : null}
      </label>
      <button type="submit" className={primaryButton}>
        Show
      </button>
      {report ? (
        <span className="flex gap-2 pb-1.5 text-sm">
          <Link href={`/reports/weekly?line=${report.line.id}&week=${addDaysToDate(report.window.firstDate, -7)}`} className="text-brand-deep hover:underline">
            ← Previous week
          </Link>
          {report.window.startTs < thisWeek.startTs ? (
            <Link href={`/reports/weekly?line=${report.line.id}&week=${addDaysToDate(report.window.firstDate, 7)}`} className="text-brand-deep hover:underline">
              Next week →
            </Link>
          ) : null}
        </span>
      ) : null}
    </form>
  );

  if (!report) {
    return (
      <div>
        <PageHeader title="Weekly line review" />
        <ReportTabs active="weekly" />
        {controls}
        <Notice tone="warn">{firstLine ? "Choose a line and a day in the week to review." : "The plant has no lines yet."}</Notice>
      </div>
    );
  }

  const zone = report.window.timeZone;
  const period = `${report.line.name} · week of ${formatTs(report.window.startTs, zone, "EEE d MMM yyyy")} to ${formatTs(report.window.endTs - 1, zone, "EEE d MMM yyyy")} (${zone})`;
  const q = `line=${report.line.id}&week=${report.window.firstDate}`;
  return (
    <div>
      <PrintHeader title="Weekly line review" period={period} plantName={report.plantName} generated={`Printed ${formatDayTime(now, zone)} by ${session.name}`} />
      <div className="print:hidden">
        <PageHeader title="Weekly line review" subtitle={period} actions={<PrintButton label="Print review" />} />
        <ReportTabs active="weekly" />
      </div>
      {controls}
      {report.window.endTs > now ? <Notice tone="warn">This week is not over yet: the figures cover it up to {formatDayTime(now, zone)}.</Notice> : null}
      <WeeklyReportView report={report} />
      <Downloads
        links={[
          { href: `/api/reports/weekly/csv?${q}&table=points`, label: "Points and fits" },
          { href: `/api/reports/weekly/csv?${q}&table=rules`, label: "Noisiest rules" },
          { href: `/api/reports/weekly/csv?${q}&table=pairs`, label: "Hourly pairs" },
        ]}
      />
      <StateLegend />
    </div>
  );
}
