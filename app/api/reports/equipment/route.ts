// GET /api/reports/equipment?from=YYYY-MM-DD&to=YYYY-MM-DD — equipment compliance as JSON
// (default: the last 90 days).
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getComplianceReport } from "@/db/use-cases/compliance-report";
import { complianceParamsSchema, resolveComplianceParams } from "@/lib/reports/params";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { jsonResponse } from "../_shared";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ request }) => {
  const params = parseOrThrow(complianceParamsSchema, queryObject(request), "report request");
  const db = await getReadDb();
  const now = Date.now();
  const settings = await getPlantSettings(db);
  const report = await getComplianceReport(db, resolveComplianceParams(params, settings.timeZone, now), now);
  return jsonResponse({ report });
});
