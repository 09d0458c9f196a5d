// POST /api/uploads — multipart: file, subjectType (check | neutralizer | line_note | device),
// subjectId, minRole (lowest role allowed to open it). Engineers and admins.
// At most 20 MB; the type is decided by the file's first bytes (JPEG, PNG, WebP, PDF).
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { MAX_UPLOAD_BYTES, uploadFileAction } from "@/app/_server/actions/equipment";
import { actionResponse } from "@/app/_server/action";
import { readForm, tooLargeResponse } from "../equipment/_respond";

export const dynamic = "force-dynamic";

export const POST = route("upload.add", async ({ session, request }) => {
  const early = tooLargeResponse(request, MAX_UPLOAD_BYTES);
  if (early) return early;
  // cut off as it streams in, once past 20 MB (plus the form's other fields)
  const form = await readForm(request, MAX_UPLOAD_BYTES);
  const file = form.file;
  if (file instanceof File && file.size > MAX_UPLOAD_BYTES) {
    return NextResponse.json({ error: "The file is larger than 20 MB.", code: "too_large", fieldErrors: { file: ["At most 20 MB"] } }, { status: 413 });
  }
  return actionResponse(await uploadFileAction.run(session, form), 201);
});
