// GET  /api/notes?lineId=N&from=ms&to=ms   a line's notes in a range (anyone who may view)
// POST /api/notes {lineId, pointId?, ts, text}  add a note (shift lead and up; others get 403)
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, readJson, route } from "@/app/_server/route";
import { addNoteAction } from "@/app/_server/actions/notes";
import { getDb } from "@/db/client";
import { listLineNotes } from "@/db/queries/notes";

export const dynamic = "force-dynamic";

const listSchema = z
  .object({
    lineId: z.coerce.number().int().positive(),
    from: z.coerce.number().int().min(0),
    to: z.coerce.number().int().min(0),
  })
  .refine((q) => q.from < q.to, { message: "from must be before to", path: ["from"] });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(listSchema, queryObject(request), "notes query");
  return NextResponse.json({ notes: await listLineNotes(getDb(), { lineId: q.lineId, fromTs: q.from, toTs: q.to }) });
});

export const POST = route("note.add", async ({ request, session }) => {
  const result = await addNoteAction.run(session, await readJson(request));
  if (result.ok) return NextResponse.json(result.data, { status: 201 });
  const code = { 400: "bad_input", 401: "unauthenticated", 403: "forbidden", 404: "not_found" }[result.status] ?? "internal";
  return NextResponse.json({ error: result.message, code, fieldErrors: result.fieldErrors }, { status: result.status });
});
