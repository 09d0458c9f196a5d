// POST /api/devices/:id/enabled {"enabled": true|false} — let a device sign in or refuse it (admins).
import { readJson, route } from "@/app/_server/route";
import { setDeviceEnabledAction } from "@/app/_server/actions/devices";
import { actionResponse } from "@/app/_server/action";

export const POST = route<{ id: string }>("devices.manage", async ({ session, params, request }) => {
  const body = await readJson(request);
  const enabled = typeof body === "object" && body !== null && "enabled" in body ? String(body.enabled) : "";
  return actionResponse(await setDeviceEnabledAction.run(session, { id: params.id, enabled }));
});
