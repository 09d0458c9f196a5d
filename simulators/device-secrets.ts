// The demo devices' secrets, as the seed wrote them for the simulators (db/seed.ts writes
// DATA_DIR/device-secrets-<database>.json; lib/device-secrets.ts names the file). A simulator stands
// in for the devices, so it reads its secrets from that file like a device's own configuration,
// not from the database.
import fs from "node:fs";
import path from "node:path";
import { deviceSecretsFileName } from "../lib/device-secrets";
import { getSettings } from "../lib/settings";

/** code → plain secret of every seeded demo device. */
export function readSimulatorSecrets(dbName?: string): Record<string, string> {
  const s = getSettings();
  const file = path.resolve(s.DATA_DIR, deviceSecretsFileName(dbName ?? s.DB_NAME));
  if (!fs.existsSync(file)) throw new Error(`No device secrets at ${file}; run the seed first (npm run db:seed).`);
  const parsed: unknown = JSON.parse(fs.readFileSync(file, "utf8"));
  if (!parsed || typeof parsed !== "object") throw new Error(`${file} does not hold device secrets`);
  return Object.fromEntries(Object.entries(parsed).filter((e): e is [string, string] => typeof e[1] === "string"));
}
