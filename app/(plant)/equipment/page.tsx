import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { ComingLater, Forbidden, PageHeader } from "@/components/ui/page";

export const metadata: Metadata = { title: "Equipment" };

export default async function Page() {
  const { allowed } = await requirePagePermission("view", "/equipment");
  return (
    <div>
      <PageHeader title="Equipment" />
      {allowed ? <ComingLater what="Equipment" issue="the equipment and checks issue (#6)" /> : <Forbidden what="see this page" />}
    </div>
  );
}
