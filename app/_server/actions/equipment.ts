// Equipment actions: add and edit neutralizers, record a cleaning or a note, and accept an
// uploaded file (photo, printout, data sheet) for a check, a neutralizer, a device or a line
// note. Each action checks its own permission (defineAction) and validates with zod.
import "server-only";
import crypto from "node:crypto";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { fileTypeFromBuffer } from "file-type";
import sharp from "sharp";
import { getDb } from "@/db/client";
import { writeAudit } from "@/db/queries/audit";
import { getCheck } from "@/db/queries/checks";
import {
  addEquipmentEvent,
  createNeutralizer,
  getNeutralizer,
  getPlaceOptions,
  getPlantSettings,
  insertUpload,
  markCleaned,
  pointExists,
  updateNeutralizer,
  type NeutralizerWrite,
  type UploadSubjectType,
} from "@/db/queries/equipment";
import { devices, lineNotes, neutralizers } from "@/db/schema";
import { NEUTRALIZER_KINDS, NEUTRALIZER_STATES } from "@/db/schema/plant";
import { AppError, badInput, notFound } from "@/lib/errors";
import { neutralizerWarnings, type EquipmentWarning } from "@/lib/equipment-warnings";
import { ROLE_NAMES, type Role } from "@/lib/permissions";
import { defineAction } from "../action";
import type { SessionPerson } from "../session";
import { getUploadStore, newStorageKey } from "../storage";
import { TZDate } from "@date-fns/tz";

// ---------------------------------------------------------------------------------------------
// form values (shared by the equipment, checks, devices and imports actions): forms send
// strings; an empty field means "not given"

export const idField = z.coerce.number({ message: "Missing id" }).int().positive();

const emptyToNull = (v: unknown) => (v === "" || v === undefined || v === null ? null : typeof v === "string" ? v.trim().replace(",", ".").replace("\u2212", "-") : v);

export const optionalNumber = (min: number, max: number, message: string) =>
  z.preprocess(emptyToNull, z.coerce.number({ message }).refine(Number.isFinite, message).pipe(z.number().min(min, message).max(max, message)).nullable());

export const requiredNumber = (min: number, max: number, message: string) =>
  z.preprocess((v) => (typeof v === "string" ? (v.trim() === "" ? undefined : v.trim().replace(",", ".").replace("\u2212", "-")) : v), z.coerce.number({ message }).min(min, message).max(max, message));

export const optionalText = (max: number) =>
  z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? null : v === undefined ? null : typeof v === "string" ? v.trim() : v), z.string().max(max, `At most ${max} characters`).nullable());

export const checkbox = z.preprocess((v) => v === "on" || v === "true" || v === true || v === "1", z.boolean());

function validYmd(s: string): boolean {
  const [y, m, d] = s.split("-").map(Number);
  const dt = new Date(Date.UTC(y, m - 1, d));
  return dt.getUTCFullYear() === y && dt.getUTCMonth() === m - 1 && dt.getUTCDate() === d && y >= 1990 && y <= 2100;
}

export const optionalDate = z.preprocess(
  (v) => (v === "" || v === undefined ? null : v),
  z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date").refine(validYmd, "Not a real date").nullable(),
);

/** "YYYY-MM-DDTHH:MM" (an <input type=datetime-local>) in the plant's time zone → epoch ms. */
export function localDateTimeToMs(value: string, timeZone: string): number | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/.exec(value.trim());
  if (!m) return null;
  const [y, mo, d, h, mi, s] = [+m[1], +m[2], +m[3], +m[4], +m[5], m[6] ? +m[6] : 0];
  if (!validYmd(`${m[1]}-${m[2]}-${m[3]}`) || h > 23 || mi > 59 || s > 59) return null;
  return new TZDate(y, mo - 1, d, h, mi, s, 0, timeZone).getTime();
}

const neutralizerSchema = z.object({
  tag: z
    .string()
    .trim()
    .min(1, "Enter the tag on the bar")
    .max(60, "At most 60 characters")
    .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, "Letters, digits, spaces and - _ . / only"),
  kind: z.enum(NEUTRALIZER_KINDS, { message: "Choose a kind" }),
  lengthMm: optionalNumber(10, 10_000, "Length in mm, 10–10,000"),
  powerUnit: optionalText(120),
  outputKv: optionalNumber(0.1, 60, "Output in kV, 0.1–60"),
  airAssisted: checkbox,
  mountingDistanceMm: optionalNumber(1, 5_000, "Distance in mm, 1–5,000"),
  pointId: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.coerce.number().int().positive().nullable()),
  installedOn: optionalDate,
  cleaningIntervalDays: z.coerce.number({ message: "Days between cleanings" }).int("Whole days").min(1, "At least 1 day").max(365, "At most 365 days"),
  checkIntervalDays: z.coerce.number({ message: "Days between checks" }).int("Whole days").min(1, "At least 1 day").max(1095, "At most 3 years"),
  state: z.enum(NEUTRALIZER_STATES, { message: "Choose a state" }),
  notes: optionalText(2000),
});

async function checkPoint(pointId: number | null): Promise<void> {
  if (pointId !== null && !(await pointExists(getDb(), pointId))) throw badInput("No such measuring point.", { pointId: ["No such measuring point"] });
}

async function warningsFor(input: NeutralizerWrite): Promise<EquipmentWarning[]> {
  const places = await getPlaceOptions(getDb());
  const point = places.points.find((p) => p.id === input.pointId);
  const solventLine = point ? (places.lines.find((l) => l.id === point.lineId)?.solvent ?? false) : false;
  return neutralizerWarnings({ ...input, solventLine });
}

function isDuplicate(err: unknown): boolean {
  const e = err as { code?: string; cause?: { code?: string } };
  return e?.code === "ER_DUP_ENTRY" || e?.cause?.code === "ER_DUP_ENTRY";
}

export const createNeutralizerAction = defineAction("equipment.edit", neutralizerSchema, async (input, session) => {
  await checkPoint(input.pointId);
  const db = getDb();
  let id: number;
  try {
    id = await createNeutralizer(db, input, session.personId);
  } catch (err) {
    if (isDuplicate(err)) throw new AppError("conflict", "A neutralizer with this tag exists already.", { tag: ["This tag is taken"] });
    throw err;
  }
  await writeAudit(db, { personId: session.personId, action: "neutralizer.add", subjectType: "neutralizer", subjectId: id, summary: `Added neutralizer ${input.tag}`, detail: input });
  return { id, warnings: await warningsFor(input) };
});

export const updateNeutralizerAction = defineAction("equipment.edit", neutralizerSchema.extend({ id: idField }), async ({ id, ...input }, session) => {
  await checkPoint(input.pointId);
  const db = getDb();
  const before = await getNeutralizer(db, id);
  if (!before) throw notFound("No such neutralizer.");
  let changed: string[];
  try {
    ({ changed } = await updateNeutralizer(db, id, input, session.personId));
  } catch (err) {
    if (isDuplicate(err)) throw new AppError("conflict", "A neutralizer with this tag exists already.", { tag: ["This tag is taken"] });
    throw err;
  }
  if (changed.length) {
    await writeAudit(db, { personId: session.personId, action: "neutralizer.edit", subjectType: "neutralizer", subjectId: id, summary: `Edited neutralizer ${input.tag}: ${changed.join(", ")}`, detail: { changed, after: input } });
  }
  return { id, changed, warnings: await warningsFor(input) };
});

export const markCleanedAction = defineAction(
  "check.record",
  z.object({
    id: idField,
    cleanedAt: z.string().trim().optional(),
    note: optionalText(500),
  }),
  async ({ id, cleanedAt, note }, session) => {
    const db = getDb();
    const n = await getNeutralizer(db, id);
    if (!n) throw notFound("No such neutralizer.");
    const now = Date.now();
    let ts = now;
    if (cleanedAt) {
      const plant = await getPlantSettings(db);
      const parsed = localDateTimeToMs(cleanedAt, plant.timeZone);
      if (parsed === null) throw badInput("Please correct the marked fields.", { cleanedAt: ["Use a date and time"] });
      if (parsed > now + 5 * 60_000) throw badInput("Please correct the marked fields.", { cleanedAt: ["The cleaning cannot be in the future"] });
      ts = parsed;
    }
    const { stateChanged } = await markCleaned(db, id, ts, session.personId, note);
    await writeAudit(db, { personId: session.personId, action: "neutralizer.cleaned", subjectType: "neutralizer", subjectId: id, summary: `Recorded a cleaning of ${n.tag}` });
    return { id, cleanedTs: ts, stateChanged };
  },
);

export const addEquipmentNoteAction = defineAction(
  "equipment.edit",
  z.object({
    subjectType: z.enum(["neutralizer", "device"]),
    subjectId: idField,
    text: z.string().trim().min(1, "Write the note").max(1000, "At most 1000 characters"),
    kind: z.enum(["note", "fault"]).default("note"),
  }),
  async ({ subjectType, subjectId, text, kind }, session) => {
    const db = getDb();
    const table = subjectType === "neutralizer" ? neutralizers : devices;
    const exists = (await db.select({ id: table.id }).from(table).where(eq(table.id, subjectId)).limit(1)).length > 0;
    if (!exists) throw notFound(`No such ${subjectType}.`);
    await addEquipmentEvent(db, { subjectType, subjectId, ts: Date.now(), kind, personId: session.personId, text });
    await writeAudit(db, { personId: session.personId, action: `${subjectType}.${kind}`, subjectType, subjectId, summary: text.slice(0, 200) });
    return { ok: true };
  },
);

// ---------------------------------------------------------------------------------------------
// uploads

export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;
/** What may be uploaded, decided by the file's first bytes (never by its name or the browser). */
export const ALLOWED_UPLOAD_TYPES: Record<string, string> = {
  "image/jpeg": "jpg",
  "image/png": "png",
  "image/webp": "webp",
  "application/pdf": "pdf",
};

export class UploadTooLarge extends AppError {
  constructor() {
    super("unprocessable", `The file is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB.`, { file: [`At most ${MAX_UPLOAD_BYTES / 1024 / 1024} MB`] });
  }
}

/** A display name with no folders, control characters or odd whitespace; the path never uses it. */
export function cleanFileName(name: string): string {
  const base = name.split(/[/\\]/).pop() ?? "";
  const cleaned = base
    .normalize("NFC")
    .replace(/[\u0000-\u001f\u007f<>:"|?*]/g, "")
    .replace(/\s+/g, " ")
    .replace(/^\.+/, "")
    .trim()
    .slice(0, 200);
  return cleaned || "file";
}

const uploadSchema = z.object({
  file: z.instanceof(File, { message: "Choose a file" }),
  subjectType: z.enum(["check", "neutralizer", "line_note", "device"]),
  subjectId: idField,
  minRole: z.enum(ROLE_NAMES).default("viewer"),
});

export type AcceptedUpload = { id: number; mimeType: string; sizeBytes: number; originalName: string; thumbnail: boolean };

async function subjectHistory(subjectType: UploadSubjectType, subjectId: number): Promise<{ subjectType: "neutralizer" | "device"; subjectId: number; label: string } | null> {
  const db = getDb();
  if (subjectType === "neutralizer") {
    const n = await getNeutralizer(db, subjectId);
    if (!n) throw notFound("No such neutralizer.");
    return { subjectType: "neutralizer", subjectId, label: n.tag };
  }
  if (subjectType === "device") {
    const d = (await db.select({ id: devices.id, code: devices.code }).from(devices).where(eq(devices.id, subjectId)).limit(1))[0];
    if (!d) throw notFound("No such device.");
    return { subjectType: "device", subjectId, label: d.code };
  }
  if (subjectType === "check") {
    const c = await getCheck(db, subjectId);
    if (!c) throw notFound("No such check.");
    return { subjectType: "neutralizer", subjectId: c.neutralizerId, label: c.tag };
  }
  const note = (await db.select({ id: lineNotes.id }).from(lineNotes).where(eq(lineNotes.id, subjectId)).limit(1))[0];
  if (!note) throw notFound("No such line note.");
  return null;
}

/**
 * Stores an uploaded file after checking its size and its real type (by its first bytes), makes
 * a thumbnail for images, records it and adds it to the equipment's history.
 */
export async function acceptUpload(
  input: { file: File; subjectType: UploadSubjectType; subjectId: number; minRole: Role },
  session: SessionPerson,
  nowMs = Date.now(),
): Promise<AcceptedUpload> {
  if (input.file.size > MAX_UPLOAD_BYTES) throw new UploadTooLarge();
  if (input.file.size === 0) throw badInput("The file is empty.", { file: ["The file is empty"] });
  const history = await subjectHistory(input.subjectType, input.subjectId);
  const bytes = Buffer.from(await input.file.arrayBuffer());
  if (bytes.length > MAX_UPLOAD_BYTES) throw new UploadTooLarge();
  const sniffed = await fileTypeFromBuffer(bytes);
  const ext = sniffed ? ALLOWED_UPLOAD_TYPES[sniffed.mime] : undefined;
  if (!sniffed || !ext) {
    const what = sniffed ? `its content is ${sniffed.mime}` : "its content is not a known file type";
    throw new AppError("unprocessable", `Only JPEG, PNG or WebP photos and PDF documents can be uploaded; ${what}, whatever its name says.`, { file: ["Not a photo or PDF"] });
  }
  const originalName = cleanFileName(input.file.name);
  const store = getUploadStore();
  const storageKey = newStorageKey(ext, nowMs);
  let thumbnailKey: string | null = null;
  let thumb: Buffer | null = null;
  if (sniffed.mime.startsWith("image/")) {
    try {
      thumb = await sharp(bytes, { limitInputPixels: 100_000_000 }).rotate().resize(480, 480, { fit: "inside", withoutEnlargement: true }).webp({ quality: 78 }).toBuffer();
    } catch {
      throw new AppError("unprocessable", "The image could not be read; it may be damaged.", { file: ["Damaged image"] });
    }
    thumbnailKey = storageKey.replace(/\.[a-z0-9]+$/, ".thumb.webp");
  }
  await store.put(storageKey, bytes);
  if (thumb && thumbnailKey) await store.put(thumbnailKey, thumb);
  let id: number;
  try {
    id = await insertUpload(
      getDb(),
      {
        storageKey,
        originalName,
        mimeType: sniffed.mime,
        sizeBytes: bytes.length,
        sha256: crypto.createHash("sha256").update(bytes).digest("hex"),
        thumbnailKey,
        subjectType: input.subjectType,
        subjectId: input.subjectId,
        minRole: input.minRole,
        personId: session.personId,
        createdTs: nowMs,
      },
      history ? { subjectType: history.subjectType, subjectId: history.subjectId, text: `${sniffed.mime === "application/pdf" ? "PDF" : "Photo"} “${originalName}”${input.subjectType === "check" ? " attached to a check" : ""}.` } : null,
    );
  } catch (err) {
    await store.delete(storageKey).catch(() => undefined);
    if (thumbnailKey) await store.delete(thumbnailKey).catch(() => undefined);
    throw err;
  }
  await writeAudit(getDb(), { personId: session.personId, action: "upload.add", subjectType: input.subjectType, subjectId: input.subjectId, summary: `Uploaded ${originalName} (${sniffed.mime}, ${bytes.length} bytes)`, detail: { uploadId: id, minRole: input.minRole } });
  return { id, mimeType: sniffed.mime, sizeBytes: bytes.length, originalName, thumbnail: thumbnailKey !== null };
}

export const uploadFileAction = defineAction("upload.add", uploadSchema, async (input, session) => acceptUpload(input, session));
