// POST /api/maintenance/:id/extend {endTs, reason} — a later end, with its reason (shift lead and up)
import { readJson, route } from "@/app/_server/route";
import { actionResponse } from "@/app/_server/action";
import { extendMaintenanceWindowAction } from "@/app/_server/actions/maintenance";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>("maintenance.plan", async ({ request, session, params }) => {
  const body = await readJson(request);
  return actionResponse(await extendMaintenanceWindowAction.run(session, { ...(typeof body === "object" && body !== null ? body : {}), id: params.id }));
});
