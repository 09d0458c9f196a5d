"use client";
import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { safeCallbackPath } from "@/lib/http-security";
import { signInMessage } from "@/lib/sign-in-errors";

export function SignInForm({ callbackUrl }: { callbackUrl: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    const fd = new FormData(e.currentTarget);
    const res = await signIn("credentials", {
      email: String(fd.get("email") ?? ""),
      password: String(fd.get("password") ?? ""),
      redirect: false,
    });
    setBusy(false);
    if (!res || res.error) {
      // the server answers with a code (lib/sign-in-errors.ts); its own text is never shown
      setError(signInMessage(res?.error));
      return;
    }
    router.replace(safeCallbackPath(callbackUrl));
    router.refresh();
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      <h1 className="text-lg font-semibold">Sign in</h1>
      <label className="block">
        <span className="text-sm text-ink-soft">E-mail</span>
        <input
          name="email"
          type="email"
          autoComplete="username"
          required
          className="mt-1 block w-full rounded border border-paper-line bg-white px-3 py-2 outline-none focus:border-brand focus:ring-2 focus:ring-brand-soft"
        />
      </label>
      <label className="block">
        <span className="text-sm text-ink-soft">Password</span>
        <input
          name="password"
          type="password"
          autoComplete="current-password"
          required
          className="mt-1 block w-full rounded border border-paper-line bg-white px-3 py-2 outline-none focus:border-brand focus:ring-2 focus:ring-brand-soft"
        />
      </label>
      {error ? (
        <p role="alert" className="rounded bg-over-soft px-3 py-2 text-sm text-over">
          {error}
        </p>
      ) : null}
      <button
        type="submit"
        disabled={busy}
        className="w-full rounded bg-brand px-4 py-2 font-medium text-white hover:bg-brand-deep disabled:opacity-60"
      >
        {busy ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
