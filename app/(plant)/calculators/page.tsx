import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { ComingLater, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Calculators" };

export default async function Page() {
  const { allowed } = await requirePagePermission("view", "/calculators");
  return (
    <div>
      <PageHeader title="Calculators" />
      {allowed ? <ComingLater what="Calculators" issue="the calculators and reports issue (#7)" /> : <Forbidden what="see this page" />}
    </div>
  );
}
