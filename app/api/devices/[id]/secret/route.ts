// POST /api/devices/:id/secret — issue a new secret (admins); shown in this response only.
import { route } from "@/app/_server/route";
import { rotateDeviceSecretAction } from "@/app/_server/actions/devices";
import { actionResponse } from "@/app/_server/action";

export const POST = route<{ id: string }>("devices.manage", async ({ session, params }) => actionResponse(await rotateDeviceSecretAction.run(session, { id: params.id })));
