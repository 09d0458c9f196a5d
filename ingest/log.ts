// A small line logger for the ingest processes: one line per event, level and component first,
// so the stack runner's prefixed output stays readable. Errors are logged, never swallowed.
import { getSettings } from "../lib/settings";

type Level = "debug" | "info" | "warn" | "error";
const order: Record<Level, number> = { debug: 10, info: 20, warn: 30, error: 40 };
let threshold: number | undefined;

/** The settings' LOG_LEVEL; "info" while the settings themselves are invalid (so that can be logged). */
function levelFromSettings(): number {
  try {
    return order[getSettings().LOG_LEVEL];
  } catch {
    return order.info;
  }
}

export type Logger = {
  debug(msg: string, extra?: Record<string, unknown>): void;
  info(msg: string, extra?: Record<string, unknown>): void;
  warn(msg: string, extra?: Record<string, unknown>): void;
  error(msg: string, extra?: Record<string, unknown>): void;
};

export function describeError(err: unknown): string {
  if (err instanceof Error) return `${err.name}: ${err.message}${"code" in err && err.code ? ` (${String(err.code)})` : ""}`;
  return String(err);
}

export function createLogger(component: string): Logger {
  const write = (level: Level, msg: string, extra?: Record<string, unknown>) => {
    threshold ??= levelFromSettings();
    if (order[level] < threshold) return;
    const tail = extra && Object.keys(extra).length > 0 ? ` ${JSON.stringify(extra)}` : "";
    const line = `${new Date().toISOString()} ${level.toUpperCase().padEnd(5)} ${component}: ${msg}${tail}\n`;
    (level === "error" || level === "warn" ? process.stderr : process.stdout).write(line);
  };
  return {
    debug: (m, e) => write("debug", m, e),
    info: (m, e) => write("info", m, e),
    warn: (m, e) => write("warn", m, e),
    error: (m, e) => write("error", m, e),
  };
}
