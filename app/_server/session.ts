// Reading the session once at the edge, and the one permission check used by every page,
// route handler and server action. Role and "active" are re-read from the database (at most
// a second old, see getSession), so a deactivated person or a changed role takes effect at once; a session signed
// before a password reset, role change or deactivation (session version) is refused.
import "server-only";
import { cache } from "react";
import { getServerSession } from "next-auth";
import { cookies } from "next/headers";
import { notFound as nextNotFound, redirect } from "next/navigation";
import { getDb } from "@/db/client";
import { getPerson } from "@/db/queries/people";
import { AppError, forbidden } from "@/lib/errors";
import { can, type Action, type Role } from "@/lib/permissions";
import { authOptions } from "./auth";

export type SessionPerson = { personId: number; role: Role; name: string; email: string };

/**
 * Sessions checked in the last SESSION_RECHECK_MS, by their cookie. A screen polling the Floor
 * (and 50 of them on a wallboard wall) would otherwise decrypt its token and read its person row
 * twice per request. A change to a person made through this process (role, active, password)
 * forgets them all at once (forgetCheckedSessions); another app process sees it within
 * SESSION_RECHECK_MS. Only sessions that passed are kept, and at most MAX_CHECKED of them.
 */
const SESSION_RECHECK_MS = 1000;
const MAX_CHECKED = 5000;
const checked = new Map<string, { person: SessionPerson; until: number }>();
const SESSION_COOKIES = ["__Secure-next-auth.session-token", "next-auth.session-token"];

export function forgetCheckedSessions(): void {
  checked.clear();
}

async function sessionCookie(): Promise<string | null> {
  try {
    const jar = await cookies();
    for (const name of SESSION_COOKIES) {
      const v = jar.get(name)?.value;
      if (v) return v;
    }
  } catch {
    // outside a request (scripts, tests): no cache
  }
  return null;
}

export const getSession = cache(async (): Promise<SessionPerson | null> => {
  const raw = await sessionCookie();
  const now = Date.now();
  if (raw !== null) {
    const hit = checked.get(raw);
    if (hit && hit.until > now) return hit.person;
    if (hit) checked.delete(raw);
  }
  const session = await getServerSession(authOptions);
  const { personId, sessionVersion } = (session ?? {}) as { personId?: unknown; sessionVersion?: unknown };
  if (typeof personId !== "number") return null;
  const person = await getPerson(getDb(), personId);
  // the jwt callback already refuses a stale version; checked again here on the same row
  if (!person || !person.active || person.sessionVersion !== sessionVersion) return null;
  const result: SessionPerson = { personId: person.id, role: person.role, name: person.name, email: person.email };
  if (raw !== null) {
    if (checked.size >= MAX_CHECKED) {
      for (const [k, v] of checked) if (v.until <= now) checked.delete(k);
      if (checked.size >= MAX_CHECKED) checked.delete(checked.keys().next().value!);
    }
    checked.set(raw, { person: result, until: now + SESSION_RECHECK_MS });
  }
  return result;
});

/** For route handlers and actions: the session, or a typed 401/403 error. */
export function checkPermission(session: SessionPerson | null, action: Action): SessionPerson {
  if (!session) throw new AppError("unauthenticated", "Please sign in.");
  if (!can(session.role, action)) throw forbidden();
  return session;
}

export async function requirePermission(action: Action): Promise<SessionPerson> {
  return checkPermission(await getSession(), action);
}

/**
 * For pages: sends a signed-out visitor to the sign-in page; a signed-in person without the
 * permission gets the page's forbidden state (rendered by the caller via `allowed: false`).
 */
export async function requirePagePermission(action: Action, from?: string): Promise<{ session: SessionPerson; allowed: boolean }> {
  const session = await getSession();
  if (!session) redirect(from ? `/sign-in?callbackUrl=${encodeURIComponent(from)}` : "/sign-in");
  return { session, allowed: can(session.role, action) };
}

export { nextNotFound as notFound };
