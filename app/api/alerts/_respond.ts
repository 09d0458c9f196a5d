// Shared by the alert route handlers: turn an action result into a JSON response with the
// action's own status (400 with field errors, 403, 404, 409), so a 403 stays a 403.
import { NextResponse } from "next/server";
import type { ActionResult } from "@/app/_server/action";
import { readBodyText } from "@/app/_server/body-limit";
import { badInput } from "@/lib/errors";

export function actionResponse<T>(result: ActionResult<T>, okStatus = 200): NextResponse {
  if (result.ok) return NextResponse.json(result.data ?? { ok: true }, { status: okStatus });
  return NextResponse.json({ error: result.message, fieldErrors: result.fieldErrors }, { status: result.status });
}

export function alertIdOf(params: { id: string }): number {
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw badInput("The alert id must be a positive whole number.");
  return id;
}

/** A JSON object body, or {} when the body is empty. */
export async function readBodyObject(request: Request): Promise<Record<string, unknown>> {
  const text = await readBodyText(request);
  if (!text.trim()) return {};
  let v: unknown;
  try {
    v = JSON.parse(text);
  } catch {
    throw badInput("The request body is not valid JSON.");
  }
  if (!v || typeof v !== "object" || Array.isArray(v)) throw badInput("The request body must be a JSON object.");
  return Object.fromEntries(Object.entries(v));
}
