// The handover e-mail's small charts, end to end: queued by the shift lead's action code against
// a real (seeded) MariaDB, sent by the mailer (its own process) to the local SMTP sink (its own
// process), then read back with mailparser. Each line with a field meter gets its own inline PNG
// (image/png, its own content id, small), the HTML shows each with alt text, and the plain-text
// part is the same words as before.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, isNotNull } from "drizzle-orm";
import { simpleParser } from "mailparser";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { freePort, ROOT, spawnTs, waitFor, type Proc } from "./ingest-support/processes";
import { devices, lines, outbox, people, points } from "@/db/schema";
import { emailHandover, handoverDedupeKey } from "@/app/_server/actions/reports";
import { writeReadings } from "@/db/queries/readings-write";
import { mailDir, readSinkIndex } from "@/ingest/smtp-sink";
import { lineChartCid } from "@/lib/charts/line-mail-chart";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";
import { lastCompletedShift } from "@/lib/plant-time";

const NAME = "reports_mail_charts";
const mailDataDir = path.join(ROOT, ".data", "test-ingest", `${NAME}-sink`);
let tdb: TestDatabase;
const procs: Proc[] = [];

async function person(role: string) {
  const [p] = await tdb.db.select({ id: people.id, name: people.name, email: people.email, role: people.role }).from(people).where(and(eq(people.role, role as "engineer"), eq(people.active, true))).limit(1);
  return p;
}

beforeAll(async () => {
  tdb = await createTestDatabase(NAME, { seed: true });
  fs.rmSync(mailDataDir, { recursive: true, force: true });
  const smtpPort = await freePort();
  const sink = spawnTs("smtp-sink", "ingest/smtp-sink.ts", [], { SMTP_PORT: String(smtpPort), DATA_DIR: mailDataDir });
  procs.push(sink);
  await waitFor("the SMTP sink", async () => /listening/.test(sink.output()), 60_000);
  procs.push(spawnTs("mailer", "ingest/mailer.ts", [], { ...tdb.env, SMTP_HOST: "127.0.0.1", SMTP_PORT: String(smtpPort), MAILER_POLL_MS: "300", DATA_DIR: mailDataDir, MAILER_SCHEDULE_EVERY_MS: "86400000" }));
}, 120_000);

afterAll(async () => {
  for (const p of procs) await p.stop().catch(() => undefined);
  await tdb?.close();
});

describe("the handover e-mail's charts", () => {
  it("carries one small inline PNG per line with a meter, each referenced by its cid in the HTML with alt text; the text part stays", async () => {
    const lead = await person("shift_lead");
    const engineer = await person("engineer");
    const shift = lastCompletedShift(Date.now(), { timeZone: "Europe/London", shifts: DEFAULT_PLANT_SETTINGS.shifts });
    // the lines that have a field meter on one of their points, from the seeded plant
    const meterLines = await tdb.db
      .selectDistinct({ lineId: lines.id, name: lines.name, deviceId: devices.id })
      .from(devices)
      .innerJoin(points, eq(points.id, devices.pointId))
      .innerJoin(lines, eq(lines.id, points.lineId))
      .where(and(eq(devices.kind, "field_meter"), isNotNull(devices.pointId)));
    expect(meterLines.length).toBeGreaterThan(1);
    // readings on the first line's meter through the shift (a slow swing of ±12 kV, every minute)
    const withData = meterLines[0];
    const rows = [];
    for (let ts = shift.startTs; ts < shift.endTs; ts += 60_000) rows.push({ deviceId: withData.deviceId, channel: "charge_kv" as const, ts, value: 12 * Math.sin((ts - shift.startTs) / 3_600_000) });
    await writeReadings(tdb.pool, rows);

    await emailHandover(tdb.db, { date: shift.date, shift: shift.name, toPersonId: engineer.id }, { personId: lead.id, role: lead.role, name: lead.name, email: lead.email }, Date.now());
    const key = handoverDedupeKey(shift.startTs, engineer.id);
    const [row] = await tdb.db.select({ bodyText: outbox.bodyText }).from(outbox).where(eq(outbox.dedupeKey, key));
    expect(row.bodyText).toContain(`Sent by ${lead.name}.`);
    expect(row.bodyText).not.toContain("cid:");

    const entry = await waitFor("the handover e-mail", async () => readSinkIndex(mailDataDir).find((e) => e.key === key && e.file), 60_000);
    const mail = await simpleParser(fs.readFileSync(path.join(mailDir(mailDataDir), entry.file!)), { keepCidLinks: true });
    const images = mail.attachments.filter((a) => a.contentType === "image/png");
    const lineIds = [...new Set(meterLines.map((l) => l.lineId))];
    expect(images).toHaveLength(lineIds.length);
    expect(new Set(images.map((i) => i.cid))).toEqual(new Set(lineIds.map(lineChartCid)));
    // the line with readings draws them: its image is not the same picture as a line without any
    const drawn = images.find((i) => i.cid === lineChartCid(withData.lineId))!;
    const empty = images.find((i) => i.cid !== drawn.cid)!;
    expect(drawn.size).toBeGreaterThan(empty.size);
    const html = String(mail.html);
    for (const img of images) {
      expect(img.size).toBeLessThan(25 * 1024);
      expect(img.content.subarray(1, 4).toString("latin1")).toBe("PNG");
      expect(html).toContain(`src="cid:${img.cid}"`);
    }
    for (const l of lineIds.map((lineId) => ({ lineId }))) expect(html).toMatch(new RegExp(`src="cid:${lineChartCid(l.lineId)}" alt="Charge of the points on [^"]+ over the shift \\(kV, `));
    // the plain-text part is the queued text, unchanged
    expect(String(mail.text).trim()).toBe(row.bodyText.trim());
  }, 120_000);
});
