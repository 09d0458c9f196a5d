// GET /api/reports/weekly/csv?line=<id>&week=YYYY-MM-DD&table=points|rules|pairs
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getWeeklyReport } from "@/db/use-cases/weekly-report";
import { badInput, notFound } from "@/lib/errors";
import { weeklyCsv } from "@/lib/reports/csv-tables";
import { resolveWeek, weeklyCsvParamsSchema } from "@/lib/reports/params";
import { STATE_WORDS } from "@/lib/vocabulary";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { csvResponse } from "../../_shared";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ request }) => {
  const params = parseOrThrow(weeklyCsvParamsSchema, queryObject(request), "download request");
  if (params.line === undefined) throw badInput("Choose a line.", { line: ["Choose a line"] });
  const db = await getReadDb();
  const now = Date.now();
  const settings = await getPlantSettings(db);
  const report = await getWeeklyReport(db, { lineId: params.line, date: resolveWeek(params, settings.timeZone, now) }, now);
  if (!report) throw notFound("No such line.");
  return csvResponse(weeklyCsv(report, params.table, STATE_WORDS));
});
