// Reading the session once at the edge, and the one permission check used by every page,
// route handler and server action. Role and "active" are re-read from the database on each
// request, so a deactivated person or a changed role takes effect at once; a session signed
// before a password reset, role change or deactivation (session version) is refused.
import "server-only";
import { cache } from "react";
import { getServerSession } from "next-auth";
import { notFound as nextNotFound, redirect } from "next/navigation";
import { getDb } from "@/db/client";
import { getPerson } from "@/db/queries/people";
import { AppError, forbidden } from "@/lib/errors";
import { can, type Action, type Role } from "@/lib/permissions";
import { authOptions } from "./auth";

export type SessionPerson = { personId: number; role: Role; name: string; email: string };

export const getSession = cache(async (): Promise<SessionPerson | null> => {
  const session = await getServerSession(authOptions);
  const { personId, sessionVersion } = (session ?? {}) as { personId?: unknown; sessionVersion?: unknown };
  if (typeof personId !== "number") return null;
  const person = await getPerson(getDb(), personId);
  // the jwt callback already refuses a stale version; checked again here on the same row
  if (!person || !person.active || person.sessionVersion !== sessionVersion) return null;
  return { personId: person.id, role: person.role, name: person.name, email: person.email };
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
