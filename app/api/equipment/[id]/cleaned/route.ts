// POST /api/equipment/:id/cleaned — record a cleaning (resets the cleaning clock).
import { readJson, route } from "@/app/_server/route";
import { markCleanedAction } from "@/app/_server/actions/equipment";
import { actionResponse } from "@/app/_server/action";

export const POST = route<{ id: string }>("check.record", async ({ session, params, request }) => {
  const body = request.headers.get("content-length") === "0" ? {} : await readJson(request).catch(() => ({}));
  return actionResponse(await markCleanedAction.run(session, { ...(typeof body === "object" && body !== null ? body : {}), id: params.id }));
});
