// GET /api/surveys/:id/pdf — the survey report as a PDF (pdfkit). Anyone who may view.
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getUploadStore } from "@/app/_server/storage";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/plant-settings";
import { getSurveyPhoto, getSurveyReport } from "@/db/queries/surveys-report";
import { notFound } from "@/lib/errors";
import { buildSurveyPdf } from "../../_pdf";
import { parseId } from "@/lib/ids";
import { contentDisposition } from "../../../equipment/_respond";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

export const GET = route<{ id: string }>("view", async ({ params }) => {
  const id = parseId(params.id);
  const db = getDb();
  const rep = id !== null ? await getSurveyReport(db, id) : null;
  if (!rep) throw notFound("No such survey.");
  const plant = await getPlantSettings(db);
  const pdf = await buildSurveyPdf(rep, {
    timeZone: plant.timeZone,
    plantName: plant.name,
    photo: async (photoId) => {
      const p = await getSurveyPhoto(db, photoId);
      return p ? getUploadStore().get(p.thumbnailKey ?? p.storageKey) : null;
    },
  });
  return new NextResponse(new Uint8Array(pdf), {
    headers: { "Content-Type": "application/pdf", "Content-Disposition": contentDisposition("inline", `survey-${rep.id}.pdf`), "Cache-Control": "no-store", "X-Content-Type-Options": "nosniff" },
  });
});
