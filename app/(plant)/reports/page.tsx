// Reports: the three reports a plant hands over and reviews, each printable and downloadable.
import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { describeShift, lastCompletedShift } from "@/lib/plant-time";
import { Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Reports" };
export const dynamic = "force-dynamic";

export default async function ReportsPage() {
  const { allowed } = await requirePagePermission("view", "/reports");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Reports" />
        <Forbidden what="see reports" />
      </div>
    );
  }
  const settings = await getPlantSettings(getDb());
  const last = lastCompletedShift(Date.now(), settings);
  const cards = [
    {
      href: "/reports/handover",
      title: "Shift handover",
      text: "Alerts with who acknowledged them and what they noted, time each point spent over its limit, worst readings, lowest humidity per hall, neutralizers to see to, line notes. Print it or e-mail it to the next shift lead.",
      hint: `Opens on the last completed shift: ${describeShift(last)}`,
    },
    {
      href: "/reports/weekly",
      title: "Weekly line review",
      text: "Per line: time over limits, alert counts and the noisiest rules, and how charge follows humidity and line speed at each point (least-squares fit with r²).",
      hint: "Opens on this week; choose any line and week.",
    },
    {
      href: "/reports/equipment",
      title: "Equipment compliance",
      text: "Neutralizer checks done and due, pass rate, overdue cleaning and checks, and meter and logger calibration dates.",
      hint: "Opens on the last 90 days.",
    },
  ];
  return (
    <div>
      <PageHeader title="Reports" subtitle="Printable, with CSV downloads. Times are in the plant's time zone." />
      <div className="grid gap-4 lg:grid-cols-3">
        {cards.map((c) => (
          <Link key={c.href} href={c.href} className="group rounded-card border border-paper-line bg-paper-raised p-4 hover:border-brand" data-testid="report-card">
            <h2 className="font-semibold text-ink group-hover:text-brand-deep">{c.title}</h2>
            <p className="mt-1.5 text-sm leading-relaxed text-ink-soft">{c.text}</p>
            <p className="mt-3 text-xs text-ink-faint">{c.hint}</p>
          </Link>
        ))}
      </div>
    </div>
  );
}
