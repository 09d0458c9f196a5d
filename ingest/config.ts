// The broker's and the ingest worker's view of the settings (lib/settings.ts, the one module
// that reads the environment): the same object, plus a broker id that names this machine.
import os from "node:os";
import { getSettings, type Settings } from "../lib/settings";

export type IngestConfig = Settings & { BROKER_ID: string };

export function getIngestConfig(): IngestConfig {
  const s = getSettings();
  return { ...s, BROKER_ID: s.BROKER_ID ?? `broker@${os.hostname()}` };
}
