// POST /api/surveys/photos — multipart: clientId (the round's id), spotKey, file. Images only
// (JPEG, PNG, WebP by their bytes), at most 12 MB; stored once per spot. Shift leads and up.
import { route } from "@/app/_server/route";
import { addSurveyPhotoAction, MAX_PHOTO_BYTES } from "@/app/_server/actions/surveys";
import { actionResponse } from "@/app/_server/action";
import { readForm, tooLargeResponse } from "../../equipment/_respond";

export const dynamic = "force-dynamic";

export const POST = route("survey.record", async ({ session, request }) => {
  const early = tooLargeResponse(request, MAX_PHOTO_BYTES);
  if (early) return early;
  const form = await readForm(request);
  const r = await addSurveyPhotoAction.run(session, form);
  return actionResponse(r, r.ok && r.data?.created ? 201 : 200);
});
