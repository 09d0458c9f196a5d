// Mail over TLS (README "Security"): the local mail sink offers STARTTLS with this install's
// certificate (scripts/tls.sh), the mailer takes it and checks the certificate against the
// install's CA; with SMTP_REQUIRE_TLS=1 it sends nothing to a server that does not offer TLS.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { like } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { freePort, ROOT, spawnTs, waitFor, type Proc } from "./ingest-support/processes";
import { outbox } from "@/db/schema";
import { enqueueMail } from "@/db/queries/outbox";
import { readSinkIndex } from "@/ingest/smtp-sink";

let tdb: TestDatabase;
const procs: Proc[] = [];
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "sf-mail-tls-"));

async function sinkAndMailer(name: string, withCert: boolean, requireTls: boolean) {
  const dataDir = path.join(tmp, name);
  fs.mkdirSync(dataDir, { recursive: true });
  if (withCert) execFileSync("bash", ["scripts/tls.sh"], { cwd: ROOT, env: { ...process.env, DATA_DIR: dataDir }, stdio: "ignore" });
  const port = await freePort();
  const sink = spawnTs("smtp-sink", "ingest/smtp-sink.ts", [], { SMTP_PORT: String(port), DATA_DIR: dataDir });
  procs.push(sink);
  await waitFor("the sink", async () => sink.output().includes("listening"), 20_000);
  const mailer = spawnTs("mailer", "ingest/mailer.ts", [], {
    ...tdb.env,
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(port),
    DATA_DIR: dataDir,
    SMTP_REQUIRE_TLS: requireTls ? "1" : "0",
    MAILER_POLL_MS: "100",
    MAILER_BACKOFF_BASE_MS: "200",
    MAILER_BACKOFF_MAX_MS: "500",
    MAILER_SCHEDULE_EVERY_MS: "86400000",
  });
  procs.push(mailer);
  return { dataDir, sink, mailer };
}

beforeAll(async () => {
  tdb = await createTestDatabase("services_mail_tls");
});

afterAll(async () => {
  for (const p of procs) await p.stop("SIGTERM", 5000);
  await tdb?.close();
  fs.rmSync(tmp, { recursive: true, force: true });
});

describe("mail over TLS", () => {
  it("goes over STARTTLS to a server that offers it, the certificate checked against the install's CA", async () => {
    const { dataDir, mailer } = await sinkAndMailer("tls", true, true);
    await enqueueMail(tdb.db, { dedupeKey: "tls:1", toAddress: "oncall@harrowfen.example", subject: "Over TLS", bodyText: "x" }, Date.now());
    const entry = await waitFor("the stored mail", async () => readSinkIndex(dataDir).find((e) => e.subject === "Over TLS"), 20_000).catch((err) => {
      throw new Error(`${String(err)}\n${mailer.output()}`);
    });
    expect(entry.tls).toBe(true);
    for (const p of procs.splice(0)) await p.stop("SIGTERM", 5000);
  });

  it("with SMTP_REQUIRE_TLS=1, sends nothing to a server without TLS and keeps the mail for later", async () => {
    const { dataDir } = await sinkAndMailer("plain", false, true);
    await enqueueMail(tdb.db, { dedupeKey: "plain:1", toAddress: "oncall@harrowfen.example", subject: "Must not go in clear", bodyText: "x" }, Date.now());
    const row = await waitFor(
      "a failed attempt",
      async () => (await tdb.db.select({ state: outbox.state, lastError: outbox.lastError }).from(outbox).where(like(outbox.dedupeKey, "plain:%"))).find((r) => r.lastError),
      20_000,
    );
    expect(row.state).not.toBe("sent");
    expect(row.lastError ?? "").toMatch(/STARTTLS|TLS/i);
    expect(readSinkIndex(dataDir)).toEqual([]);
  });
});
