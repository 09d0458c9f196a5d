// A local SMTP sink for development and tests, its own process: accepts mail on
// 127.0.0.1:SMTP_PORT without sign-in and writes each message as an .eml file into
// ${DATA_DIR}/mail/, with one line per message in the log and in ${DATA_DIR}/mail/index.jsonl
// ({file, messageId, key, to, from, subject, receivedTs}). Nothing is relayed anywhere.
//
// A message whose Message-ID it already holds (a resend by a mailer that crashed between the
// server's "250 OK" and marking the mail sent) is acknowledged but not stored twice, and is
// noted in the index with duplicate: true — the way a real mailbox drops a re-delivered
// message. SMTP_SINK_DELAY_MS (tests) makes it slow to accept each message. With this install's
// server certificate in DATA_DIR/tls (scripts/tls.sh) it offers STARTTLS, as a plant's mail relay
// should, and notes in the index whether each message came over TLS.
import fs from "node:fs";
import path from "node:path";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";
import { z } from "zod";
import { getEnv } from "../db/env";
import { tlsFiles } from "../lib/settings";
import { createLogger, describeError } from "./log";

const log = createLogger("smtp-sink");

export const sinkIndexEntrySchema = z.object({
  file: z.string().nullable(),
  messageId: z.string().nullable(),
  /** the outbox dedupe key (X-Stillfield-Key header) */
  key: z.string().nullable(),
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  receivedTs: z.number(),
  duplicate: z.boolean(),
  /** the message came after STARTTLS */
  tls: z.boolean().optional(),
});
export type SinkIndexEntry = z.infer<typeof sinkIndexEntrySchema>;

export function mailDir(dataDir: string): string {
  return path.resolve(dataDir, "mail");
}

/** Reads the sink's index (tests, the demo notes). */
export function readSinkIndex(dataDir: string): SinkIndexEntry[] {
  const file = path.join(mailDir(dataDir), "index.jsonl");
  if (!fs.existsSync(file)) return [];
  const out: SinkIndexEntry[] = [];
  for (const line of fs.readFileSync(file, "utf8").split("\n")) {
    if (!line.trim()) continue;
    try {
      const v = sinkIndexEntrySchema.safeParse(JSON.parse(line));
      if (v.success) out.push(v.data);
    } catch {
      // a torn last line after a crash: skip it
    }
  }
  return out;
}

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return "";
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(", ");
}

export async function startSmtpSink(opts: { port: number; dataDir: string; delayMs?: number }): Promise<{ close(): Promise<void>; port: number }> {
  const dir = mailDir(opts.dataDir);
  fs.mkdirSync(dir, { recursive: true });
  const indexFile = path.join(dir, "index.jsonl");
  const known = new Set(readSinkIndex(opts.dataDir).map((e) => e.messageId).filter((x): x is string => typeof x === "string"));
  let seq = 0;

  const files = tlsFiles({ DATA_DIR: opts.dataDir });
  const withTls = fs.existsSync(files.cert) && fs.existsSync(files.key);
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: withTls ? ["AUTH"] : ["AUTH", "STARTTLS"],
    ...(withTls ? { key: fs.readFileSync(files.key), cert: fs.readFileSync(files.cert), minVersion: "TLSv1.2" } : {}),
    logger: false,
    banner: "Stillfield local mail sink",
    size: 20 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", (err) => callback(err));
      stream.on("end", () => {
        const raw = Buffer.concat(chunks);
        const store = async () => {
          if (opts.delayMs) await new Promise((r) => setTimeout(r, opts.delayMs));
          const parsed = await simpleParser(raw);
          const messageId = parsed.messageId ?? null;
          const keyHeader = parsed.headers.get("x-stillfield-key");
          const entry: SinkIndexEntry = {
            file: null,
            messageId,
            key: typeof keyHeader === "string" ? keyHeader : null,
            to: addressText(parsed.to) || session.envelope.rcptTo.map((r) => r.address).join(", "),
            from: addressText(parsed.from) || (session.envelope.mailFrom ? session.envelope.mailFrom.address : ""),
            subject: parsed.subject ?? "",
            receivedTs: Date.now(),
            duplicate: messageId !== null && known.has(messageId),
            tls: session.secure,
          };
          if (!entry.duplicate) {
            const safe = (messageId ?? "no-id").replace(/[^A-Za-z0-9._-]+/g, "_").slice(0, 80);
            const name = `${entry.receivedTs}-${String(++seq).padStart(4, "0")}-${safe}.eml`;
            fs.writeFileSync(path.join(dir, name), raw);
            entry.file = name;
            if (messageId) known.add(messageId);
          }
          fs.appendFileSync(indexFile, `${JSON.stringify(entry)}\n`);
          log.info(
            entry.duplicate
              ? `duplicate of ${messageId} (already stored), to ${entry.to}: not stored again`
              : `mail to ${entry.to}: "${entry.subject}" → ${path.join(dir, entry.file ?? "")}`,
          );
        };
        store().then(
          () => callback(),
          (err: unknown) => {
            log.error("could not store a message", { error: describeError(err) });
            callback(err instanceof Error ? err : new Error(String(err)));
          },
        );
      });
    },
  });
  server.on("error", (err) => log.error("SMTP server error", { error: describeError(err) }));
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  log.info(`listening on 127.0.0.1:${opts.port}${withTls ? " (STARTTLS offered)" : ""}; mail is written to ${dir} (one .eml per message, index.jsonl lists them)`);
  return {
    port: opts.port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  const env = getEnv();
  startSmtpSink({ port: env.SMTP_PORT, dataDir: env.DATA_DIR, delayMs: env.SMTP_SINK_DELAY_MS })
    .then((sink) => {
      const stop = () => {
        log.info("stopping");
        const t = setTimeout(() => process.exit(0), 2000);
        t.unref();
        sink.close().then(() => process.exit(0));
      };
      process.on("SIGTERM", stop);
      process.on("SIGINT", stop);
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
