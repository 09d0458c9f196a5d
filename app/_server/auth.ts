// next-auth configuration: e-mail + password (bcrypt), JWT sessions carrying id and role.
// Failed sign-ins are counted per account and per address in the database and blocked for a
// while past a limit (db/queries/people.ts SIGN_IN_LIMITS).
import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { z } from "zod";
import { getDb } from "@/db/client";
import { clearSignInFailures, recordSignInFailure, signInBlockedForMs, verifyPassword, type LimitKey } from "@/db/queries/people";

const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().email().max(254),
  password: z.string().min(1).max(200),
});

export const SIGN_IN_ERRORS = {
  wrong: "Wrong e-mail or password.",
  blocked: (minutes: number) => `Too many failed sign-ins. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`,
};

type HeaderBag = Record<string, string | string[] | undefined> | Headers | undefined;

function clientAddress(headers: HeaderBag): string {
  const get = (name: string): string | undefined => {
    if (!headers) return undefined;
    if (headers instanceof Headers) return headers.get(name) ?? undefined;
    const v = headers[name];
    return Array.isArray(v) ? v[0] : v;
  };
  // Stillfield serves on loopback behind at most one trusted proxy: take the first hop it saw.
  const forwarded = get("x-forwarded-for")?.split(",")[0]?.trim();
  return forwarded || get("x-real-ip") || "local";
}

/** The whole sign-in decision, used by next-auth's authorize() and by the tests. */
export async function authorizeSignIn(raw: unknown, address: string) {
  const parsed = credentialsSchema.safeParse(raw);
  if (!parsed.success) throw new Error(SIGN_IN_ERRORS.wrong);
  const db = getDb();
  const keys: LimitKey[] = [
    { kind: "account", value: parsed.data.email },
    { kind: "address", value: address },
  ];
  const waitMs = await signInBlockedForMs(db, keys);
  if (waitMs > 0) throw new Error(SIGN_IN_ERRORS.blocked(Math.max(1, Math.ceil(waitMs / 60_000))));
  const person = await verifyPassword(db, parsed.data.email, parsed.data.password);
  if (!person) {
    await recordSignInFailure(db, keys);
    throw new Error(SIGN_IN_ERRORS.wrong);
  }
  await clearSignInFailures(db, keys[0]);
  return { id: String(person.id), name: person.name, email: person.email, role: person.role };
}

export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: 12 * 60 * 60 },
  pages: { signIn: "/sign-in" },
  providers: [
    CredentialsProvider({
      name: "Stillfield",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(credentials, req) {
        return authorizeSignIn(credentials, clientAddress(req?.headers as HeaderBag));
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.personId = Number(user.id);
        token.role = (user as { role?: string }).role;
      }
      return token;
    },
    async session({ session, token }) {
      // only the id travels; role and active are re-read from the database per request
      (session as { personId?: number }).personId = typeof token.personId === "number" ? token.personId : undefined;
      return session;
    },
  },
};
