// The wrapper every route handler goes through: it reads the session, checks the permission,
// validates query/body with zod and maps typed errors to statuses (a 403 stays a 403). It also
// refuses state-changing requests from other origins and reads bodies with a size ceiling.
import "server-only";
import { NextResponse } from "next/server";
import type { z } from "zod";
import { AppError, fieldErrorsFromIssues } from "@/lib/errors";
import { allowedHostsOf, checkSameOrigin, parseTrustedProxies } from "@/lib/http-security";
import type { Action } from "@/lib/permissions";
import { BODY_LIMITS, readBodyText } from "./body-limit";
import { checkPermission, getSession, type SessionPerson } from "./session";
import { getSettings } from "@/lib/settings";

export type RouteContext<P> = { session: SessionPerson; params: P; request: Request };

export function errorResponse(err: unknown): NextResponse {
  if (err instanceof AppError) {
    return NextResponse.json({ error: err.message, code: err.code, fieldErrors: err.fieldErrors }, { status: err.status });
  }
  console.error("route error:", err);
  return NextResponse.json({ error: "Something went wrong on the server. It has been logged.", code: "internal" }, { status: 500 });
}

export function parseOrThrow<S extends z.ZodType>(schema: S, input: unknown, what = "request"): z.infer<S> {
  const parsed = schema.safeParse(input);
  if (!parsed.success) {
    const fieldErrors = fieldErrorsFromIssues(parsed.error.issues);
    const first = Object.entries(fieldErrors)[0];
    throw new AppError("bad_input", `Invalid ${what}: ${first ? `${first[0]}: ${first[1][0]}` : "bad input"}`, fieldErrors);
  }
  return parsed.data;
}

export function queryObject(request: Request): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  const url = new URL(request.url);
  for (const key of new Set(url.searchParams.keys())) {
    const all = url.searchParams.getAll(key);
    out[key] = all.length > 1 ? all : all[0];
  }
  return out;
}

/** The JSON body, at most `maxBytes` (enforced while it streams in: app/_server/body-limit.ts). */
export async function readJson(request: Request, maxBytes = BODY_LIMITS.json): Promise<unknown> {
  const text = await readBodyText(request, maxBytes);
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("bad_input", "The request body is not valid JSON.");
  }
}

const trustedProxies = parseTrustedProxies(getSettings().TRUSTED_PROXIES);

/** 403 for a state-changing request a browser sent from another origin (lib/http-security.ts). */
export function assertSameOrigin(request: Request): void {
  const get = (name: string) => request.headers.get(name);
  const verdict = checkSameOrigin(request.method, get, allowedHostsOf(get, trustedProxies));
  if (!verdict.ok) {
    console.warn(`refused ${request.method} ${new URL(request.url).pathname}: ${verdict.reason}`);
    throw new AppError("forbidden", "This request did not come from a Stillfield page.");
  }
}

type Handler<P> = (ctx: RouteContext<P>) => Promise<Response> | Response;

/** `export const GET = route("view", async ({ session, params, request }) => …)` */
export function route<P = Record<string, string>>(action: Action, handler: Handler<P>) {
  return async (request: Request, context: { params: Promise<P> }) => {
    try {
      // route handlers are outside proxy.ts (which would buffer their bodies): check here
      assertSameOrigin(request);
      const session = checkPermission(await getSession(), action);
      const params = (await context?.params) ?? ({} as P);
      return await handler({ session, params, request });
    } catch (err) {
      return errorResponse(err);
    }
  };
}
