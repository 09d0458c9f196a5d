// The systemd units of a production install (scripts/systemd, README "Production install"):
// one per process, restarted on failure, a dedicated system user, an environment file, ordered
// after the database; and `systemd-analyze verify` (where the command exists) prints nothing
// about them. It exits 0 even when it reports a bad line, so any line it prints fails the test.
// Directive names and meanings: systemd.unit(5), systemd.service(5), systemd.exec(5).
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";

const DIR = path.resolve(import.meta.dirname, "../../../scripts/systemd");
const units = fs.readdirSync(DIR).filter((f) => f.endsWith(".service"));
const text = (f: string) => fs.readFileSync(path.join(DIR, f), "utf8");
const hasSystemdAnalyze = spawnSync("sh", ["-c", "command -v systemd-analyze"]).status === 0;

describe("systemd units", () => {
  it("cover the broker, the workers, the mailer, the notifier and the app", () => {
    expect(units.sort()).toEqual(["stillfield-app.service", "stillfield-broker.service", "stillfield-mailer.service", "stillfield-notifier.service", "stillfield-worker@.service"]);
  });

  it.each(units)("%s restarts on failure as the stillfield user with the environment file, after the database", (unit) => {
    const t = text(unit);
    expect(t).toMatch(/^Restart=on-failure$/m);
    expect(t).toMatch(/^User=stillfield$/m);
    expect(t).toMatch(/^EnvironmentFile=\/etc\/stillfield\/stillfield\.env$/m);
    expect(t).toMatch(/^After=.*\bmariadb\.service\b/m);
    expect(t).toMatch(/^Requires=mariadb\.service$/m);
    expect(t).toMatch(/^Environment=STILLFIELD_MODE=production$/m);
  });

  it.skipIf(!hasSystemdAnalyze)("pass systemd-analyze verify without a single remark", () => {
    // a copy, so the instance name of the worker template resolves beside it
    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "stillfield-units-"));
    try {
      for (const f of fs.readdirSync(DIR)) fs.copyFileSync(path.join(DIR, f), path.join(tmp, f));
      const files = [...fs.readdirSync(tmp).filter((f) => !f.includes("@")), "stillfield-worker@1.service"];
      const r = spawnSync("systemd-analyze", ["verify", ...files], { cwd: tmp, encoding: "utf8", timeout: 60_000 });
      const said = `${r.stdout}${r.stderr}`.split("\n").filter((l) => l.trim());
      expect(said).toEqual([]);
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(tmp, { recursive: true, force: true });
    }
  });

  it.skipIf(!hasSystemdAnalyze)("the check catches a bad line (it would not pass a unit systemd cannot read)", () => {
    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "stillfield-units-"));
    try {
      fs.writeFileSync(path.join(tmp, "stillfield-mailer.service"), text("stillfield-mailer.service").replace("Restart=on-failure", "Restart=sometimes"));
      const r = spawnSync("systemd-analyze", ["verify", "stillfield-mailer.service"], { cwd: tmp, encoding: "utf8", timeout: 60_000 });
      expect(`${r.stdout}${r.stderr}`).toMatch(/restart specifier/i);
    } finally {
      fs.rmSync(tmp, { recursive: true, force: true });
    }
  });
});
