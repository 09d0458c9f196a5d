// The read replica's state as the read routing sees it (db/read-replica.ts), for the Health page.
export type ReplicaView = {
  configured: boolean;
  /** reads go to the replica now */
  usable: boolean;
  /** Seconds_Behind_Master at the last check (null: unknown or not replicating) */
  lagS: number | null;
  reason: string;
  checkedTs: number | null;
};
