// Device secrets are long random tokens, so a salted SHA-256 is enough to store them (the same
// reasoning as API tokens); people's passwords use bcrypt instead (db/queries/people.ts).
//
// A broker that keeps its own credentials (Mosquitto's dynamic-security plugin) must be given
// the secret itself, and its control API takes no hash of ours. So when the install has a
// BROKER_SEAL_KEY (scripts/stack-env.sh makes one), the stored value also carries the secret
// sealed with AES-256-GCM under that key: `sha256:<salt>:<digest>:<sealed>`. Only the process
// that keeps the broker in step with the devices table (ingest/mosquitto/sync.ts) opens it; the
// key lives in DATA_DIR, never in the database.
import { createCipheriv, createDecipheriv, createHash, randomBytes, timingSafeEqual } from "node:crypto";
import { getSettings } from "./settings";

export function generateDeviceSecret(): string {
  return randomBytes(24).toString("base64url");
}

function sealKey(given?: string | null): Buffer | null {
  const text = given === undefined ? getSettings().BROKER_SEAL_KEY : given;
  if (!text) return null;
  // any long random text: the AES key is its SHA-256
  return createHash("sha256").update(text, "utf8").digest();
}

/** AES-256-GCM: `v1.<iv>.<ciphertext>.<tag>` (base64url). */
export function sealDeviceSecret(secret: string, key: Buffer): string {
  const iv = randomBytes(12);
  const cipher = createCipheriv("aes-256-gcm", key, iv);
  const body = Buffer.concat([cipher.update(secret, "utf8"), cipher.final()]);
  return ["v1", iv.toString("base64url"), body.toString("base64url"), cipher.getAuthTag().toString("base64url")].join(".");
}

/** The secret sealed in a stored value, or null (none sealed, another key, or tampered with). */
export function unsealDeviceSecret(stored: string, keyText: string | null | undefined): string | null {
  const key = sealKey(keyText ?? null);
  const sealed = stored.split(":")[3];
  if (!key || !sealed) return null;
  const [v, iv, body, tag] = sealed.split(".");
  if (v !== "v1" || !iv || !body || !tag) return null;
  try {
    const decipher = createDecipheriv("aes-256-gcm", key, Buffer.from(iv, "base64url"));
    decipher.setAuthTag(Buffer.from(tag, "base64url"));
    return Buffer.concat([decipher.update(Buffer.from(body, "base64url")), decipher.final()]).toString("utf8");
  } catch {
    return null;
  }
}

/** The stored form; `keyText` defaults to the install's BROKER_SEAL_KEY (null: seal nothing). */
export function hashDeviceSecret(secret: string, salt = randomBytes(12).toString("hex"), keyText?: string | null): string {
  const digest = createHash("sha256").update(`${salt}:${secret}`).digest("hex");
  const key = sealKey(keyText);
  return key ? `sha256:${salt}:${digest}:${sealDeviceSecret(secret, key)}` : `sha256:${salt}:${digest}`;
}

export function verifyDeviceSecret(secret: string, stored: string): boolean {
  const parts = stored.split(":");
  if ((parts.length !== 3 && parts.length !== 4) || parts[0] !== "sha256") return false;
  const expected = Buffer.from(parts[2], "hex");
  const actual = createHash("sha256").update(`${parts[1]}:${secret}`).digest();
  return expected.length === actual.length && timingSafeEqual(expected, actual);
}

/** The file (under the data folder) where the seed keeps the demo devices' plain secrets for the simulators. */
export function deviceSecretsFileName(dbName: string): string {
  return `device-secrets-${dbName}.json`;
}
