// Where chart, report and export reads go: a read-only GTID replica when one is configured
// (DB_REPLICA_PORT; scripts/mariadb-replica.sh starts it) and at most DB_REPLICA_MAX_LAG_S
// seconds behind, else the primary. Writes never come here: they always use getDb().
// The replica's state (SHOW SLAVE STATUS) is checked at most every DB_REPLICA_CHECK_MS and
// shared by every caller in the meantime, so a chart costs no extra round trip; a replica that
// is stopped, unreachable, not replicating or lagging sends reads to the primary until a later
// check finds it fit again.
import type mysql from "mysql2/promise";

import type { ReplicaView } from "../lib/views/replica";

export type ReplicaState = ReplicaView;

type SlaveStatusRow = { Slave_IO_Running?: unknown; Slave_SQL_Running?: unknown; Seconds_Behind_Master?: unknown; Last_IO_Error?: unknown; Last_SQL_Error?: unknown };

/** Judges one SHOW SLAVE STATUS row against the lag allowed (pure; tests call it directly). */
export function judgeReplica(row: SlaveStatusRow | null, maxLagS: number): { usable: boolean; lagS: number | null; reason: string } {
  if (!row) return { usable: false, lagS: null, reason: "the replica is not set up to replicate" };
  const io = String(row.Slave_IO_Running ?? "");
  const sqlThread = String(row.Slave_SQL_Running ?? "");
  const lag = row.Seconds_Behind_Master === null || row.Seconds_Behind_Master === undefined ? null : Number(row.Seconds_Behind_Master);
  if (sqlThread !== "Yes") return { usable: false, lagS: lag, reason: `replication is stopped${row.Last_SQL_Error ? `: ${String(row.Last_SQL_Error).slice(0, 200)}` : ""}` };
  if (io !== "Yes") return { usable: false, lagS: lag, reason: `the replica is not connected to the primary${row.Last_IO_Error ? `: ${String(row.Last_IO_Error).slice(0, 200)}` : ""}` };
  if (lag === null || !Number.isFinite(lag)) return { usable: false, lagS: null, reason: "the replica's lag is unknown" };
  if (lag > maxLagS) return { usable: false, lagS: lag, reason: `the replica is ${lag} s behind (more than ${maxLagS} s)` };
  return { usable: true, lagS: lag, reason: `the replica is ${lag} s behind` };
}

export type ReplicaTarget<D> = { db: D; pool: mysql.Pool };

export class ReadRouter<D> {
  private state: ReplicaState;
  private checking: Promise<ReplicaState> | null = null;

  constructor(
    private readonly primary: D,
    private readonly replica: ReplicaTarget<D> | null,
    private readonly opts: { maxLagS: number; checkMs: number; timeoutMs?: number },
  ) {
    this.state = replica
      ? { configured: true, usable: false, lagS: null, reason: "not checked yet", checkedTs: null }
      : { configured: false, usable: false, lagS: null, reason: "no replica is configured", checkedTs: null };
  }

  /** The replica's state, checked again when the last check is older than checkMs. */
  async status(nowMs = Date.now()): Promise<ReplicaState> {
    if (!this.replica) return this.state;
    if (this.state.checkedTs !== null && nowMs - this.state.checkedTs < this.opts.checkMs) return this.state;
    this.checking ??= this.check().finally(() => {
      this.checking = null;
    });
    return this.checking;
  }

  /** The database for a chart, report or export read. */
  async readDb(): Promise<D> {
    const s = await this.status();
    return s.usable && this.replica ? this.replica.db : this.primary;
  }

  private async check(): Promise<ReplicaState> {
    const replica = this.replica!;
    let judged: { usable: boolean; lagS: number | null; reason: string };
    try {
      const [rows] = await replica.pool.query({ sql: "SHOW SLAVE STATUS", timeout: this.opts.timeoutMs ?? 1_000 });
      const row = Array.isArray(rows) && rows.length > 0 ? (rows[0] as SlaveStatusRow) : null;
      judged = judgeReplica(row, this.opts.maxLagS);
    } catch (err) {
      judged = { usable: false, lagS: null, reason: `the replica does not answer (${err instanceof Error ? err.message.slice(0, 160) : String(err)})` };
    }
    this.state = { configured: true, ...judged, checkedTs: Date.now() };
    return this.state;
  }
}
