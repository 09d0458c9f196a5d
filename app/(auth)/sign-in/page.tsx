import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { getSession } from "@/app/_server/session";
import { Wordmark } from "@/components/ui/logo";
import { safeCallbackPath } from "@/lib/http-security";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };
export const dynamic = "force-dynamic";

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  if (await getSession()) redirect("/floor");
  const sp = await searchParams;
  // only paths on this site: never bounce a person to another host after sign-in
  const callbackUrl = safeCallbackPath(sp.callbackUrl);
  return (
    <div className="flex min-h-screen items-center justify-center bg-paper px-4">
      <div className="w-full max-w-sm">
        <div className="mb-6 text-brand-deep">
          <Wordmark className="text-2xl" />
          <p className="mt-2 text-sm text-ink-soft">Static charge and humidity on every line, live.</p>
        </div>
        <div className="rounded-card border border-paper-line bg-paper-raised p-6 shadow-sm">
          <SignInForm callbackUrl={callbackUrl} />
        </div>
      </div>
    </div>
  );
}
