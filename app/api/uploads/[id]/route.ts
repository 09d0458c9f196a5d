// GET /api/uploads/:id[?variant=thumb] — an uploaded file, for signed-in people whose role is at
// least the upload's minRole. Images open inline, PDFs and anything else download; the type is
// the one sniffed at upload, and nosniff stops the browser from guessing another.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getUploadStore } from "@/app/_server/storage";
import { getDb } from "@/db/client";
import { getUpload } from "@/db/queries/equipment";
import { forbidden, notFound } from "@/lib/errors";
import { ROLE_LABELS, roleRank } from "@/lib/permissions";
import { parseId } from "@/lib/ids";
import { contentDisposition } from "../../equipment/_respond";

export const dynamic = "force-dynamic";

const query = z.object({ variant: z.enum(["original", "thumb"]).default("original") });

export const GET = route<{ id: string }>("view", async ({ session, params, request }) => {
  const { variant } = parseOrThrow(query, queryObject(request), "query");
  const id = parseId(params.id);
  const upload = id !== null ? await getUpload(getDb(), id) : null;
  if (!upload) throw notFound("No such file.");
  if (roleRank(session.role) < roleRank(upload.minRole)) {
    throw forbidden(`This file is for ${ROLE_LABELS[upload.minRole].toLowerCase()}s and above.`);
  }
  const key = variant === "thumb" ? upload.thumbnailKey : upload.storageKey;
  if (!key) throw notFound("This file has no thumbnail.");
  const bytes = await getUploadStore().get(key);
  if (!bytes) throw notFound("The file is missing from storage.");
  const isImage = ["image/jpeg", "image/png", "image/webp"].includes(upload.mimeType);
  const mime = variant === "thumb" ? "image/webp" : isImage || upload.mimeType === "application/pdf" ? upload.mimeType : "application/octet-stream";
  const name = variant === "thumb" ? `thumbnail-${upload.originalName.replace(/\.[^.]*$/, "")}.webp` : upload.originalName;
  return new NextResponse(new Uint8Array(bytes), {
    status: 200,
    headers: {
      "Content-Type": mime,
      "Content-Length": String(bytes.length),
      "Content-Disposition": contentDisposition(variant === "thumb" || isImage ? "inline" : "attachment", name),
      "X-Content-Type-Options": "nosniff",
      "Content-Security-Policy": "default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; sandbox",
      // a restricted file must not stay in the cache of a shared floor PC
      "Cache-Control": upload.minRole === "viewer" ? "private, max-age=3600" : "no-store",
    },
  });
});
