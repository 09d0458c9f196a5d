// GET /api/reports/handover/csv?date=…&shift=…&table=alerts|points|halls|neutralizers|notes
import { getReadDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/reports";
import { getHandoverReport } from "@/db/use-cases/handover-report";
import { notFound } from "@/lib/errors";
import { handoverCsv } from "@/lib/reports/csv-tables";
import { handoverCsvParamsSchema, resolveHandoverParams } from "@/lib/reports/params";
import { STATE_WORDS } from "@/lib/vocabulary";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { csvResponse } from "../../_shared";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ request }) => {
  const params = parseOrThrow(handoverCsvParamsSchema, queryObject(request), "download request");
  const db = await getReadDb();
  const now = Date.now();
  const which = resolveHandoverParams(params, await getPlantSettings(db), now);
  const report = await getHandoverReport(db, which, now);
  if (!report) throw notFound(`The plant has no shift called "${which.shift}".`);
  return csvResponse(handoverCsv(report, params.table, STATE_WORDS));
});
