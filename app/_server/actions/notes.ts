// Line notes (shift lead and up): "new roll", "bar cleaned" at a moment on a line, optionally
// about one point. Used by the line page's form (server action) and by POST /api/notes.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { addLineNote, pointIsOnLine } from "@/db/queries/notes";
import { NOTE_MAX_LENGTH } from "@/lib/views/notes";
import { getPlantLayout } from "@/db/queries/plant";
import { AppError } from "@/lib/errors";
import { defineAction } from "../action";

/** Notes may be placed up to this far ahead of the server clock (clocks differ a little). */
const FUTURE_SLACK_MS = 5 * 60_000;
const OLDEST_MS = 400 * 86_400_000;

const optionalId = z.preprocess((v) => (v === "" || v === null ? undefined : v), z.coerce.number().int().positive().optional());

export const addNoteSchema = z.object({
  lineId: z.coerce.number({ message: "Choose a line" }).int().positive("Choose a line"),
  pointId: optionalId,
  ts: z.coerce
    .number({ message: "Pick the time the note is about" })
    .int()
    .refine((ts) => ts <= Date.now() + FUTURE_SLACK_MS, "A note cannot be in the future")
    .refine((ts) => ts >= Date.now() - OLDEST_MS, "That time is too far back"),
  text: z
    .string({ message: "Write what happened" })
    .trim()
    .min(1, "Write what happened")
    .max(NOTE_MAX_LENGTH, `At most ${NOTE_MAX_LENGTH} characters`),
});

export const addNoteAction = defineAction("note.add", addNoteSchema, async (input, session) => {
  const db = getDb();
  const lineExists = (await getPlantLayout(db)).some((a) => a.lines.some((l) => l.id === input.lineId));
  if (!lineExists) throw new AppError("not_found", "No such line.", { lineId: ["No such line"] });
  if (input.pointId !== undefined && !(await pointIsOnLine(db, input.pointId, input.lineId))) {
    throw new AppError("bad_input", "That point is not on this line.", { pointId: ["Not on this line"] });
  }
  const id = await addLineNote(db, { lineId: input.lineId, pointId: input.pointId ?? null, ts: input.ts, text: input.text, personId: session.personId });
  return { id };
});
