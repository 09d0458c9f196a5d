import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { ComingLater, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Reports" };

export default async function Page() {
  const { allowed } = await requirePagePermission("view", "/reports");
  return (
    <div>
      <PageHeader title="Reports" />
      {allowed ? <ComingLater what="Reports" issue="the calculators and reports issue (#7)" /> : <Forbidden what="see this page" />}
    </div>
  );
}
