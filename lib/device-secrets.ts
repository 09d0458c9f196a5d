// Device secrets are long random tokens, so a salted SHA-256 is enough to store them (the same
// reasoning as API tokens); people's passwords use bcrypt instead (db/queries/people.ts).
import { createHash, randomBytes, timingSafeEqual } from "node:crypto";

export function generateDeviceSecret(): string {
  return randomBytes(24).toString("base64url");
}

export function hashDeviceSecret(secret: string, salt = randomBytes(12).toString("hex")): string {
  const digest = createHash("sha256").update(`${salt}:${secret}`).digest("hex");
  return `sha256:${salt}:${digest}`;
}

export function verifyDeviceSecret(secret: string, stored: string): boolean {
  const parts = stored.split(":");
  if (parts.length !== 3 || parts[0] !== "sha256") return false;
  const expected = Buffer.from(parts[2], "hex");
  const actual = createHash("sha256").update(`${parts[1]}:${secret}`).digest();
  return expected.length === actual.length && timingSafeEqual(expected, actual);
}
