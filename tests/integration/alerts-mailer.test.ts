// The mailer (its own process) with the local SMTP sink (its own process) and a real MariaDB:
// killing the mailer with SIGKILL in the middle of a run and starting it again neither loses
// nor duplicates a mail; with the SMTP sink down, mail waits (retried with backoff) and goes out
// once it is back; the daily digest is queued once per person and day, from the digest hour.
import path from "node:path";
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, like } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { freePort, ROOT, spawnTs, waitFor, type Proc } from "./ingest-support/processes";
import { outbox, people } from "@/db/schema";
import { insertRaisedAlert } from "@/db/queries/alert-transitions";
import { enqueueMail } from "@/db/queries/outbox";
import { loadPlantTopology } from "@/db/queries/topology";
import { queueDailyDigests } from "@/ingest/mailer";
import { readSinkIndex } from "@/ingest/smtp-sink";

const NAME = "alerts_mail";
const mailDataDir = path.join(ROOT, ".data", "test-ingest", `${NAME}-sink`);
let tdb: TestDatabase;
let smtpPort = 0;
const procs: Proc[] = [];

function startSink(delayMs = 0): Proc {
  const p = spawnTs("smtp-sink", "ingest/smtp-sink.ts", [], { SMTP_PORT: String(smtpPort), DATA_DIR: mailDataDir, SMTP_SINK_DELAY_MS: String(delayMs) });
  procs.push(p);
  return p;
}

function startMailer(): Proc {
  const p = spawnTs("mailer", "ingest/mailer.ts", [], {
    ...tdb.env,
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(smtpPort),
    DATA_DIR: mailDataDir,
    MAILER_POLL_MS: "100",
    MAILER_LEASE_MS: "2500",
    MAILER_BATCH: "3",
    MAILER_BACKOFF_BASE_MS: "200",
    MAILER_BACKOFF_MAX_MS: "1000",
    // the digest schedule is tested on its own below, with a fixed clock
    MAILER_SCHEDULE_EVERY_MS: "86400000",
  });
  procs.push(p);
  return p;
}

async function queue(prefix: string, n: number): Promise<string[]> {
  const keys: string[] = [];
  const now = Date.now();
  for (let i = 0; i < n; i++) {
    const key = `${prefix}:${i}`;
    await enqueueMail(tdb.db, { dedupeKey: key, toAddress: `person${i}@harrowfen.example`, subject: `Test mail ${prefix} ${i}`, bodyText: `Body ${i}` }, now);
    keys.push(key);
  }
  return keys;
}

async function states(prefix: string) {
  return tdb.db.select({ key: outbox.dedupeKey, state: outbox.state, attempts: outbox.attempts, lastError: outbox.lastError, messageId: outbox.messageId }).from(outbox).where(like(outbox.dedupeKey, `${prefix}:%`));
}

async function waitListening(p: Proc) {
  await waitFor("the SMTP sink to listen", async () => (p.output().match(/listening/g)?.length ?? 0) > 0, 60_000);
}

beforeAll(async () => {
  tdb = await createTestDatabase(NAME, { seed: true });
  fs.rmSync(mailDataDir, { recursive: true, force: true });
  smtpPort = await freePort();
}, 120_000);

afterAll(async () => {
  for (const p of procs) await p.stop("SIGTERM").catch(() => undefined);
  await tdb?.close();
});

describe("the mailer", () => {
  it(
    "killed (SIGKILL) in the middle of a run and restarted, neither loses nor duplicates a mail",
    async () => {
      const sink = startSink(150);
      await waitListening(sink);
      const keys = await queue("restart", 30);
      const first = startMailer();
      await waitFor("some mails sent", async () => ((await states("restart")).filter((r) => r.state === "sent").length >= 8 ? true : null), 90_000, 50);
      await first.stop("SIGKILL");
      const atKill = await states("restart");
      const sentAtKill = atKill.filter((r) => r.state === "sent").length;
      expect(sentAtKill).toBeGreaterThanOrEqual(8);
      expect(sentAtKill).toBeLessThan(30); // killed mid-way

      startMailer();
      await waitFor("every mail sent", async () => ((await states("restart")).every((r) => r.state === "sent") ? true : null), 120_000, 200);
      const after = await states("restart");
      expect(after).toHaveLength(30);
      const index = readSinkIndex(mailDataDir).filter((e) => e.key?.startsWith("restart:"));
      for (const k of keys) {
        const stored = index.filter((e) => e.key === k && !e.duplicate);
        expect(stored, k).toHaveLength(1);
        expect(stored[0].messageId).toBe(after.find((r) => r.key === k)!.messageId);
        expect(fs.existsSync(path.join(mailDataDir, "mail", stored[0].file!))).toBe(true);
      }
      // a mail the sink had already taken when the mailer died is sent again after its lease with
      // the same Message-ID; the sink keeps the first copy only (at most the one batch in hand)
      const resent = index.filter((e) => e.duplicate);
      expect(resent.length).toBeLessThanOrEqual(3);
      for (const r of resent) expect(keys).toContain(r.key);
      await sink.stop("SIGTERM");
    },
    240_000,
  );

  it(
    "with the SMTP server down, mail waits and is retried with backoff, then goes out once when it is back",
    async () => {
      const mailer = procs.filter((p) => p.name === "mailer").at(-1)!;
      expect(mailer.child.exitCode).toBeNull();
      const keys = await queue("down", 5);
      await waitFor(
        "failed attempts",
        async () => {
          const rows = await states("down");
          return rows.every((r) => r.state === "pending" && r.attempts >= 2 && r.lastError) ? rows : null;
        },
        60_000,
        200,
      );
      const rows = await states("down");
      expect(rows.every((r) => r.state !== "sent")).toBe(true);
      expect(rows[0].lastError).toMatch(/ECONNREFUSED|connect|Connection/i);

      const sink = startSink(0);
      await waitListening(sink);
      await waitFor("the waiting mail sent", async () => ((await states("down")).every((r) => r.state === "sent") ? true : null), 60_000, 200);
      const index = readSinkIndex(mailDataDir);
      for (const k of keys) expect(index.filter((e) => e.key === k && !e.duplicate), k).toHaveLength(1);
    },
    180_000,
  );
});

describe("the daily digest", () => {
  it("is queued once per person who asked for it, from the digest hour, with the previous plant day's alerts", async () => {
    const topo = await loadPlantTopology(tdb.db);
    const raisedTs = Date.UTC(2026, 0, 12, 10, 15); // 10:15 plant time (London, UTC+0 in January)
    await tdb.db.transaction((tx) =>
      insertRaisedAlert(
        tx,
        { ruleId: 4, ruleVersion: 1, subjectKey: "area:1", kind: "rh_low", severity: "medium", type: "raise", ts: raisedTs, raisedTs, value: 28.4, peakValue: 28.4, unit: "%", message: "Relative humidity 28.4 % in Press Hall, under the 30 % limit", chattering: false },
        topo.subjects.get("area:1"),
        raisedTs,
      ),
    );
    const wants = await tdb.db.select({ id: people.id, email: people.email }).from(people).where(eq(people.wantsDailyDigest, true));
    expect(wants.length).toBeGreaterThan(0);

    // 05:30 on the 13th: before the 06:00 digest hour, nothing
    expect(await queueDailyDigests(tdb.db, Date.UTC(2026, 0, 13, 5, 30), "http://127.0.0.1:3000")).toBe(0);
    // 07:00: one per person; a second call (or a second mailer) adds nothing
    expect(await queueDailyDigests(tdb.db, Date.UTC(2026, 0, 13, 7, 0), "http://127.0.0.1:3000")).toBe(wants.length);
    expect(await queueDailyDigests(tdb.db, Date.UTC(2026, 0, 13, 7, 1), "http://127.0.0.1:3000")).toBe(0);
    const rows = await tdb.db.select().from(outbox).where(like(outbox.dedupeKey, "digest:2026-01-12:%"));
    expect(rows.map((r) => r.dedupeKey).sort()).toEqual(wants.map((w) => `digest:2026-01-12:${w.id}`).sort());
    expect(rows[0].subject).toBe("Stillfield daily digest, Mon 12 Jan 2026: 1 alert");
    expect(rows[0].bodyText).toContain("10:15  ◆ Over  Medium  Humidity low — Press Hall; peak 28.4 % RH; still active");
  });
});
