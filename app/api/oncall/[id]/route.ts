// DELETE /api/oncall/<id> — remove a shift from the roster (admins).
import { route } from "@/app/_server/route";
import { removeShiftAction } from "@/app/_server/actions/oncall";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

export const DELETE = route<{ id: string }>("oncall.manage", async ({ session, params }) => actionResponse(await removeShiftAction.run(session, { id: params.id })));
