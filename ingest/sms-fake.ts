// A local stand-in for the SMS provider's REST API, for the demo and the tests: the provider's
// official SDK (twilio) is pointed here through its own httpClient option (ingest/sms-send.ts).
// It answers what the SDK sends:
//   POST /2010-04-01/Accounts/<sid>/Messages.json   form body To, From, Body → 201 JSON with sid, status
//   GET  /2010-04-01/Accounts/<sid>/Messages/<sid>.json                      → the message, "delivered"
// checks the account and token (HTTP Basic), and writes every accepted message as a JSON file
// under DATA_DIR/sms/<db name>/ so a person (or a test) can read what was texted.
// It can be told to fail or to be slow: SMS_FAKE_MODE ("ok", "fail", "fail:<n>", "delay:<ms>")
// at start, or POST /_control {"mode": "..."} while running; GET /_messages lists what it holds.
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import { randomBytes } from "node:crypto";
import { z } from "zod";
import { getSettings } from "../lib/settings";
import { createLogger, describeError } from "./log";

const log = createLogger("sms-fake");
const MODE = /^(ok|fail|fail:\d+|delay:\d+)$/;
const MAX_BODY = 16 * 1024;

type Stored = { sid: string; to: string; from: string; body: string; status: string; date_created: string; account_sid: string };

export function startSmsFake(opts: { port: number; dir: string; accountSid: string; authToken: string; mode?: string }) {
  let mode = opts.mode ?? "ok";
  let failuresLeft = /^fail:(\d+)$/.exec(mode) ? Number(/^fail:(\d+)$/.exec(mode)![1]) : 0;
  fs.mkdirSync(opts.dir, { recursive: true, mode: 0o700 });
  const messages = new Map<string, Stored>();
  const expectedAuth = `Basic ${Buffer.from(`${opts.accountSid}:${opts.authToken}`).toString("base64")}`;

  const send = (res: http.ServerResponse, status: number, body: unknown) => {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(JSON.stringify(body));
  };

  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    let size = 0;
    req.on("data", (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY) req.destroy();
      else chunks.push(c);
    });
    req.on("end", () => {
      void handle(req, Buffer.concat(chunks).toString("utf8"), res).catch((err: unknown) => {
        log.error("request failed", { error: describeError(err) });
        send(res, 500, { code: 20500, message: "fake failed" });
      });
    });
  });

  async function handle(req: http.IncomingMessage, raw: string, res: http.ServerResponse) {
    const url = new URL(req.url ?? "/", "http://fake.local");
    if (url.pathname === "/_control" && req.method === "POST") {
      const parsed = z.object({ mode: z.string().regex(MODE) }).safeParse(JSON.parse(raw || "{}"));
      if (!parsed.success) return send(res, 400, { error: "mode: ok | fail | fail:<n> | delay:<ms>" });
      mode = parsed.data.mode;
      failuresLeft = /^fail:(\d+)$/.exec(mode) ? Number(/^fail:(\d+)$/.exec(mode)![1]) : 0;
      log.info(`mode now ${mode}`);
      return send(res, 200, { mode });
    }
    if (url.pathname === "/_messages" && req.method === "GET") return send(res, 200, { messages: [...messages.values()] });
    const m = /^\/2010-04-01\/Accounts\/(AC[0-9a-f]{32})\/Messages(?:\/(SM[0-9a-f]{32}))?\.json$/.exec(url.pathname);
    if (!m) return send(res, 404, { code: 20404, message: "The requested resource was not found", status: 404 });
    if (req.headers.authorization !== expectedAuth || m[1] !== opts.accountSid) return send(res, 401, { code: 20003, message: "Authenticate", status: 401 });
    if (req.method === "GET" && m[2]) {
      const found = messages.get(m[2]);
      return found ? send(res, 200, { ...found, status: "delivered" }) : send(res, 404, { code: 20404, message: "not found", status: 404 });
    }
    if (req.method !== "POST" || m[2]) return send(res, 405, { code: 20004, message: "Method not allowed", status: 405 });
    const delay = /^delay:(\d+)$/.exec(mode);
    if (delay) await new Promise((r) => setTimeout(r, Number(delay[1])));
    if (mode === "fail" || (/^fail:\d+$/.test(mode) && failuresLeft > 0)) {
      if (failuresLeft > 0) failuresLeft--;
      log.warn("told to fail: answering 503");
      return send(res, 503, { code: 20503, message: "Service unavailable (fake told to fail)", status: 503 });
    }
    const form = new URLSearchParams(raw);
    const to = form.get("To") ?? "";
    const from = form.get("From") ?? "";
    const body = form.get("Body") ?? "";
    if (!/^\+[1-9]\d{6,14}$/.test(to)) return send(res, 400, { code: 21211, message: `The 'To' number ${to} is not a valid phone number.`, status: 400 });
    if (!body) return send(res, 400, { code: 21602, message: "Message body is required.", status: 400 });
    const sid = `SM${randomBytes(16).toString("hex")}`;
    const stored: Stored = { sid, to, from, body, status: "queued", date_created: new Date().toUTCString(), account_sid: opts.accountSid };
    messages.set(sid, stored);
    fs.writeFileSync(path.join(opts.dir, `${Date.now()}-${sid}.json`), JSON.stringify(stored, null, 2), { mode: 0o600 });
    log.info(`text ${sid} to ${to}: ${body.slice(0, 60)}`);
    return send(res, 201, { ...stored, uri: `/2010-04-01/Accounts/${opts.accountSid}/Messages/${sid}.json` });
  }

  return new Promise<{ port: number; close: () => Promise<void>; setMode: (m: string) => void }>((resolve) => {
    server.listen(opts.port, "127.0.0.1", () => {
      const addr = server.address();
      resolve({
        port: typeof addr === "object" && addr ? addr.port : opts.port,
        close: () => new Promise<void>((r) => server.close(() => r())),
        setMode: (m: string) => {
          mode = m;
          failuresLeft = /^fail:(\d+)$/.exec(m) ? Number(/^fail:(\d+)$/.exec(m)![1]) : 0;
        },
      });
    });
  });
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  const s = getSettings();
  startSmsFake({ port: s.SMS_FAKE_PORT, dir: path.join(s.DATA_DIR, "sms", s.DB_NAME), accountSid: s.SMS_ACCOUNT_SID, authToken: s.SMS_AUTH_TOKEN, mode: s.SMS_FAKE_MODE })
    .then((f) => {
      log.info(`fake SMS service on 127.0.0.1:${f.port}`);
      const stop = () => void f.close().then(() => process.exit(0));
      process.on("SIGTERM", stop);
      process.on("SIGINT", stop);
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
