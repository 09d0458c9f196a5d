// POST /api/alerts/<id>/comment  body {comment: string} — comment on an alert (shift leads and up;
// the action checks again). 200 with {alertId, state, severity, …}; 400/403/404/409 otherwise.
import { route } from "@/app/_server/route";
import { commentAlertAction } from "@/app/_server/actions/alerts";
import { actionResponse } from "@/app/_server/action";
import { alertIdOf, readBodyObject } from "../../_respond";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>("alert.respond", async ({ session, params, request }) => {
  const body = await readBodyObject(request);
  return actionResponse(await commentAlertAction.run(session, { ...body, alertId: alertIdOf(params) }));
});
