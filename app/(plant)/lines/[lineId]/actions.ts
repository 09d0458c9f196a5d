"use server";
// Thin server-action wrapper for the line page's note form (checks live in addNoteAction).
import { getSession } from "@/app/_server/session";
import { addNoteAction } from "@/app/_server/actions/notes";

export async function addNote(_prev: unknown, fd: FormData) {
  return addNoteAction.run(await getSession(), fd);
}
