// GET /api/surveys/:id/csv — the survey report as CSV (formula-safe). Anyone who may view.
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getSurveyReport } from "@/db/queries/surveys-report";
import { notFound } from "@/lib/errors";
import { surveyReportCsv } from "@/lib/surveys/report-csv";
import { parseId } from "@/lib/ids";
import { contentDisposition } from "../../../equipment/_respond";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>("view", async ({ params }) => {
  const id = parseId(params.id);
  const rep = id !== null ? await getSurveyReport(getDb(), id) : null;
  if (!rep) throw notFound("No such survey.");
  return new NextResponse(surveyReportCsv(rep), {
    headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": contentDisposition("attachment", `survey-${rep.id}.csv`), "Cache-Control": "no-store" },
  });
});
