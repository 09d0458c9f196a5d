// POST /api/equipment/:id/notes — add a note or a fault report to a neutralizer's history.
import { readJson, route } from "@/app/_server/route";
import { addEquipmentNoteAction } from "@/app/_server/actions/equipment";
import { actionResponse } from "@/app/_server/action";

export const POST = route<{ id: string }>("equipment.edit", async ({ session, params, request }) => {
  const body = await readJson(request);
  return actionResponse(await addEquipmentNoteAction.run(session, { ...(typeof body === "object" && body !== null ? body : {}), subjectType: "neutralizer", subjectId: params.id }), 201);
});
