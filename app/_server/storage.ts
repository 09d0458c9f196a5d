// Where uploaded files live. A small interface (put/get/delete by key) that an object store
// could replace; the local implementation keeps them under <DATA_DIR>/uploads/, outside
// public/, so nothing is served without going through the permission-checked route.
//
// Keys are made by the server (never from the client's file name) and must match KEY_PATTERN;
// every path is resolved and checked to stay inside the root before it is touched.
import "server-only";
import fs from "node:fs/promises";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { getEnv } from "@/db/env";

export interface BlobStore {
  put(key: string, bytes: Uint8Array): Promise<void>;
  /** null when there is no such key */
  get(key: string): Promise<Buffer | null>;
  delete(key: string): Promise<void>;
}

/** lower-case segments of letters, digits, "-", "_" and "." (never "..") separated by "/" */
export const KEY_PATTERN = /^[a-z0-9][a-z0-9_-]*(\/[a-z0-9][a-z0-9_.-]*)*$/;

export function assertValidKey(key: string): void {
  if (!KEY_PATTERN.test(key) || key.split("/").some((seg) => seg === "." || seg === ".." || seg.includes(".."))) {
    throw new Error(`Invalid storage key: ${JSON.stringify(key).slice(0, 80)}`);
  }
}

/** A fresh key for a new file: "<yyyy>/<mm>/<uuid>.<ext>" (ext from the sniffed type). */
export function newStorageKey(ext: string, nowMs = Date.now()): string {
  const d = new Date(nowMs);
  const safeExt = ext.toLowerCase().replace(/[^a-z0-9]/g, "").slice(0, 8) || "bin";
  return `${d.getUTCFullYear()}/${String(d.getUTCMonth() + 1).padStart(2, "0")}/${randomUUID()}.${safeExt}`;
}

export class LocalDiskStore implements BlobStore {
  readonly root: string;
  constructor(root: string) {
    this.root = path.resolve(root);
  }

  /** The absolute path of a key, refusing anything that would leave the root. */
  pathOf(key: string): string {
    assertValidKey(key);
    const full = path.resolve(this.root, ...key.split("/"));
    if (!full.startsWith(this.root + path.sep)) throw new Error("Storage key escapes the upload folder");
    return full;
  }

  async put(key: string, bytes: Uint8Array): Promise<void> {
    const full = this.pathOf(key);
    await fs.mkdir(path.dirname(full), { recursive: true });
    // write to a temporary name first so a reader never sees half a file
    const tmp = `${full}.${process.pid}.tmp`;
    await fs.writeFile(tmp, bytes, { flag: "wx", mode: 0o640 });
    await fs.rename(tmp, full);
  }

  async get(key: string): Promise<Buffer | null> {
    try {
      return await fs.readFile(this.pathOf(key));
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
      throw err;
    }
  }

  async delete(key: string): Promise<void> {
    await fs.rm(this.pathOf(key), { force: true });
  }
}

let store: BlobStore | undefined;

/** The process's upload store (local disk under DATA_DIR/uploads). */
export function getUploadStore(): BlobStore {
  store ??= new LocalDiskStore(path.join(getEnv().DATA_DIR, "uploads"));
  return store;
}

export function uploadRoot(): string {
  return path.resolve(getEnv().DATA_DIR, "uploads");
}
