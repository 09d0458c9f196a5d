import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { ComingLater, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Limits" };

export default async function Page() {
  const { allowed } = await requirePagePermission("view", "/limits");
  return (
    <div>
      <PageHeader title="Limits" />
      {allowed ? <ComingLater what="Limits" issue="the limits and alerts issue (#5)" /> : <Forbidden what="see this page" />}
    </div>
  );
}
