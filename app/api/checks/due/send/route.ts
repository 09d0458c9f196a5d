// POST /api/checks/due/send — queue the due list for the maintenance list now (engineers).
import { route } from "@/app/_server/route";
import { sendDueListNowAction } from "@/app/_server/actions/checks";
import { actionResponse } from "@/app/_server/action";

export const POST = route("equipment.edit", async ({ session }) => actionResponse(await sendDueListNowAction.run(session, {}), 202));
