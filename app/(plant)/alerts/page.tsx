import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { ComingLater, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Alerts" };

export default async function Page() {
  const { allowed } = await requirePagePermission("view", "/alerts");
  return (
    <div>
      <PageHeader title="Alerts" />
      {allowed ? <ComingLater what="Alerts" issue="the alerts issue (#5)" /> : <Forbidden what="see this page" />}
    </div>
  );
}
