// Server actions go through defineAction(): it authenticates, checks the permission, validates
// the input with zod and returns { ok } | { fieldErrors } | { message }. The exported server
// action (in a "use server" file) is `(prev, formData) => x.run(await getSession(), formData)`;
// tests call `.run(session, input)` directly with a real session object and a real database.
import "server-only";
import { NextResponse } from "next/server";
import type { z } from "zod";
import { AppError, errorCodeOfStatus, fieldErrorsFromIssues } from "@/lib/errors";
import type { Action } from "@/lib/permissions";
import { checkPermission, type SessionPerson } from "./session";

export type ActionResult<T = unknown> =
  | { ok: true; data?: T; message?: string }
  | { ok: false; status: number; message: string; fieldErrors?: Record<string, string[]> };

export const initialActionResult = null;

function formDataToObject(fd: FormData): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of fd.entries()) {
    if (k.startsWith("$ACTION")) continue;
    if (k in out) {
      const prev = out[k];
      out[k] = Array.isArray(prev) ? [...prev, v] : [prev, v];
    } else out[k] = v;
  }
  return out;
}

export function defineAction<S extends z.ZodType, T>(
  action: Action,
  schema: S,
  handler: (input: z.infer<S>, session: SessionPerson) => Promise<T>,
) {
  return {
    async run(session: SessionPerson | null, raw: FormData | unknown): Promise<ActionResult<T>> {
      try {
        const who = checkPermission(session, action);
        const input = raw instanceof FormData ? formDataToObject(raw) : raw;
        const parsed = schema.safeParse(input);
        if (!parsed.success) {
          return { ok: false, status: 400, message: "Please correct the marked fields.", fieldErrors: fieldErrorsFromIssues(parsed.error.issues) };
        }
        const data = await handler(parsed.data, who);
        return { ok: true, data };
      } catch (err) {
        if (err instanceof AppError) return { ok: false, status: err.status, message: err.message, fieldErrors: err.fieldErrors };
        console.error("action error:", err);
        return { ok: false, status: 500, message: "Something went wrong on the server. It has been logged." };
      }
    },
  };
}

/**
 * The one turn of an action result into a JSON response, for the route handlers that share a
 * server action's code path: the action's own status (400 with field errors, 403, 404, 409, …),
 * so a 403 stays a 403, with the error code of lib/errors.ts beside the message.
 */
export function actionResponse<T>(result: ActionResult<T>, okStatus = 200): NextResponse {
  if (result.ok) return NextResponse.json(result.data ?? { ok: true }, { status: okStatus, headers: { "Cache-Control": "no-store" } });
  return NextResponse.json({ error: result.message, code: errorCodeOfStatus(result.status), fieldErrors: result.fieldErrors }, { status: result.status });
}
