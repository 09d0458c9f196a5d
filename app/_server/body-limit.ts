// Request bodies read with a ceiling that is enforced while the bytes stream in: a declared
// Content-Length over the limit is refused before anything is read, and a chunked body is cut
// off (its stream cancelled) as soon as it passes the limit, so nothing larger is ever held in
// memory. Route handlers read bodies only through these (and app/_server/route.ts readJson).
import "server-only";
import { AppError } from "@/lib/errors";

export const BODY_LIMITS = {
  /** JSON bodies of route handlers */
  json: 256 * 1024,
  /** multipart room for the form's other fields besides the file */
  formOverhead: 256 * 1024,
};

function tooLarge(maxBytes: number, field = "file"): AppError {
  const mb = maxBytes >= 1024 * 1024 ? `${Math.round(maxBytes / 1024 / 1024)} MB` : `${Math.round(maxBytes / 1024)} KB`;
  return new AppError("too_large", `The request is larger than ${mb}.`, { [field]: [`At most ${mb}`] });
}

/** The body's bytes, refusing (413) anything over `maxBytes` without reading past the limit. */
export async function readBodyBytes(request: Request, maxBytes: number, field?: string): Promise<Uint8Array<ArrayBuffer>> {
  const declared = request.headers.get("content-length");
  if (declared !== null && /^\d+$/.test(declared) && Number(declared) > maxBytes) throw tooLarge(maxBytes, field);
  if (!request.body) return new Uint8Array(0);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      // stop reading: the rest of the upload is never received into memory
      await reader.cancel("request body too large").catch(() => undefined);
      throw tooLarge(maxBytes, field);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

export async function readBodyText(request: Request, maxBytes = BODY_LIMITS.json): Promise<string> {
  return new TextDecoder().decode(await readBodyBytes(request, maxBytes, "_"));
}

/** Multipart form data of at most `maxFileBytes` plus the form's other fields. */
export async function readFormLimited(request: Request, maxFileBytes: number): Promise<FormData> {
  const type = request.headers.get("content-type") ?? "";
  if (!/^multipart\/form-data|^application\/x-www-form-urlencoded/i.test(type)) {
    throw new AppError("bad_input", "Send the file as multipart/form-data.");
  }
  const bytes = await readBodyBytes(request, maxFileBytes + BODY_LIMITS.formOverhead, "file");
  try {
    return await new Response(bytes, { headers: { "content-type": type } }).formData();
  } catch {
    throw new AppError("bad_input", "Send the file as multipart/form-data.");
  }
}
