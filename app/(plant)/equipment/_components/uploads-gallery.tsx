// Thumbnails of images and a file line for PDFs; each opens through the permission-checked
// /api/uploads route. Files above the reader's role are listed but not linked.
import type { UploadRow } from "@/db/queries/equipment";
import { roleRank, ROLE_LABELS, type Role } from "@/lib/permissions";
import { fmtBytes, fmtDate } from "./format";

export function UploadsGallery({ uploads, role, timeZone, empty = "No photos or documents yet." }: { uploads: UploadRow[]; role: Role; timeZone: string; empty?: string }) {
  if (!uploads.length) return <p className="text-sm text-ink-faint">{empty}</p>;
  return (
    <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3" data-testid="uploads">
      {uploads.map((u) => {
        const allowed = roleRank(role) >= roleRank(u.minRole);
        const caption = (
          <span className="mt-1 block truncate text-xs text-ink-soft" title={u.originalName}>
            {u.originalName}
            <span className="block text-ink-faint">
              {fmtDate(u.createdTs, timeZone)} · {fmtBytes(u.sizeBytes)}
              {u.minRole !== "viewer" ? ` · ${ROLE_LABELS[u.minRole]}+` : ""}
            </span>
          </span>
        );
        if (!allowed) {
          return (
            <li key={u.id} className="rounded border border-dashed border-paper-line p-2 text-xs text-ink-faint">
              Restricted to {ROLE_LABELS[u.minRole].toLowerCase()}s and above
              {caption}
            </li>
          );
        }
        return (
          <li key={u.id}>
            <a href={`/api/uploads/${u.id}`} target="_blank" rel="noopener" className="group block rounded border border-paper-line bg-paper p-1.5 hover:border-brand">
              {u.thumbnailKey ? (
                // eslint-disable-next-line @next/next/no-img-element -- the thumbnail is already resized by our upload route; next/image would resize it again
                <img src={`/api/uploads/${u.id}?variant=thumb`} alt={u.originalName} className="aspect-[4/3] w-full rounded-sm object-cover" loading="lazy" />
              ) : (
                <span className="flex aspect-[4/3] w-full items-center justify-center rounded-sm bg-paper-sunk text-sm font-semibold text-ink-soft">PDF</span>
              )}
              {caption}
            </a>
          </li>
        );
      })}
    </ul>
  );
}
