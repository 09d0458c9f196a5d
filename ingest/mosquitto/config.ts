// The private Mosquitto's files: where they live and the configuration text (pure apart from
// the path look-up of the plugin). Settings from lib/settings.ts.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { tlsFiles, type Settings } from "../../lib/settings";

export const ADMIN_USERNAME = "stillfield-admin";

/** Debian puts the plugin under the multiarch library folder (`dpkg -L mosquitto`). */
const PLUGIN_CANDIDATES = [
  "/usr/lib/x86_64-linux-gnu/mosquitto_dynamic_security.so",
  "/usr/lib/aarch64-linux-gnu/mosquitto_dynamic_security.so",
  "/usr/lib/mosquitto_dynamic_security.so",
  "/usr/local/lib/mosquitto_dynamic_security.so",
];

export function findDynsecPlugin(): string {
  const found = PLUGIN_CANDIDATES.find((p) => fs.existsSync(p));
  if (!found) throw new Error("mosquitto_dynamic_security.so not found; install Debian's mosquitto (scripts/ensure-system.sh --mosquitto)");
  return found;
}

export function mosquittoFiles(s: Pick<Settings, "DATA_DIR" | "DB_NAME" | "MOSQUITTO_DIR">) {
  const dir = path.resolve(s.MOSQUITTO_DIR ?? path.join(s.DATA_DIR, "mosquitto", s.DB_NAME));
  return { dir, conf: path.join(dir, "mosquitto.conf"), dynsec: path.join(dir, "dynamic-security.json"), pid: path.join(dir, "mosquitto.pid") };
}

export function mosquittoConfig(s: Settings, files: ReturnType<typeof mosquittoFiles>, plugin: string): string {
  const lines = [
    "# Written by ingest/mosquitto/run.ts at every start; edit the settings (lib/settings.ts), not this file.",
    "per_listener_settings false",
    "allow_anonymous false",
    // run as whoever started it (no switch to a 'mosquitto' user that could not write here)
    `user ${os.userInfo().username}`,
    `plugin ${plugin}`,
    `plugin_opt_config_file ${files.dynsec}`,
    `pid_file ${files.pid}`,
    "persistence true",
    `persistence_location ${files.dir}/`,
    // persistent sessions of the workers keep everything that waits for them (the default 1,000 would drop)
    "max_queued_messages 0",
    "max_queued_bytes 0",
    "max_inflight_messages 1000",
    "autosave_interval 30",
    `max_packet_size ${s.MQTT_MAX_PAYLOAD_BYTES + 1024}`,
    "set_tcp_nodelay true",
    "log_dest stdout",
    "log_type error",
    "log_type warning",
    "log_type notice",
    "connection_messages false",
    "log_timestamp false",
    "",
    `listener ${s.MQTT_PORT} 127.0.0.1`,
    `max_connections ${s.MQTT_MAX_CONNECTIONS}`,
  ];
  if (s.MQTT_TLS_PORT > 0) {
    const tls = tlsFiles(s);
    lines.push("", `listener ${s.MQTT_TLS_PORT} ${s.MQTT_TLS_HOST}`, `max_connections ${s.MQTT_MAX_CONNECTIONS}`, `certfile ${tls.cert}`, `keyfile ${tls.key}`, "tls_version tlsv1.2");
  }
  return lines.join("\n") + "\n";
}
