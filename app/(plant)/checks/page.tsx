import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { ComingLater, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Checks" };

export default async function Page() {
  const { allowed } = await requirePagePermission("view", "/checks");
  return (
    <div>
      <PageHeader title="Checks" />
      {allowed ? <ComingLater what="Checks" issue="the equipment and checks issue (#6)" /> : <Forbidden what="see this page" />}
    </div>
  );
}
