// Shift handover for a chosen shift (default: the last completed one). Print-friendly; CSV per
// table; shift leads and up can e-mail it to whoever takes over.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getReadDb } from "@/db/client";
import { getPlantSettings, listHandoverRecipients } from "@/db/queries/reports";
import { getHandoverReport } from "@/db/use-cases/handover-report";
import { can } from "@/lib/permissions";
import { describeShift, nextShift, previousShift, shiftAt } from "@/lib/plant-time";
import { formatDayTime } from "@/lib/reports/format";
import { handoverParamsSchema, resolveHandoverParams } from "@/lib/reports/params";
import { Forbidden, PageHeader } from "@/components/ui/page";
import { HandoverReportView } from "@/components/reports/handover-report";
import { HandoverEmailForm } from "@/components/reports/handover-email-form";
import { PrintButton } from "@/components/reports/print-button";
import { controlInput, controlLabel, Downloads, Notice, PrintHeader, primaryButton, ReportTabs, Section, StateLegend } from "@/components/reports/report-parts";
import { firstErrors, firstValues, type RawSearchParams } from "@/components/reports/search-params";
import { emailHandover } from "../actions";

export const metadata: Metadata = { title: "Shift handover" };
export const dynamic = "force-dynamic";

export default async function HandoverPage({ searchParams }: { searchParams: Promise<RawSearchParams> }) {
  const { allowed, session } = await requirePagePermission("view", "/reports/handover");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Shift handover" />
        <Forbidden what="see reports" />
      </div>
    );
  }
  const db = await getReadDb();
  const now = Date.now();
  const settings = await getPlantSettings(db);
  const raw = firstValues(await searchParams);
  const parsed = handoverParamsSchema.safeParse(raw);
  const errors = parsed.success ? {} : firstErrors(parsed.error.issues);
  const which = resolveHandoverParams(parsed.success ? parsed.data : {}, settings, now);
  const report = parsed.success ? await getHandoverReport(db, which, now) : null;
  if (parsed.success && !report) errors.shift = `The plant has no shift called “${which.shift}”`;
  const current = shiftAt(now, settings);

  const controls = (
    <form method="get" className="mb-4 flex flex-wrap items-end gap-3 print:hidden" data-testid="handover-controls">
      <label className="block">
        <span className={controlLabel}>Shift date</span>
        <input type="date" name="date" defaultValue={raw.date ?? which.date} className={controlInput} aria-invalid={Boolean(errors.date)} />
        {errors.date ? <span className="mt-0.5 block text-xs text-over">{errors.date}</span> : null}
      </label>
      <label className="block">
        <span className={controlLabel}>Shift</span>
        <select name="shift" defaultValue={which.shift} className={controlInput} aria-invalid={Boolean(errors.shift)}>
          {settings.shifts.map((s) => (
            <option key={s.name} value={s.name}>
              {s.name} (from {s.start})
            </option>
          ))}
        </select>
        {errors.shift ? <span className="mt-0.5 block text-xs text-over">{errors.shift}</span> : null}
      </label>
      <button type="submit" className={primaryButton}>
        Show
      </button>
      {report ? (
        <span className="flex gap-2 pb-1.5 text-sm">
          <ShiftLink w={previousShift(report.window, settings)} label="← Previous shift" />
          {report.window.startTs < current.startTs ? <ShiftLink w={nextShift(report.window, settings)} label="Next shift →" /> : null}
        </span>
      ) : null}
    </form>
  );

  if (!report) {
    return (
      <div>
        <PageHeader title="Shift handover" />
        <ReportTabs active="handover" />
        {controls}
        <Notice tone="warn">Choose a date and one of the plant&apos;s shifts to see its handover.</Notice>
      </div>
    );
  }

  const q = `date=${encodeURIComponent(report.window.date)}&shift=${encodeURIComponent(report.window.name)}`;
  const period = `${describeShift(report.window)} (${report.window.timeZone})`;
  const canSend = can(session.role, "note.add");
  const recipients = canSend ? (await listHandoverRecipients(db)).filter((r) => r.id !== session.personId) : [];

  return (
    <div>
      <PrintHeader title="Shift handover" period={period} plantName={report.plantName} generated={`Printed ${formatDayTime(now, report.window.timeZone)} by ${session.name}`} />
      <div className="print:hidden">
        <PageHeader title="Shift handover" subtitle={period} actions={<PrintButton label="Print handover" />} />
        <ReportTabs active="handover" />
      </div>
      {controls}
      {report.inProgress ? <Notice tone="warn">This shift is still running: the figures cover it up to {formatDayTime(report.generatedTs, report.window.timeZone)}.</Notice> : null}
      <HandoverReportView report={report} />
      {canSend ? (
        <Section title="Hand over" className="print:hidden" testId="handover-email">
          <HandoverEmailForm action={emailHandover} date={report.window.date} shift={report.window.name} recipients={recipients} />
          <p className="mt-2 text-xs text-ink-faint">The e-mail carries the same sections as this page, with the codes as symbols and words, and a link back here.</p>
        </Section>
      ) : null}
      <Downloads
        links={[
          { href: `/api/reports/handover/csv?${q}&table=alerts`, label: "Alerts" },
          { href: `/api/reports/handover/csv?${q}&table=points`, label: "Points" },
          { href: `/api/reports/handover/csv?${q}&table=halls`, label: "Hall humidity" },
          { href: `/api/reports/handover/csv?${q}&table=neutralizers`, label: "Neutralizers" },
          { href: `/api/reports/handover/csv?${q}&table=notes`, label: "Line notes" },
        ]}
      />
      <StateLegend />
    </div>
  );
}

function ShiftLink({ w, label }: { w: { date: string; name: string }; label: string }) {
  return (
    <Link href={`/reports/handover?date=${encodeURIComponent(w.date)}&shift=${encodeURIComponent(w.name)}`} className="text-brand-deep hover:underline">
      {label}
    </Link>
  );
}
