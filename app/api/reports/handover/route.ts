// GET /api/reports/handover?date=YYYY-MM-DD&shift=Early — the shift handover as JSON
// (without date and shift: the last completed shift).
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getHandoverReport } from "@/db/use-cases/handover-report";
import { notFound } from "@/lib/errors";
import { handoverParamsSchema, resolveHandoverParams } from "@/lib/reports/params";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { jsonResponse } from "../_shared";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ request }) => {
  const params = parseOrThrow(handoverParamsSchema, queryObject(request), "report request");
  const db = await getReadDb();
  const now = Date.now();
  const which = resolveHandoverParams(params, await getPlantSettings(db), now);
  const report = await getHandoverReport(db, which, now);
  if (!report) throw notFound(`The plant has no shift called "${which.shift}".`);
  return jsonResponse({ report });
});
