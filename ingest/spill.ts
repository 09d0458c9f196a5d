// Spill files: readings the worker has accepted but could not yet commit (database down, or
// more buffered than the memory bound allows). A spill is written to `<name>.part`, fsynced,
// then renamed to `<name>.csv`, and only then are its messages acknowledged, so a crash at any
// point loses nothing: either the broker still holds the messages or a complete file exists.
// Files are replayed oldest first when the database is back (also after a restart) and deleted
// once committed. Replays are idempotent (see db/queries/readings-write.ts).
import fs from "node:fs";
import path from "node:path";
import { CHANNELS, type Channel } from "../lib/contract/readings-payload";
import type { ReadingRow } from "../db/queries/readings-write";

const CHANNEL_SET = new Set<string>(CHANNELS);
const isChannel = (c: string): c is Channel => CHANNEL_SET.has(c);

export class SpillStore {
  private seq = 0;
  constructor(readonly dir: string) {
    fs.mkdirSync(dir, { recursive: true });
    // a .part file is a spill that never completed: its messages were never acknowledged
    for (const f of fs.readdirSync(dir)) if (f.endsWith(".part")) fs.rmSync(path.join(dir, f), { force: true });
  }

  /** Writes rows durably; resolves once the file is complete and on disk. */
  async write(rows: readonly ReadingRow[]): Promise<string> {
    const name = `${Date.now().toString().padStart(15, "0")}-${process.pid}-${String(this.seq++).padStart(6, "0")}`;
    const part = path.join(this.dir, `${name}.part`);
    const final = path.join(this.dir, `${name}.csv`);
    const lines: string[] = new Array(rows.length);
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i];
      lines[i] = `${r.deviceId},${r.channel},${r.ts},${r.value}`;
    }
    const fh = await fs.promises.open(part, "w", 0o600);
    try {
      await fh.writeFile(lines.join("\n") + "\n", "utf8");
      await fh.sync();
    } finally {
      await fh.close();
    }
    await fs.promises.rename(part, final);
    return final;
  }

  /** Complete spill files, oldest first. */
  list(): string[] {
    return fs
      .readdirSync(this.dir)
      .filter((f) => f.endsWith(".csv"))
      .sort()
      .map((f) => path.join(this.dir, f));
  }

  pendingRows(): number {
    let n = 0;
    for (const f of this.list()) {
      try {
        // rows are about 40 bytes; an estimate is enough for the health counter
        n += Math.round(fs.statSync(f).size / 40);
      } catch {
        // deleted meanwhile
      }
    }
    return n;
  }

  async read(file: string): Promise<{ rows: ReadingRow[]; bad: number }> {
    const text = await fs.promises.readFile(file, "utf8");
    const rows: ReadingRow[] = [];
    let bad = 0;
    for (const line of text.split("\n")) {
      if (line.length === 0) continue;
      const [d, channel, ts, value] = line.split(",");
      const row = { deviceId: Number(d), channel, ts: Number(ts), value: Number(value) };
      if (!Number.isInteger(row.deviceId) || !isChannel(channel) || !Number.isInteger(row.ts) || !Number.isFinite(row.value)) {
        bad++;
        continue;
      }
      rows.push({ deviceId: row.deviceId, channel, ts: row.ts, value: row.value });
    }
    return { rows, bad };
  }

  async remove(file: string): Promise<void> {
    await fs.promises.rm(file, { force: true });
  }
}
