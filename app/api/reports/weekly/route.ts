// GET /api/reports/weekly?line=<id>&week=YYYY-MM-DD — weekly review of one line as JSON
// (the ISO week, Monday to Sunday in the plant's time zone, holding the given day).
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getWeeklyReport } from "@/db/use-cases/weekly-report";
import { badInput, notFound } from "@/lib/errors";
import { resolveWeek, weeklyParamsSchema } from "@/lib/reports/params";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { jsonResponse } from "../_shared";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ request }) => {
  const params = parseOrThrow(weeklyParamsSchema, queryObject(request), "report request");
  if (params.line === undefined) throw badInput("Choose a line.", { line: ["Choose a line"] });
  const db = await getReadDb();
  const now = Date.now();
  const settings = await getPlantSettings(db);
  const report = await getWeeklyReport(db, { lineId: params.line, date: resolveWeek(params, settings.timeZone, now) }, now);
  if (!report) throw notFound("No such line.");
  return jsonResponse({ report });
});
