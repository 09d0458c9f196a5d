// GET /api/reports/equipment/csv?from=…&to=…&table=neutralizers|meters
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getComplianceReport } from "@/db/use-cases/compliance-report";
import { badInput } from "@/lib/errors";
import { complianceCsv } from "@/lib/reports/csv-tables";
import { complianceCsvParamsSchema, resolveComplianceParams } from "@/lib/reports/params";
import { STATE_WORDS } from "@/lib/vocabulary";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { csvResponse } from "../../_shared";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ request }) => {
  const params = parseOrThrow(complianceCsvParamsSchema, queryObject(request), "download request");
  if (params.from && params.to && params.from > params.to) throw badInput("The last day must not be before the first day.", { to: ["The last day must not be before the first day"] });
  const db = await getReadDb();
  const now = Date.now();
  const settings = await getPlantSettings(db);
  const report = await getComplianceReport(db, resolveComplianceParams(params, settings.timeZone, now), now);
  return csvResponse(complianceCsv(report, params.table, STATE_WORDS));
});
