// Stillfield's settings: the one place that reads the process environment (process.env), for
// every process — the app, the broker, the ingest worker, the mailer, the mail sink, the
// simulators and the scripts. Validated with zod on first use; every process calls
// getSettings() at start (the app in instrumentation.ts), so a bad value stops it with a list
// of what is wrong rather than failing later.
//
// Modes (STILLFIELD_MODE): "demo" and "test" (set by scripts/demo.sh and scripts/test.sh; Vitest
// sets NODE_ENV=test) accept the fixed demo secrets below when none is given; any other mode
// ("production", the default) refuses to start while a secret is missing, short or one of those
// fixed values. scripts/stack-env.sh generates random per-install secrets in DATA_DIR (mode 600)
// and passes them in, so `npm run demo`, `npm test`, `npm run dev` and `npm start` never use the
// fixed ones. Reading the environment is this module's only impure act; it does no other I/O.
import { z } from "zod";
import { MAX_PAYLOAD_BYTES } from "./contract/readings-payload";
import { SPB_ID_PATTERN } from "./sparkplug/topics";
import { DEFAULT_CLOCK_SKEW_LIMIT_MS } from "./clock-skew";

/** Broker user names of the two service accounts; no device code may start with the prefix. */
export const SERVICE_ACCOUNT_PREFIX = "svc-";
export const SERVICE_ACCOUNTS = { worker: "svc-worker", app: "svc-app" } as const;
export type ServiceRole = keyof typeof SERVICE_ACCOUNTS;

/** True for a name a device may not take (the service accounts' prefix, any letter case). */
export function isReservedAccountName(name: string): boolean {
  return name.toLowerCase().startsWith(SERVICE_ACCOUNT_PREFIX);
}

const SECRET_KEYS = ["NEXTAUTH_SECRET", "DB_PASSWORD", "MQTT_WORKER_PASSWORD", "MQTT_APP_PASSWORD"] as const;
type SecretKey = (typeof SECRET_KEYS)[number];

/** The fixed secrets demo and test runs may fall back to; refused in any other mode. */
export const DEMO_SECRETS: Readonly<Record<SecretKey, string>> = {
  NEXTAUTH_SECRET: "demo-only-auth-secret-not-for-plants",
  DB_PASSWORD: "stillfield-local",
  MQTT_WORKER_PASSWORD: "demo-only-worker-secret",
  MQTT_APP_PASSWORD: "demo-only-app-secret",
};
/** Values from earlier versions that must not pass as real secrets either. */
const KNOWN_WEAK = new Set<string>([...Object.values(DEMO_SECRETS), "service-local-secret", "secret", "changeme", "password"]);
const MIN_SECRET_LENGTH = 16;

const port = (d: number) => z.coerce.number().int().min(1).max(65535).default(d);
const portOrOff = (d: number) => z.coerce.number().int().min(0).max(65535).default(d);
const int = (d: number, min = 0) => z.coerce.number().int().min(min).default(d);
const optionalText = z.string().optional();

const schema = z.object({
  STILLFIELD_MODE: z.enum(["demo", "test", "production"]).optional(),
  NODE_ENV: optionalText,
  NEXT_PHASE: optionalText,
  LOG_LEVEL: z.enum(["debug", "info", "warn", "error"]).default("info"),
  DATA_DIR: z.string().min(1).default(".data"),
  // secrets (checked by mode below)
  NEXTAUTH_SECRET: optionalText,
  DB_PASSWORD: optionalText,
  MQTT_WORKER_PASSWORD: optionalText,
  MQTT_APP_PASSWORD: optionalText,
  // database
  DB_HOST: z.string().default("127.0.0.1"),
  DB_PORT: port(3407),
  DB_USER: z.string().min(1).default("stillfield"),
  DB_NAME: z.string().regex(/^[A-Za-z0-9_]+$/, "DB_NAME may hold letters, digits and _ only").default("stillfield"),
  DB_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(10),
  RAW_RETENTION_DAYS: z.coerce.number().int().min(1).max(3650).default(14),
  /** a read-only GTID replica (scripts/mariadb-replica.sh) for chart, report and export reads; port 0 = none */
  DB_REPLICA_HOST: z.string().default("127.0.0.1"),
  DB_REPLICA_PORT: portOrOff(0),
  /** reads go to the primary while the replica is further behind than this (or not replicating) */
  DB_REPLICA_MAX_LAG_S: int(10, 0),
  /** how long one check of the replica's lag is trusted */
  DB_REPLICA_CHECK_MS: int(3000, 100),
  // broker: plain MQTT on loopback only (local services), MQTT over TLS for devices
  /** embedded (aedes, the default), mosquitto (Debian's, run privately by ingest/mosquitto/run.ts), external (MQTT_HOST/MQTT_PORT of the plant's own MQTT 5 broker) */
  BROKER: z.enum(["embedded", "mosquitto", "external"]).default("embedded"),
  /** the dynamic-security admin of the private Mosquitto (scripts/stack-env.sh makes it) */
  MQTT_ADMIN_PASSWORD: optionalText,
  /** long random text whose SHA-256 is the AES-256 key that seals device secrets for a broker keeping its own credentials (lib/device-secrets.ts) */
  BROKER_SEAL_KEY: optionalText,
  /** folder of the private Mosquitto's configuration, credentials and persistence; default DATA_DIR/mosquitto/<DB_NAME> */
  MOSQUITTO_DIR: optionalText,
  MOSQUITTO_BIN: z.string().default("/usr/sbin/mosquitto"),
  /** ingest workers started by scripts/run-stack.ts; more than one needs an MQTT 5 broker (shared subscriptions) */
  WORKERS: z.coerce.number().int().min(1).max(16).default(1),
  /** shared-subscription group of the workers ($share/<group>/…) */
  INGEST_SHARE_GROUP: z.string().regex(/^[A-Za-z0-9_-]{1,40}$/).default("stillfield-ingest"),
  MQTT_HOST: z.string().default("127.0.0.1"),
  MQTT_PORT: port(1884),
  /** 0 = no TLS listener */
  MQTT_TLS_PORT: portOrOff(0),
  /** address of the TLS listener; a plant sets its plant-network address (or 0.0.0.0) */
  MQTT_TLS_HOST: z.string().default("127.0.0.1"),
  /** server certificate and key of the TLS listener; default DATA_DIR/tls/server.{crt,key} */
  MQTT_TLS_CERT_FILE: optionalText,
  MQTT_TLS_KEY_FILE: optionalText,
  /** CA that clients of ours (simulators, mailer) trust; default DATA_DIR/tls/ca.crt */
  TLS_CA_FILE: optionalText,
  MQTT_MAX_CONNECTIONS: int(2000, 1),
  /** unknown device codes remembered (to look each up at most once per 5 s); oldest forgotten first */
  BROKER_UNKNOWN_CODES_KEPT: int(10_000, 1),
  MQTT_MAX_PAYLOAD_BYTES: int(MAX_PAYLOAD_BYTES, 256),
  BROKER_HEALTH_PORT: port(9465),
  /** how often the broker checks the devices table for a change (a disabled device is out within this) */
  BROKER_DEVICE_CHECK_MS: int(1000, 100),
  /** full reload of device credentials even without a visible change */
  BROKER_DEVICE_REFRESH_MS: int(60_000, 100),
  BROKER_ID: optionalText,
  // worker
  WORKER_HEALTH_PORT: port(9464),
  INGEST_CLIENT_ID: z.string().min(1).max(64).default("stillfield-ingest-1"),
  INGEST_FLUSH_MS: int(50, 5),
  INGEST_FLUSH_ROWS: int(5000, 1),
  /** parallel writers; a device always goes to the same one, so its readings stay in order */
  INGEST_LANES: int(2, 1),
  /** readings held in memory (unacknowledged) before they are spilled to a file */
  INGEST_MEMORY_MAX_READINGS: int(100_000, 10),
  /** unacknowledged messages before a spill (keeps MQTT message ids far from wrapping) */
  INGEST_MAX_UNACKED: int(20_000, 10),
  INGEST_STATUS_INTERVAL_MS: int(5000, 100),
  INGEST_DEVICE_REFRESH_MS: int(20_000, 100),
  INGEST_LIVE_INTERVAL_MS: int(1000, 50),
  INGEST_MAINTENANCE_INTERVAL_MS: int(3_600_000, 1000),
  INGEST_RETRY_MAX_MS: int(5000, 50),
  ALERTS_RUNNER: z.enum(["on", "off"]).default("on"),
  /** local: the worker's own committed readings feed its engine (one worker); lease: one owner among the workers holds a lease in MariaDB and reads every worker's readings from the journal (ingest/alerts-owner.ts) */
  ALERTS_OWNER: z.enum(["local", "lease"]).default("local"),
  ALERTS_LEASE_TTL_MS: int(10_000, 1000),
  ALERTS_LEASE_RENEW_MS: int(3000, 100),
  ALERTS_JOURNAL_POLL_MS: int(250, 10),
  /** how much journal a new owner replays to rebuild the rules' windows */
  ALERTS_WARMUP_MS: int(1_800_000, 0),
  /** journal rows older than this are deleted by the owner */
  ALERTS_JOURNAL_KEEP_MS: int(7_200_000, 60_000),
  /** the Sparkplug B host application in the worker (ingest/sparkplug/start.ts) */
  SPARKPLUG_HOST: z.enum(["on", "off"]).default("on"),
  /** its host id in spBv1.0/STATE/<host id> */
  SPARKPLUG_HOST_ID: z.string().regex(SPB_ID_PATTERN, "no / + # or spaces, at most 64").default("stillfield"),
  ALERTS_RULES_POLL_MS: int(3000, 1),
  ALERTS_ESCALATE_EVERY_MS: int(5000, 1),
  ALERTS_SNAPSHOT_EVERY_MS: int(30_000, 1),
  /** a device or edge-node clock off by more than this is flagged (Devices and Gateways pages) */
  CLOCK_SKEW_LIMIT_MS: int(DEFAULT_CLOCK_SKEW_LIMIT_MS, 1000),
  /** late readings are re-checked once no more have come for this long (ingest/late-recheck.ts) */
  LATE_RECHECK_SETTLE_MS: int(5000, 0),
  /** an excursion found late that ended longer ago than this is kept in the history but pages nobody */
  LATE_FINDING_QUIET_AFTER_MS: int(900_000, 0),
  // mail
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: port(2525),
  /** refuse to send unless the server takes STARTTLS (a plant's relay should) */
  SMTP_REQUIRE_TLS: z.enum(["0", "1"]).default("0").transform((v) => v === "1"),
  MAIL_FROM: z.string().default("Stillfield <alerts@stillfield.invalid>"),
  SMTP_SINK_DELAY_MS: int(0, 0),
  MAILER_POLL_MS: int(1000),
  MAILER_LEASE_MS: int(60_000),
  MAILER_BACKOFF_BASE_MS: int(5_000),
  MAILER_BACKOFF_MAX_MS: int(300_000),
  MAILER_MAX_PERMANENT: int(3),
  MAILER_SCHEDULE_EVERY_MS: int(60_000),
  MAILER_BATCH: int(20),
  // texts and push (ingest/notifier.ts); the SMS provider's SDK is pointed at SMS_API_BASE when
  // set (the local fake in the demo and tests), else at the provider itself
  SMS_API_BASE: optionalText,
  SMS_ACCOUNT_SID: z.string().regex(/^AC[0-9a-f]{32}$/, "an account SID is AC followed by 32 hex digits").default("AC00000000000000000000000000000000"),
  SMS_AUTH_TOKEN: z.string().min(8).default("demo-only-sms-token"),
  /** the sending number, E.164 (a reserved example number in the demo) */
  SMS_FROM: z.string().regex(/^\+[1-9]\d{6,14}$/, "E.164, e.g. +447700900123").default("+447700900100"),
  SMS_FAKE_PORT: port(9466),
  /** what the fake SMS service does: "ok", "fail" (every message), "fail:<n>" (the first n), "delay:<ms>" */
  SMS_FAKE_MODE: z.string().regex(/^(ok|fail|fail:\d+|delay:\d+)$/).default("ok"),
  PUSH_FAKE_PORT: port(9467),
  /** contact the push services may reach the sender at (VAPID "sub") */
  VAPID_SUBJECT: z.string().default("mailto:alerts@stillfield.invalid"),
  WEATHER_FAKE_PORT: port(9468),
  /** the forecast service's URL (the local fake in the demo and tests) */
  WEATHER_API_URL: optionalText,
  NOTIFIER_POLL_MS: int(1000, 10),
  NOTIFIER_BACKOFF_BASE_MS: int(5_000, 1),
  NOTIFIER_BACKOFF_MAX_MS: int(300_000, 1),
  /** failed attempts after which a text gives up and falls back to e-mail */
  NOTIFIER_MAX_ATTEMPTS: int(4, 1),
  // app
  APP_URL: z.string().url().default("http://127.0.0.1:3000"),
  /** how many proxies in front of the app add X-Forwarded-For (0: trust none) */
  TRUSTED_PROXIES: optionalText,
  /** header name, random per process, in which the app's server passes the socket's address */
  STILLFIELD_PEER_HEADER: optionalText,
  PLANT_TIME_ZONE: z.string().default("Europe/London"),
  /** Next.js instances side by side on APP_PORT (scripts/app-server.mjs, node:cluster) */
  APP_INSTANCES: z.coerce.number().int().min(1).max(16).default(1),
  /** how long one app process reuses a Floor snapshot (per hall) for every screen asking */
  FLOOR_CACHE_MS: int(1000, 0),
  /** bearer token for GET /api/health from a plant's monitoring (unset: admin sessions only) */
  HEALTH_TOKEN: z.string().min(24, "HEALTH_TOKEN needs at least 24 characters").optional(),
  // simulators (their command-line flags win)
  SIM_SEED: optionalText,
  SIM_ANCHOR_MS: optionalText,
  SIM_BACKFILL_DAYS: optionalText,
  SIM_BACKFILL_THIN: optionalText,
  SIM_FULL_RATE_HOURS: optionalText,
  SIM_MALFORMED_EVERY_S: optionalText,
  /** "on": the demo gateway's line (lib/demo-gateway.ts) comes through a simulated Sparkplug edge node (simulators/sparkplug-line.ts) */
  SIM_SPARKPLUG_LINE: z.enum(["on", "off"]).default("off"),
  /** its network outages: the first this long after it starts, each lasting so long, then one every so often */
  SIM_SPARKPLUG_OUTAGE_AFTER_S: int(120, 0),
  SIM_SPARKPLUG_OUTAGE_S: int(1200, 1),
  SIM_SPARKPLUG_OUTAGE_EVERY_S: int(14_400, 60),
});

type Parsed = z.infer<typeof schema>;
export type Settings = Omit<Parsed, SecretKey | "STILLFIELD_MODE"> &
  Record<SecretKey, string> & { STILLFIELD_MODE: "demo" | "test" | "production" };

export class SettingsError extends Error {
  constructor(readonly problems: string[]) {
    super(`Stillfield will not start; fix these settings:\n${problems.map((p) => `  - ${p}`).join("\n")}`);
    this.name = "SettingsError";
  }
}

/** Validates an environment (pure: tests pass their own). Throws SettingsError listing every problem. */
export function parseSettings(env: Record<string, string | undefined>): Settings {
  const parsed = schema.safeParse(env);
  if (!parsed.success) throw new SettingsError(parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`));
  const s = parsed.data;
  const mode = s.STILLFIELD_MODE ?? (s.NODE_ENV === "test" ? "test" : "production");
  // `next build` imports server modules without running them; secrets are checked when it runs
  const building = s.NEXT_PHASE === "phase-production-build";
  const problems: string[] = [];
  const secrets = {} as Record<SecretKey, string>;
  for (const key of SECRET_KEYS) {
    const value = s[key] ?? "";
    if (mode === "production" && !building) {
      if (!value) problems.push(`${key} is not set (outside the demo and the tests every secret must be given; scripts/stack-env.sh makes random ones in DATA_DIR)`);
      else if (KNOWN_WEAK.has(value)) problems.push(`${key} is a published default; give a random secret (e.g. openssl rand -base64 32)`);
      else if (value.length < MIN_SECRET_LENGTH) problems.push(`${key} is shorter than ${MIN_SECRET_LENGTH} characters`);
    }
    secrets[key] = value || DEMO_SECRETS[key];
  }
  if (s.BROKER === "mosquitto" && mode === "production" && !building && (s.MQTT_ADMIN_PASSWORD ?? "").length < MIN_SECRET_LENGTH) {
    problems.push("MQTT_ADMIN_PASSWORD must be set (at least 16 characters) for BROKER=mosquitto; scripts/stack-env.sh makes one in DATA_DIR");
  }
  if (problems.length) throw new SettingsError(problems);
  return { ...s, ...secrets, STILLFIELD_MODE: mode };
}

let cached: Settings | undefined;

/** This process's settings, parsed once. */
export function getSettings(): Settings {
  cached ??= parseSettings(process.env);
  return cached;
}

/** File locations under DATA_DIR that several processes agree on (paths only; no I/O here). */
export function tlsFiles(s: Pick<Settings, "DATA_DIR"> & Partial<Pick<Settings, "MQTT_TLS_CERT_FILE" | "MQTT_TLS_KEY_FILE" | "TLS_CA_FILE">>) {
  const dir = `${s.DATA_DIR.replace(/\/+$/, "")}/tls`;
  return {
    cert: s.MQTT_TLS_CERT_FILE ?? `${dir}/server.crt`,
    key: s.MQTT_TLS_KEY_FILE ?? `${dir}/server.key`,
    ca: s.TLS_CA_FILE ?? `${dir}/ca.crt`,
  };
}
