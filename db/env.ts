// Connection and service settings shared by the app, the worker, scripts and tests.
// Every value comes from the environment, validated with zod, with working local defaults.
import { z } from "zod";

const envSchema = z.object({
  DB_HOST: z.string().default("127.0.0.1"),
  DB_PORT: z.coerce.number().int().min(1).max(65535).default(3407),
  DB_USER: z.string().min(1).default("stillfield"),
  DB_PASSWORD: z.string().min(1).default("stillfield-local"),
  DB_NAME: z
    .string()
    .regex(/^[A-Za-z0-9_]+$/, "DB_NAME may hold letters, digits and _ only")
    .default("stillfield"),
  DB_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(10),
  MQTT_HOST: z.string().default("127.0.0.1"),
  MQTT_PORT: z.coerce.number().int().min(1).max(65535).default(1884),
  // the app's own broker account, allowed to read internal topics
  MQTT_SERVICE_USER: z.string().default("stillfield-service"),
  MQTT_SERVICE_PASSWORD: z.string().min(8).default("service-local-secret"),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  MAIL_FROM: z.string().default("Stillfield <alerts@stillfield.invalid>"),
  APP_URL: z.string().url().default("http://127.0.0.1:3000"),
  WORKER_HEALTH_PORT: z.coerce.number().int().min(1).max(65535).default(9464),
  PLANT_TIME_ZONE: z.string().default("Europe/London"),
  DATA_DIR: z.string().default(".data"),
  RAW_RETENTION_DAYS: z.coerce.number().int().min(1).max(3650).default(14),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

/** Parsed environment; throws with a readable list of what is wrong. */
export function getEnv(): Env {
  if (cached) return cached;
  const parsed = envSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment settings:\n${lines.join("\n")}`);
  }
  cached = parsed.data;
  return cached;
}
