// GET /api/imports — the latest imported files. POST /api/imports — import a CSV file (multipart,
// same fields as the preview); answers what was added, what was already there, and every
// rejected row with its line number and reason.
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { MAX_CSV_BYTES, runImportAction } from "@/app/_server/actions/imports";
import { getDb } from "@/db/client";
import { listRecentImports } from "@/db/queries/imports";
import { actionResponse } from "@/app/_server/action";
import { readForm, tooLargeResponse } from "../equipment/_respond";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json({ imports: await listRecentImports(getDb(), 20) }));

export const POST = route("import.run", async ({ session, request }) => {
  const early = tooLargeResponse(request, MAX_CSV_BYTES);
  if (early) return early;
  return actionResponse(await runImportAction.run(session, await readForm(request, MAX_CSV_BYTES)));
});
