// The worker's view of the devices table: code → id, kind, enabled, line/area. Reloaded every
// INGEST_DEVICE_REFRESH_MS (so a disabled device's messages are refused within that time) and
// looked up on demand for a code it has not seen (a device added since the last reload). Kept
// across database outages: ingest goes on with the last good copy.
import type { Db } from "../db/client";
import { findIngestDevice, listIngestDevices, type IngestDevice } from "../db/queries/devices-auth";
import type { Logger } from "./log";
import { describeError } from "./log";

export class DeviceDirectory {
  private byCode = new Map<string, IngestDevice>();
  private byId = new Map<number, IngestDevice>();
  private readonly missLookups = new Map<string, number>();
  loadedTs: number | null = null;

  constructor(
    private readonly db: Db,
    private readonly log: Logger,
  ) {}

  async reload(): Promise<boolean> {
    try {
      const rows = await listIngestDevices(this.db);
      this.byCode = new Map(rows.map((d) => [d.code, d]));
      this.byId = new Map(rows.map((d) => [d.id, d]));
      this.loadedTs = Date.now();
      return true;
    } catch (err) {
      this.log.warn("could not reload devices; keeping the last copy", { error: describeError(err) });
      return false;
    }
  }

  get size(): number {
    return this.byCode.size;
  }

  get(code: string): IngestDevice | undefined {
    return this.byCode.get(code);
  }

  getById(id: number): IngestDevice | undefined {
    return this.byId.get(id);
  }

  all(): IngestDevice[] {
    return [...this.byCode.values()];
  }

  /** Looks a code up in the database (at most once per 5 s per unknown code). */
  async lookup(code: string): Promise<IngestDevice | null> {
    const last = this.missLookups.get(code) ?? 0;
    if (Date.now() - last < 5000) return null;
    this.missLookups.set(code, Date.now());
    if (this.missLookups.size > 10_000) this.missLookups.clear();
    try {
      const found = await findIngestDevice(this.db, code);
      if (found) {
        this.byCode.set(found.code, found);
        this.byId.set(found.id, found);
      }
      return found;
    } catch (err) {
      this.log.warn("device look-up failed", { code, error: describeError(err) });
      return null;
    }
  }

  setOnline(id: number, online: boolean): void {
    const d = this.byId.get(id);
    if (d) d.online = online;
  }
}
