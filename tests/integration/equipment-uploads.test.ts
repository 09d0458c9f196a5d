// Uploads: type by first bytes, size limit, thumbnails, and file names that try to leave the
// upload folder. Files are made in the test (sharp for real images, raw bytes for the rest).
import fs from "node:fs";
import path from "node:path";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { equipmentEvents, neutralizers, people, uploads } from "@/db/schema";
import { getUpload } from "@/db/queries/equipment";
import { cleanFileName, MAX_UPLOAD_BYTES, uploadFileAction } from "@/app/_server/actions/equipment";
import { getUploadStore, LocalDiskStore, uploadRoot } from "@/app/_server/storage";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((x) => x.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

let engineer: SessionPerson;
let barId: number;
let photo: Buffer;

beforeAll(async () => {
  engineer = await sessionOf("engineer");
  barId = (await getDb().select({ id: neutralizers.id }).from(neutralizers).where(eq(neutralizers.tag, "N-GRAVURE-1-REWIND")))[0].id;
  // a real 1200 × 800 JPEG "photo of the mounting"
  photo = await sharp({ create: { width: 1200, height: 800, channels: 3, background: { r: 120, g: 130, b: 140 } } }).jpeg().toBuffer();
});
afterAll(async () => {
  await closeDb();
});

const file = (bytes: Uint8Array, name: string, type = "") => new File([new Uint8Array(bytes)], name, { type });

describe("what may be uploaded", () => {
  it("a JPEG photo is stored outside public/, with a WebP thumbnail at most 480 px, and joins the bar's history", async () => {
    const r = await uploadFileAction.run(engineer, { file: file(photo, "Mounting, unwind side.jpg", "image/jpeg"), subjectType: "neutralizer", subjectId: String(barId), minRole: "viewer" });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.data).toMatchObject({ mimeType: "image/jpeg", sizeBytes: photo.length, originalName: "Mounting, unwind side.jpg", thumbnail: true });
    const row = (await getUpload(getDb(), r.data!.id))!;
    expect(row.storageKey).toMatch(/^\d{4}\/\d{2}\/[0-9a-f-]{36}\.jpg$/);
    const stored = await getUploadStore().get(row.storageKey);
    expect(stored?.equals(photo)).toBe(true);
    expect(path.resolve(uploadRoot(), row.storageKey)).not.toContain(`${path.sep}public${path.sep}`);
    const thumb = await getUploadStore().get(row.thumbnailKey!);
    const meta = await sharp(thumb!).metadata();
    expect(meta.format).toBe("webp");
    expect(Math.max(meta.width!, meta.height!)).toBe(480);
    const ev = await getDb().select().from(equipmentEvents).where(eq(equipmentEvents.uploadId, r.data!.id));
    expect(ev).toHaveLength(1);
    expect(ev[0]).toMatchObject({ subjectType: "neutralizer", subjectId: barId, kind: "upload" });
  });

  it("a PDF printout is accepted (no thumbnail) and can be limited to engineers", async () => {
    const pdf = Buffer.from("%PDF-1.4\n1 0 obj\n<< /Type /Catalog >>\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n");
    const r = await uploadFileAction.run(engineer, { file: file(pdf, "decay-printout.pdf", "application/pdf"), subjectType: "neutralizer", subjectId: barId, minRole: "engineer" });
    expect(r.ok && r.data).toMatchObject({ mimeType: "application/pdf", thumbnail: false });
    const row = await getUpload(getDb(), (r.ok && r.data!.id) as number);
    expect(row).toMatchObject({ minRole: "engineer", thumbnailKey: null });
  });

  it("an executable renamed .png is refused by its content", async () => {
    // an ELF header (Linux executable) and a PE header ("MZ", Windows executable)
    const elf = new Uint8Array(4200);
    elf.set([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01, 0x00]);
    const pe = new Uint8Array(4200);
    pe.set([0x4d, 0x5a, 0x90, 0x00, 0x03]);
    const count = (await getDb().select({ id: uploads.id }).from(uploads)).length;
    for (const bytes of [elf, pe]) {
      const r = await uploadFileAction.run(engineer, { file: file(bytes, "photo.png", "image/png"), subjectType: "neutralizer", subjectId: barId });
      expect(r).toMatchObject({ ok: false, status: 422 });
      if (!r.ok) expect(r.message).toMatch(/Only JPEG, PNG or WebP photos and PDF documents/);
    }
    // plain text called .jpg and an SVG (script-capable) are refused as well
    for (const [bytes, name] of [
      [Buffer.from("just text"), "notes.jpg"],
      [Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), "x.png"],
    ] as const) {
      expect(await uploadFileAction.run(engineer, { file: file(bytes, name), subjectType: "neutralizer", subjectId: barId })).toMatchObject({ ok: false, status: 422 });
    }
    expect((await getDb().select({ id: uploads.id }).from(uploads)).length).toBe(count);
  });

  it("a file over 20 MB is refused", async () => {
    const big = new Uint8Array(MAX_UPLOAD_BYTES + 1);
    big.set([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const r = await uploadFileAction.run(engineer, { file: file(big, "big.png", "image/png"), subjectType: "neutralizer", subjectId: barId });
    expect(r).toMatchObject({ ok: false, status: 422 });
    if (!r.ok) expect(r.message).toMatch(/larger than 20 MB/);
  });

  it("an upload to something that does not exist is a 404", async () => {
    expect(await uploadFileAction.run(engineer, { file: file(photo, "a.jpg"), subjectType: "check", subjectId: 999999 })).toMatchObject({ ok: false, status: 404 });
  });
});

describe("file names cannot escape the upload folder", () => {
  it("a name with path separators is reduced to its last part and never used for the path", async () => {
    const png = await sharp({ create: { width: 20, height: 20, channels: 3, background: "#888" } }).png().toBuffer();
    const evil = "../../../../tmp/stillfield-escape.png";
    const r = await uploadFileAction.run(engineer, { file: file(png, evil, "image/png"), subjectType: "neutralizer", subjectId: barId });
    expect(r.ok).toBe(true);
    const row = (await getUpload(getDb(), (r.ok && r.data!.id) as number))!;
    expect(row.originalName).toBe("stillfield-escape.png");
    expect(row.storageKey).not.toContain("..");
    expect(fs.existsSync(path.join(uploadRoot(), row.storageKey))).toBe(true);
    expect(fs.existsSync("/tmp/stillfield-escape.png")).toBe(false);
    expect(cleanFileName("..\\..\\windows\\system32\\evil.pdf")).toBe("evil.pdf");
    expect(cleanFileName("a\u0000b\nc.jpg")).toBe("abc.jpg");
    expect(cleanFileName("...")).toBe("file");
  });

  it("the store refuses keys that would leave its folder", async () => {
    const root = path.join(uploadRoot(), "..", "store-test");
    const store = new LocalDiskStore(root);
    for (const key of ["../outside.txt", "2026/../../outside.txt", "/etc/passwd", "a//b", "A/B.txt", "2026/01/..", "..", ""]) {
      await expect(store.put(key, new Uint8Array([1]))).rejects.toThrow(/Invalid storage key|escapes/);
      await expect(store.get(key)).rejects.toThrow(/Invalid storage key|escapes/);
    }
    await store.put("2026/01/ok.bin", new Uint8Array([1, 2, 3]));
    expect([...(await store.get("2026/01/ok.bin"))!]).toEqual([1, 2, 3]);
    await store.delete("2026/01/ok.bin");
    expect(await store.get("2026/01/ok.bin")).toBeNull();
    fs.rmSync(root, { recursive: true, force: true });
  });
});
