// POST /api/imports/preview — multipart: kind (check_log | humidity_log), file, areaId, and
// optionally mapping / units (JSON) and dateOrder. Answers the detected layout and first rows.
import { route } from "@/app/_server/route";
import { MAX_CSV_BYTES, previewImportAction } from "@/app/_server/actions/imports";
import { actionResponse } from "@/app/_server/action";
import { readForm, tooLargeResponse } from "../../equipment/_respond";

export const dynamic = "force-dynamic";

export const POST = route("import.run", async ({ session, request }) => {
  const early = tooLargeResponse(request, MAX_CSV_BYTES);
  if (early) return early;
  return actionResponse(await previewImportAction.run(session, await readForm(request, MAX_CSV_BYTES)));
});
