// Shared by the alert route handlers: the alert id of the URL and the JSON body. (Results become
// responses through actionResponse, app/_server/action.ts.)
import { readBodyText } from "@/app/_server/body-limit";
import { badInput } from "@/lib/errors";
import { requireId } from "@/lib/ids";

export function alertIdOf(params: { id: string }): number {
  return requireId(params.id, "The alert id must be a positive whole number.");
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
