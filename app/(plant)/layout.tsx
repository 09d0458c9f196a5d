// The signed-in shell: wordmark, navigation, who is signed in. Every page below checks its own
// permission as well; this layout only makes sure someone is signed in.
import Link from "next/link";
import { redirect } from "next/navigation";
import { getSession } from "@/app/_server/session";
import { Providers } from "@/components/providers";
import { type NavItem } from "@/components/shell/nav-links";
import { NavMenu, OfflineNotice } from "@/components/shell/nav-menu";
import { ServiceWorkerRegistration } from "@/components/shell/service-worker";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { Wordmark } from "@/components/ui/logo";
import { can, ROLE_LABELS } from "@/lib/permissions";

export const dynamic = "force-dynamic";

export default async function PlantLayout({ children }: { children: React.ReactNode }) {
  const session = await getSession();
  if (!session) redirect("/sign-in");
  const items: NavItem[] = [
    { href: "/floor", label: "Floor" },
    { href: "/alerts", label: "Alerts" },
    { href: "/limits", label: "Limits" },
    { href: "/alert-load", label: "Alert load" },
    { href: "/equipment", label: "Equipment" },
    { href: "/checks", label: "Checks" },
    { href: "/maintenance", label: "Planned work" },
    { href: "/surveys", label: "Surveys" },
    { href: "/devices", label: "Devices" },
    { href: "/gateways", label: "Gateways" },
    { href: "/reports", label: "Reports" },
    { href: "/calculators", label: "Calculators" },
    { href: "/oncall", label: "On-call" },
    { href: "/notifications", label: "My notifications" },
  ];
  if (can(session.role, "people.manage")) items.push({ href: "/people", label: "People" });
  if (can(session.role, "health.view")) items.push({ href: "/health", label: "Health" });
  return (
    <Providers>
      <div className="min-h-screen">
        <header className="no-print sticky top-0 z-20 border-b border-paper-line bg-paper-raised/95 backdrop-blur">
          <div className="mx-auto flex max-w-[1600px] flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
            <Link href="/floor" className="text-brand-deep">
              <Wordmark />
            </Link>
            <NavMenu items={items} />
            <div className="ml-auto flex min-w-0 items-center gap-3 text-sm">
              <span className="min-w-0 truncate text-ink-soft" data-testid="signed-in-as">
                {session.name} <span className="hidden text-ink-faint sm:inline">· {ROLE_LABELS[session.role]}</span>
              </span>
              <SignOutButton />
            </div>
          </div>
          <OfflineNotice />
          <ServiceWorkerRegistration />
        </header>
        <main className="mx-auto max-w-[1600px] px-3 py-4 sm:px-4 sm:py-5">{children}</main>
      </div>
    </Providers>
  );
}
