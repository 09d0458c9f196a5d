// GET /api/surveys/photos/:id[?variant=thumb] — a survey photo for anyone signed in who may view.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getUploadStore } from "@/app/_server/storage";
import { getDb } from "@/db/client";
import { getSurveyPhoto } from "@/db/queries/surveys-report";
import { notFound } from "@/lib/errors";
import { parseId } from "@/lib/ids";

export const dynamic = "force-dynamic";
const query = z.object({ variant: z.enum(["original", "thumb"]).default("original") });

export const GET = route<{ id: string }>("view", async ({ params, request }) => {
  const { variant } = parseOrThrow(query, queryObject(request), "query");
  const id = parseId(params.id);
  const photo = id !== null ? await getSurveyPhoto(getDb(), id) : null;
  if (!photo) throw notFound("No such photo.");
  const key = variant === "thumb" && photo.thumbnailKey ? photo.thumbnailKey : photo.storageKey;
  const bytes = await getUploadStore().get(key);
  if (!bytes) throw notFound("The photo is missing from storage.");
  return new NextResponse(new Uint8Array(bytes), {
    headers: {
      "Content-Type": key === photo.thumbnailKey ? "image/jpeg" : photo.mimeType,
      "Content-Length": String(bytes.length),
      "X-Content-Type-Options": "nosniff",
      "Content-Security-Policy": "default-src 'none'; sandbox",
      "Cache-Control": "private, max-age=3600",
    },
  });
});
