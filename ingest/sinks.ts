// The contract for code that reacts to committed readings inside the ingest worker (the live
// rules engine is one). The worker builds every sink listed in ingest/sink-registry.ts at
// start-up, then calls onCommitted after each batch commits, per device in reading-time order,
// and onTick about once a second. A sink's failure is logged and counted; it never stops ingest.
// Types only: importing this module registers nothing.
import type mysql from "mysql2/promise";
import type { Db } from "../db/client";
import type { Env } from "../db/env";
import type { Logger } from "./log";

/** `historical`: a store-and-forward upload (Sparkplug is_historical), never fed to the live rules. */
export type CommittedReading = { deviceId: number; deviceCode: string; channel: string; ts: number; value: number; historical?: boolean };

export type ReadingSink = {
  name: string;
  onCommitted(readings: CommittedReading[]): Promise<void>;
  onTick?(nowMs: number): Promise<void>;
  close?(): Promise<void>;
};

export type SinkContext = {
  pool: mysql.Pool;
  db: Db;
  env: Env;
  log: Logger;
  /** publishes on an internal topic with the worker's service connection (QoS 0 unless given) */
  publish(topic: string, payload: string, qos?: 0 | 1): void;
};

export type SinkFactory = (ctx: SinkContext) => Promise<ReadingSink>;
