// The wrapper every route handler goes through: it reads the session, checks the permission,
// validates query/body with zod and maps typed errors to statuses (a 403 stays a 403).
import "server-only";
import { NextResponse } from "next/server";
import type { z } from "zod";
import { AppError, fieldErrorsFromIssues } from "@/lib/errors";
import type { Action } from "@/lib/permissions";
import { checkPermission, getSession, type SessionPerson } from "./session";

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

export async function readJson(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    throw new AppError("bad_input", "The request body is not valid JSON.");
  }
}

type Handler<P> = (ctx: RouteContext<P>) => Promise<Response> | Response;

/** `export const GET = route("view", async ({ session, params, request }) => …)` */
export function route<P = Record<string, string>>(action: Action, handler: Handler<P>) {
  return async (request: Request, context: { params: Promise<P> }) => {
    try {
      const session = checkPermission(await getSession(), action);
      const params = (await context?.params) ?? ({} as P);
      return await handler({ session, params, request });
    } catch (err) {
      return errorResponse(err);
    }
  };
}
