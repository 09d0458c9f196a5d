// View types of the Health page and GET /api/health (db/queries/health.ts builds them).
import type { ReplicaView } from "./replica";

export type BrokerHealth = {
  id: string;
  updatedTs: number;
  /** no status for longer than HEALTH_STALE_MS */
  stale: boolean;
  /** when the process that wrote the status started: a restart shows as a recent start */
  startedTs: number | null;
  clients: number | null;
  messagesPerS: number | null;
  messagesIn: number | null;
};

/**
 * A worker's part in alerting: it runs the rules on its own readings (ALERTS_OWNER=local, one
 * worker), takes part in the owner's lease (lease), or none (ALERTS_RUNNER=off).
 */
export type WorkerAlertsRole = "local" | "lease" | "off";

export type WorkerHealth = {
  id: string;
  updatedTs: number;
  stale: boolean;
  startedTs: number | null;
  mqttConnected: boolean | null;
  dbHealthy: boolean | null;
  readingsPerS: number | null;
  messagesPerS: number | null;
  /** readings received and not yet committed, and messages not yet acknowledged */
  inFlightReadings: number | null;
  unackedMessages: number | null;
  /** readings waiting in spill files now, and spilled since the worker started */
  spillPendingReadings: number | null;
  spilledReadings: number | null;
  commitP95Ms: number | null;
  rssMb: number | null;
  alerts: WorkerAlertsRole | null;
};

export type LeaseHealth = { name: string; holder: string | null; sinceTs: number | null; expiresTs: number; token: number; held: boolean };

export type QueueHealth = { pending: number; sending: number; failed: number; oldestPendingTs: number | null };

export type HealthReport = {
  nowTs: number;
  brokers: BrokerHealth[];
  workers: WorkerHealth[];
  /** the alert owner's lease; null when no process has reported one */
  alertOwner: LeaseHealth | null;
  /** without a lease: the reporting worker that runs the rules on its own readings, if any */
  alertsInWorker: { id: string; startedTs: number | null } | null;
  leases: LeaseHealth[];
  mail: QueueHealth;
  texts: QueueHealth | null;
  replica: ReplicaView;
};
