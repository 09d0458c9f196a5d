"use client";
// Attach photos (mounting, emitters), printouts (PDF) or data sheets. Files go to /api/uploads,
// which checks their content and size; the page refreshes to show them.
import { useRef, useState } from "react";
import { useRouter } from "next/navigation";
import { inputClass } from "@/components/forms/action-form";

export async function postUpload(file: File, subjectType: string, subjectId: number, minRole: string): Promise<string | null> {
  const fd = new FormData();
  fd.set("file", file);
  fd.set("subjectType", subjectType);
  fd.set("subjectId", String(subjectId));
  fd.set("minRole", minRole);
  const res = await fetch("/api/uploads", { method: "POST", body: fd });
  if (res.ok) return null;
  const body: unknown = await res.json().catch(() => null);
  const msg = body && typeof body === "object" && "error" in body && typeof body.error === "string" ? body.error : `Upload failed (${res.status}).`;
  return `${file.name}: ${msg}`;
}

export function MinRoleSelect({ name = "minRole" }: { name?: string }) {
  return (
    <select name={name} className={inputClass} defaultValue="viewer" aria-label="Who may open it">
      <option value="viewer">Everyone signed in</option>
      <option value="shift_lead">Shift leads and above</option>
      <option value="engineer">Engineers and admins</option>
      <option value="admin">Admins only</option>
    </select>
  );
}

export function UploadForm({ subjectType, subjectId }: { subjectType: "neutralizer" | "device" | "check"; subjectId: number }) {
  const router = useRouter();
  const ref = useRef<HTMLFormElement>(null);
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<string[]>([]);
  const [done, setDone] = useState<string | null>(null);
  return (
    <form
      ref={ref}
      className="space-y-2"
      onSubmit={async (e) => {
        e.preventDefault();
        const fd = new FormData(e.currentTarget);
        const files = fd.getAll("files").filter((f): f is File => f instanceof File && f.size > 0);
        const minRole = String(fd.get("minRole") ?? "viewer");
        if (!files.length) {
          setErrors(["Choose a photo or a PDF first."]);
          return;
        }
        setBusy(true);
        setErrors([]);
        setDone(null);
        const results = await Promise.all(files.map((f) => postUpload(f, subjectType, subjectId, minRole)));
        const failed = results.filter((r): r is string => r !== null);
        setErrors(failed);
        if (failed.length < files.length) {
          setDone(`${files.length - failed.length} file${files.length - failed.length === 1 ? "" : "s"} added.`);
          ref.current?.reset();
          router.refresh();
        }
        setBusy(false);
      }}
    >
      <input
        type="file"
        name="files"
        multiple
        accept="image/jpeg,image/png,image/webp,application/pdf"
        aria-label="Photos or PDF documents"
        className="block w-full text-sm text-ink-soft file:mr-3 file:rounded file:border file:border-paper-line file:bg-paper-raised file:px-3 file:py-1.5 file:text-sm file:text-ink hover:file:bg-paper-sunk"
      />
      <div className="flex items-center gap-2">
        <div className="flex-1">
          <MinRoleSelect />
        </div>
        <button type="submit" disabled={busy} className="rounded bg-brand px-3 py-1.5 text-sm font-medium text-white hover:bg-brand-deep disabled:opacity-50">
          {busy ? "Uploading…" : "Upload"}
        </button>
      </div>
      <p className="text-xs text-ink-faint">JPEG, PNG or WebP photos and PDF documents, up to 20 MB each.</p>
      {errors.map((m) => (
        <p key={m} role="alert" className="rounded bg-over-soft px-3 py-1.5 text-sm text-over">
          {m}
        </p>
      ))}
      {done ? (
        <p role="status" className="text-sm text-ink-soft">
          {done}
        </p>
      ) : null}
    </form>
  );
}
