// The wallboard's own full-screen, dark layout, outside the signed-in shell (no navigation).
// It checks the session itself: a floor screen signs in as a viewer-level kiosk person.
import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { getSession } from "@/app/_server/session";
import { Providers } from "@/components/providers";

export const metadata: Metadata = { title: "Wallboard" };
export const dynamic = "force-dynamic";

export default async function WallboardLayout({ children }: { children: React.ReactNode }) {
  const session = await getSession();
  if (!session) redirect("/sign-in?callbackUrl=/wallboard");
  return (
    <Providers>
      <div className="dark min-h-screen bg-night text-night-ink">{children}</div>
    </Providers>
  );
}
