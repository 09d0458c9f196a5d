// The install's VAPID key pair for browser push (web-push), made once per install under
// DATA_DIR/secrets/vapid.json with mode 600, like the other per-install secrets. The notifier
// signs pushes with it; the app hands the public key to browsers that subscribe. Whichever
// process comes first writes the file (exclusive create), the other reads it.
import fs from "node:fs";
import path from "node:path";
import webpush from "web-push";
import { z } from "zod";

const keysSchema = z.object({ publicKey: z.string().min(40).max(200), privateKey: z.string().min(20).max(100) });
export type VapidKeys = z.infer<typeof keysSchema>;

export function vapidKeyFile(dataDir: string): string {
  return path.join(dataDir, "secrets", "vapid.json");
}

export function ensureVapidKeys(dataDir: string): VapidKeys {
  const file = vapidKeyFile(dataDir);
  if (!fs.existsSync(file)) {
    fs.mkdirSync(path.dirname(file), { recursive: true, mode: 0o700 });
    const keys = webpush.generateVAPIDKeys();
    try {
      fs.writeFileSync(file, JSON.stringify(keys), { mode: 0o600, flag: "wx" });
    } catch (err) {
      if (!(err && typeof err === "object" && "code" in err && err.code === "EEXIST")) throw err;
    }
  }
  return keysSchema.parse(JSON.parse(fs.readFileSync(file, "utf8")));
}
