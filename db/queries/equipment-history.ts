// Equipment history (equipment_events) and the uploads attached to equipment, checks and notes.
import { and, desc, eq, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { equipmentEvents, people, uploads } from "../schema";
import type { EquipmentEventKind } from "./equipment-labels";

export type EquipmentEventRow = {
  id: number;
  ts: number;
  kind: EquipmentEventKind;
  text: string | null;
  personName: string | null;
  checkId: number | null;
  uploadId: number | null;
};

export async function addEquipmentEvent(
  db: Pick<Db, "insert">,
  e: { subjectType: "neutralizer" | "device"; subjectId: number; ts: number; kind: EquipmentEventKind; personId: number | null; text?: string | null; checkId?: number | null; uploadId?: number | null },
): Promise<void> {
  await db.insert(equipmentEvents).values({ ...e, text: e.text ?? null, checkId: e.checkId ?? null, uploadId: e.uploadId ?? null });
}

export async function listEquipmentEvents(db: Db, subjectType: "neutralizer" | "device", subjectId: number, limit = 100): Promise<EquipmentEventRow[]> {
  return db
    .select({
      id: equipmentEvents.id,
      ts: equipmentEvents.ts,
      kind: equipmentEvents.kind,
      text: equipmentEvents.text,
      personName: people.name,
      checkId: equipmentEvents.checkId,
      uploadId: equipmentEvents.uploadId,
    })
    .from(equipmentEvents)
    .leftJoin(people, eq(people.id, equipmentEvents.personId))
    .where(and(eq(equipmentEvents.subjectType, subjectType), eq(equipmentEvents.subjectId, subjectId)))
    .orderBy(desc(equipmentEvents.ts), desc(equipmentEvents.id))
    .limit(Math.min(limit, 500));
}

export type UploadSubjectType = "check" | "neutralizer" | "line_note" | "device";
export type UploadRow = {
  id: number;
  storageKey: string;
  originalName: string;
  mimeType: string;
  sizeBytes: number;
  thumbnailKey: string | null;
  subjectType: UploadSubjectType;
  subjectId: number;
  minRole: "viewer" | "shift_lead" | "engineer" | "admin";
  personName: string | null;
  createdTs: number;
};

const uploadColumns = {
  id: uploads.id,
  storageKey: uploads.storageKey,
  originalName: uploads.originalName,
  mimeType: uploads.mimeType,
  sizeBytes: uploads.sizeBytes,
  thumbnailKey: uploads.thumbnailKey,
  subjectType: uploads.subjectType,
  subjectId: uploads.subjectId,
  minRole: uploads.minRole,
  personName: people.name,
  createdTs: uploads.createdTs,
};

export async function getUpload(db: Db, id: number): Promise<UploadRow | null> {
  const rows = await db.select(uploadColumns).from(uploads).leftJoin(people, eq(people.id, uploads.personId)).where(eq(uploads.id, id)).limit(1);
  return rows[0] ?? null;
}

export async function listUploads(db: Db, subjectType: UploadSubjectType, subjectIds: number[]): Promise<UploadRow[]> {
  if (!subjectIds.length) return [];
  return db
    .select(uploadColumns)
    .from(uploads)
    .leftJoin(people, eq(people.id, uploads.personId))
    .where(and(eq(uploads.subjectType, subjectType), inArray(uploads.subjectId, subjectIds)))
    .orderBy(desc(uploads.createdTs), desc(uploads.id));
}

export async function insertUpload(
  db: Db,
  u: { storageKey: string; originalName: string; mimeType: string; sizeBytes: number; sha256: string; thumbnailKey: string | null; subjectType: UploadSubjectType; subjectId: number; minRole: UploadRow["minRole"]; personId: number; createdTs: number },
  historyOf: { subjectType: "neutralizer" | "device"; subjectId: number; text: string } | null,
): Promise<number> {
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(uploads).values(u);
    if (historyOf) {
      await tx.insert(equipmentEvents).values({ ...historyOf, ts: u.createdTs, kind: "upload", personId: u.personId, uploadId: res.insertId });
    }
    return res.insertId;
  });
}
