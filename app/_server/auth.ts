// next-auth configuration: e-mail + password (bcrypt), JWT sessions carrying the person's id and
// session version. Sign-in is throttled per account, per (account, address) and per address with
// delays that grow (db/queries/sign-in-throttle.ts); the visitor only ever sees a code from
// lib/sign-in-errors.ts, and anything unexpected is logged here instead.
import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { z } from "zod";
import { getDb, type Db } from "@/db/client";
import { getPerson, verifyPassword } from "@/db/queries/people";
import { clearSignInFailures, keysFor, recordSignInFailure, signInWaitMs } from "@/db/queries/sign-in-throttle";
import { getSettings } from "@/lib/settings";
import { SIGN_IN_CODES, waitCode } from "@/lib/sign-in-errors";
import { addressOf, type HeaderBag } from "./client-address";

const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().email().max(254),
  password: z.string().min(1).max(200),
});

/** A refusal the visitor may see: its message is a code from lib/sign-in-errors.ts. */
export class SignInRefused extends Error {
  constructor(code: string) {
    super(code);
    this.name = "SignInRefused";
  }
}

export type SignedInPerson = { id: string; name: string; email: string; role: string; sessionVersion: number };

async function decide(raw: unknown, address: string, db: Db, nowMs: number): Promise<SignedInPerson> {
  const parsed = credentialsSchema.safeParse(raw);
  if (!parsed.success) throw new SignInRefused(SIGN_IN_CODES.wrong);
  const keys = keysFor(parsed.data.email, address);
  const waitMs = await signInWaitMs(db, keys, nowMs);
  // while a key waits, the password is not even checked: the delay is what slows a guesser
  if (waitMs > 0) throw new SignInRefused(waitCode(waitMs));
  const person = await verifyPassword(db, parsed.data.email, parsed.data.password);
  if (!person) {
    await recordSignInFailure(db, keys, nowMs);
    throw new SignInRefused(SIGN_IN_CODES.wrong);
  }
  await clearSignInFailures(db, keys);
  return { id: String(person.id), name: person.name, email: person.email, role: person.role, sessionVersion: person.sessionVersion };
}

/** The whole sign-in decision, used by next-auth's authorize() and by the tests. */
export async function authorizeSignIn(raw: unknown, address: string, opts: { db?: Db; nowMs?: number } = {}): Promise<SignedInPerson> {
  try {
    return await decide(raw, address, opts.db ?? getDb(), opts.nowMs ?? Date.now());
  } catch (err) {
    if (err instanceof SignInRefused) throw err;
    console.error("sign-in failed:", err);
    throw new SignInRefused(SIGN_IN_CODES.unavailable);
  }
}

const STALE = "stale session";

export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: 12 * 60 * 60 },
  secret: getSettings().NEXTAUTH_SECRET,
  pages: { signIn: "/sign-in", error: "/sign-in" },
  providers: [
    CredentialsProvider({
      name: "Stillfield",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(credentials, req) {
        return authorizeSignIn(credentials, addressOf(req?.headers as HeaderBag));
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        const u = user as Partial<SignedInPerson>;
        token.personId = Number(u.id);
        token.sessionVersion = u.sessionVersion ?? 0;
        return token;
      }
      // every later use: a password reset, role change or deactivation since sign-in ends it
      let valid: boolean;
      try {
        valid = await sessionStillValid(token.personId, token.sessionVersion);
      } catch (err) {
        // a database outage must not sign everyone out; getSession() fails on its own meanwhile
        console.error("session check failed:", err);
        return token;
      }
      if (!valid) throw new Error(STALE);
      return token;
    },
    async session({ session, token }) {
      // only the id and version travel; role and active are re-read from the database per request
      const s = session as { personId?: number; sessionVersion?: number };
      s.personId = typeof token.personId === "number" ? token.personId : undefined;
      s.sessionVersion = typeof token.sessionVersion === "number" ? token.sessionVersion : undefined;
      return session;
    },
  },
  logger: {
    error(code, metadata) {
      // a stale session is an expected end, not a fault
      const message = (metadata as { message?: string } | undefined)?.message ?? (metadata instanceof Error ? metadata.message : "");
      if (code === "JWT_SESSION_ERROR" && message === STALE) return;
      console.error(`next-auth ${code}:`, metadata);
    },
    warn(code) {
      console.warn(`next-auth ${code}`);
    },
    debug() {},
  },
};

/** True when the person still exists, is active and the token carries their current session version. */
export async function sessionStillValid(personId: unknown, sessionVersion: unknown, db: Db = getDb()): Promise<boolean> {
  if (typeof personId !== "number" || typeof sessionVersion !== "number") return false;
  const person = await getPerson(db, personId);
  return !!person && person.active && person.sessionVersion === sessionVersion;
}
