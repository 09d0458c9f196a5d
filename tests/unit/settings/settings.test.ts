// The settings module (lib/settings.ts): one zod-checked reading of the environment, which in
// production refuses missing, short or published secrets, and is the only reader of process.env.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { DEMO_SECRETS, isReservedAccountName, parseSettings, SettingsError } from "../../../lib/settings";

const strong = {
  NEXTAUTH_SECRET: "c2VjcmV0LWZvci10ZXN0cy0xMjM0NTY3ODkw",
  DB_PASSWORD: "db-3f9a1c7e5b2d4a6f8e0c",
  MQTT_WORKER_PASSWORD: "wk-8c1e3a5f7b9d2e4c6a0f",
  MQTT_APP_PASSWORD: "ap-1b3d5f7a9c2e4b6d8f0a",
};

function problemsOf(env: Record<string, string>): string[] {
  try {
    parseSettings(env);
    return [];
  } catch (err) {
    if (err instanceof SettingsError) return err.problems;
    throw err;
  }
}

describe("settings", () => {
  it("refuses to start in production with secrets missing, naming each one", () => {
    const problems = problemsOf({ STILLFIELD_MODE: "production" });
    for (const key of Object.keys(strong)) expect(problems.some((p) => p.startsWith(`${key} is not set`))).toBe(true);
    expect(problems).toHaveLength(4);
  });

  it("treats no mode outside Vitest as production (npm start, npm run dev)", () => {
    expect(problemsOf({ NODE_ENV: "production" })).toHaveLength(4);
    expect(problemsOf({ NODE_ENV: "development" })).toHaveLength(4);
  });

  it("refuses the demo's fixed secrets, old defaults and short ones in production", () => {
    const problems = problemsOf({ STILLFIELD_MODE: "production", ...DEMO_SECRETS });
    expect(problems.filter((p) => p.includes("published default"))).toHaveLength(4);
    expect(problemsOf({ STILLFIELD_MODE: "production", ...strong, MQTT_WORKER_PASSWORD: "service-local-secret" })).toEqual([
      expect.stringContaining("MQTT_WORKER_PASSWORD is a published default"),
    ]);
    expect(problemsOf({ STILLFIELD_MODE: "production", ...strong, DB_PASSWORD: "short1" })).toEqual([expect.stringContaining("DB_PASSWORD is shorter")]);
  });

  it("starts in production with random secrets of its own", () => {
    const s = parseSettings({ STILLFIELD_MODE: "production", ...strong });
    expect(s.STILLFIELD_MODE).toBe("production");
    expect(s.DB_PASSWORD).toBe(strong.DB_PASSWORD);
    expect(s.MQTT_APP_PASSWORD).toBe(strong.MQTT_APP_PASSWORD);
  });

  it("falls back to the fixed secrets in the demo and the tests only", () => {
    expect(parseSettings({ STILLFIELD_MODE: "demo" }).NEXTAUTH_SECRET).toBe(DEMO_SECRETS.NEXTAUTH_SECRET);
    const t = parseSettings({ NODE_ENV: "test" });
    expect(t.STILLFIELD_MODE).toBe("test");
    expect(t.DB_PASSWORD).toBe(DEMO_SECRETS.DB_PASSWORD);
  });

  it("does not ask for runtime secrets while `next build` imports the server code", () => {
    expect(problemsOf({ NODE_ENV: "production", NEXT_PHASE: "phase-production-build" })).toEqual([]);
  });

  it("lists malformed values with their names", () => {
    const problems = problemsOf({ NODE_ENV: "test", DB_PORT: "70000", MQTT_TLS_PORT: "x", LOG_LEVEL: "loud" });
    expect(problems.map((p) => p.split(":")[0]).sort()).toEqual(["DB_PORT", "LOG_LEVEL", "MQTT_TLS_PORT"]);
  });

  it("reserves the service accounts' prefix in any letter case", () => {
    expect(isReservedAccountName("svc-worker")).toBe(true);
    expect(isReservedAccountName("SVC-anything")).toBe(true);
    expect(isReservedAccountName("fm-svc-1")).toBe(false);
  });
});

describe("one reader of the environment", () => {
  it("no source file outside lib/settings.ts reads process.env (scripts, tests and config files aside)", () => {
    const root = path.resolve(import.meta.dirname, "../../..");
    const offenders: string[] = [];
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (/\.(ts|tsx|mjs|js)$/.test(e.name) && /process\.env\b/.test(fs.readFileSync(p, "utf8"))) offenders.push(path.relative(root, p));
      }
    };
    for (const dir of ["app", "components", "db", "ingest", "lib", "simulators"]) walk(path.join(root, dir));
    expect(offenders.filter((f) => f !== "lib/settings.ts")).toEqual([]);
  });
});
