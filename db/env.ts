// Kept so existing imports keep working: the settings live in lib/settings.ts, the one module
// that reads the environment. New code imports getSettings() from there.
import { getSettings, type Settings } from "../lib/settings";

export type Env = Settings;

/** This process's settings (lib/settings.ts); throws with a readable list of what is wrong. */
export function getEnv(): Env {
  return getSettings();
}
