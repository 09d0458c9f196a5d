// Survey actions: save a plan (a new version when its spots change), receive a round from a
// phone (idempotent by its client-made id), attach a photo to a spot (images only, checked by
// their bytes), turn a finding into an action and close an action. Each checks its own permission.
import "server-only";
import crypto from "node:crypto";
import { fileTypeFromBuffer } from "file-type";
import sharp from "sharp";
import { z } from "zod";
import { getDb } from "@/db/client";
import { writeAudit } from "@/db/queries/audit";
import { savePlan } from "@/db/queries/surveys";
import { closeSurveyAction, createSurveyAction, getSurveyIdByClientId, insertSurveyPhoto } from "@/db/queries/surveys-report";
import { storeRound } from "@/db/queries/surveys-rounds";
import { AppError, notFound } from "@/lib/errors";
import { clientIdSchema, closeActionSchema, createActionSchema, roundSchema, savePlanSchema, SPOT_KEY } from "@/lib/surveys/schemas";
import { defineAction } from "../action";
import { getUploadStore, newStorageKey } from "../storage";

export const savePlanAction = defineAction("survey.plan", savePlanSchema, async (input, session) => {
  const r = await savePlan(getDb(), { planId: input.planId, lineId: input.lineId, name: input.name, comment: input.comment, spots: input.spots }, session.personId);
  if (r.changed) {
    await writeAudit(getDb(), { personId: session.personId, action: "survey.plan", subjectType: "survey_plan", subjectId: r.planId, summary: `Survey plan “${input.name}” saved as version ${r.version} (${input.spots.length} spots)` });
  }
  return r;
});

export const sendRoundAction = defineAction("survey.record", roundSchema, async (input, session) => storeRound(getDb(), input, session.personId));

export const createSurveyActionAction = defineAction("survey.record", createActionSchema, async (input, session) => ({ id: await createSurveyAction(getDb(), input, session.personId) }));

export const closeSurveyActionAction = defineAction("survey.record", closeActionSchema, async (input, session) => {
  await closeSurveyAction(getDb(), input, session.personId);
  return { id: input.actionId };
});

export const MAX_PHOTO_BYTES = 12 * 1024 * 1024;
const PHOTO_TYPES: Record<string, string> = { "image/jpeg": "jpg", "image/png": "png", "image/webp": "webp" };

const photoSchema = z.object({
  clientId: clientIdSchema,
  spotKey: z.string().regex(SPOT_KEY, "Not a spot"),
  file: z.instanceof(File, { message: "Choose a photo" }),
});

/** A spot's photo: stored once per (survey, spot); anything that is not a JPEG, PNG or WebP image by its bytes is refused. */
export const addSurveyPhotoAction = defineAction("survey.record", photoSchema, async (input, session) => {
  const db = getDb();
  const surveyId = await getSurveyIdByClientId(db, input.clientId);
  if (!surveyId) throw notFound("Send the survey's readings before its photos.");
  if (input.file.size > MAX_PHOTO_BYTES) throw new AppError("bad_input", "The photo is larger than 12 MB.", { file: ["At most 12 MB"] });
  if (input.file.size === 0) throw new AppError("bad_input", "The photo is empty.", { file: ["Empty file"] });
  const bytes = Buffer.from(await input.file.arrayBuffer());
  const sniffed = await fileTypeFromBuffer(bytes);
  const ext = sniffed ? PHOTO_TYPES[sniffed.mime] : undefined;
  if (!sniffed || !ext) {
    throw new AppError("unprocessable", `Only photos (JPEG, PNG or WebP) can be attached to a reading; this file is ${sniffed ? sniffed.mime : "not an image"}, whatever its name says.`, { file: ["Not a photo"] });
  }
  let thumb: Buffer;
  try {
    thumb = await sharp(bytes, { limitInputPixels: 100_000_000 }).rotate().resize(640, 640, { fit: "inside", withoutEnlargement: true }).jpeg({ quality: 78 }).toBuffer();
  } catch {
    throw new AppError("unprocessable", "The image could not be read; it may be damaged.", { file: ["Damaged image"] });
  }
  const store = getUploadStore();
  const storageKey = `surveys/${newStorageKey(ext)}`;
  const thumbnailKey = storageKey.replace(/\.[a-z0-9]+$/, ".thumb.jpg");
  await store.put(storageKey, bytes);
  await store.put(thumbnailKey, thumb);
  const r = await insertSurveyPhoto(db, {
    surveyId,
    spotKey: input.spotKey,
    storageKey,
    thumbnailKey,
    mimeType: sniffed.mime,
    sizeBytes: bytes.length,
    sha256: crypto.createHash("sha256").update(bytes).digest("hex"),
    personId: session.personId,
    createdTs: Date.now(),
  });
  if (!r.created) {
    // sent before: keep the first one
    await store.delete(storageKey).catch(() => undefined);
    await store.delete(thumbnailKey).catch(() => undefined);
  }
  return r;
});
