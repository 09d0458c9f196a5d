// Request helpers of the equipment, checks, devices, uploads and imports routes: multipart forms
// with a size limit, and file download headers. (Action results become responses through
// actionResponse, app/_server/action.ts; ids are parsed by lib/ids.ts.)
import "server-only";
import { NextResponse } from "next/server";
import { readFormLimited } from "@/app/_server/body-limit";

/**
 * Multipart form data → plain object (files stay File objects) for an action's zod schema. The
 * body is cut off as it streams in once it passes `maxFileBytes` plus room for the other fields.
 */
export async function readForm(request: Request, maxFileBytes = 20 * 1024 * 1024): Promise<Record<string, FormDataEntryValue>> {
  const fd = await readFormLimited(request, maxFileBytes);
  const out: Record<string, FormDataEntryValue> = {};
  for (const [k, v] of fd.entries()) if (!(k in out)) out[k] = v;
  return out;
}

/** Refuses a body larger than `maxBytes` (plus room for the form's other fields) before reading it. */
export function tooLargeResponse(request: Request, maxBytes: number): NextResponse | null {
  const length = Number(request.headers.get("content-length") ?? "0");
  if (Number.isFinite(length) && length > maxBytes + 256 * 1024) {
    return NextResponse.json({ error: `The file is larger than ${Math.round(maxBytes / 1024 / 1024)} MB.`, code: "too_large", fieldErrors: { file: [`At most ${Math.round(maxBytes / 1024 / 1024)} MB`] } }, { status: 413 });
  }
  return null;
}

/** RFC 6266 / RFC 5987: an ASCII fallback name plus the exact name, percent-encoded as UTF-8. */
export function contentDisposition(kind: "inline" | "attachment", name: string): string {
  const ascii = name.replace(/[^\x20-\x7e]/g, "_").replace(/["\\;,%]/g, "_") || "file";
  const encoded = encodeURIComponent(name).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `${kind}; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}
