// Wallboard: choose the hall this screen shows (the choice is the URL, so a kiosk bookmarks it).
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantLayout } from "@/db/queries/plant";
import { LogoMark } from "@/components/ui/logo";

export const dynamic = "force-dynamic";

export default async function WallboardChooser() {
  const { allowed } = await requirePagePermission("view", "/wallboard");
  if (!allowed) return <p className="p-10 text-2xl">Your role cannot see the wallboard (403).</p>;
  const areas = await getPlantLayout(getDb());
  return (
    <div className="mx-auto max-w-4xl px-8 py-16">
      <div className="mb-10 flex items-center gap-3 text-night-soft">
        <LogoMark className="h-7 w-7" />
        <span className="text-xl">Stillfield wallboard</span>
      </div>
      <h1 className="mb-6 text-3xl font-semibold">Which hall does this screen show?</h1>
      <ul className="grid gap-4 sm:grid-cols-2">
        {areas.map((a) => (
          <li key={a.id}>
            <Link
              href={`/wallboard/${a.id}`}
              className="block rounded-card border border-night-line bg-night-raised px-6 py-5 text-2xl font-semibold hover:border-night-soft"
              data-testid="wall-hall-link"
            >
              {a.name}
              <span className="mt-1 block text-base font-normal text-night-soft">{a.lines.map((l) => l.name).join(" · ") || "No lines yet"}</span>
            </Link>
          </li>
        ))}
      </ul>
      <p className="mt-10 text-night-soft">
        Put the browser in full screen (F11). The board stays live on its own; sign the screen in as a viewer (kiosk) account.{" "}
        <Link href="/floor" className="underline">
          Back to the Floor
        </Link>
      </p>
    </div>
  );
}
