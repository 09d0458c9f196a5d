// What a client is told about an uploaded file. The storage key (where the bytes lie) is never
// sent: files open by id through the permission-checked /api/uploads/<id>. For a file above the
// reader's role, the uploader's name is left out as well; the listing keeps only that a
// restricted file exists, its name, type, size and date.
import { roleRank, type Role } from "./permissions";

export type UploadRowForView = {
  id: number;
  storageKey: string;
  thumbnailKey: string | null;
  originalName: string;
  mimeType: string;
  sizeBytes: number;
  subjectType: string;
  subjectId: number;
  minRole: Role;
  personName: string | null;
  createdTs: number;
};

export type UploadView = Omit<UploadRowForView, "storageKey" | "thumbnailKey"> & { hasThumbnail: boolean; restricted: boolean };

export function toUploadView(row: UploadRowForView, readerRole: Role): UploadView {
  const { storageKey: _key, thumbnailKey, personName, ...rest } = row;
  const restricted = roleRank(readerRole) < roleRank(row.minRole);
  return { ...rest, hasThumbnail: thumbnailKey !== null, restricted, personName: restricted ? null : personName };
}
