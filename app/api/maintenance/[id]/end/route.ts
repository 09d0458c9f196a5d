// POST /api/maintenance/:id/end — end a running window now, or call off a planned one (shift lead and up)
import { route } from "@/app/_server/route";
import { actionResponse } from "@/app/_server/action";
import { endMaintenanceWindowAction } from "@/app/_server/actions/maintenance";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>("maintenance.plan", async ({ session, params }) => {
  return actionResponse(await endMaintenanceWindowAction.run(session, { id: params.id }));
});
