// A local push service for the tests, over TLS with a certificate made for this run by openssl
// (web-push always speaks HTTPS; the sender trusts the certificate through `agent`). It hands
// out subscriptions the way a browser's push service would (an endpoint, the browser's P-256
// public key and auth secret), and on each push checks what a real one relies on: a VAPID
// Authorization header, Content-Encoding aes128gcm, and a body that decrypts to the
// subscription's keys. The decryption is written here from RFC 8291 / RFC 8188 with node:crypto,
// independent of the encrypting library. An endpoint can be marked gone: it then answers 410.
import { execFileSync } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import https from "node:https";
import path from "node:path";

type Sub = { id: string; ecdh: crypto.ECDH; auth: Buffer; gone: boolean };
export type ReceivedPush = { subId: string; payload: unknown; vapid: boolean; encoding: string | undefined };

/** RFC 8291 §3.4 + RFC 8188 §2: decrypts one aes128gcm message to the user agent's keys. */
export function decryptAes128gcm(body: Buffer, uaEcdh: crypto.ECDH, authSecret: Buffer): Buffer {
  const salt = body.subarray(0, 16);
  const rs = body.readUInt32BE(16);
  const idLen = body[20];
  const asPublic = body.subarray(21, 21 + idLen);
  const records = body.subarray(21 + idLen);
  if (records.length > rs) throw new Error("more than one record (not expected for a push message)");
  const uaPublic = uaEcdh.getPublicKey();
  const ecdhSecret = uaEcdh.computeSecret(asPublic);
  const keyInfo = Buffer.concat([Buffer.from("WebPush: info\0"), uaPublic, asPublic]);
  const ikm = Buffer.from(crypto.hkdfSync("sha256", ecdhSecret, authSecret, keyInfo, 32));
  const cek = Buffer.from(crypto.hkdfSync("sha256", ikm, salt, Buffer.from("Content-Encoding: aes128gcm\0"), 16));
  const nonce = Buffer.from(crypto.hkdfSync("sha256", ikm, salt, Buffer.from("Content-Encoding: nonce\0"), 12));
  const decipher = crypto.createDecipheriv("aes-128-gcm", cek, nonce);
  decipher.setAuthTag(records.subarray(records.length - 16));
  const padded = Buffer.concat([decipher.update(records.subarray(0, records.length - 16)), decipher.final()]);
  // the last record ends with the delimiter 0x02 and zero padding
  let end = padded.length - 1;
  while (end >= 0 && padded[end] === 0) end--;
  if (padded[end] !== 2) throw new Error("no last-record delimiter");
  return padded.subarray(0, end);
}

export async function startPushFake(dir: string) {
  fs.mkdirSync(dir, { recursive: true });
  const cert = path.join(dir, "ca.crt");
  const key = path.join(dir, "server.key");
  execFileSync("openssl", ["req", "-x509", "-newkey", "ec", "-pkeyopt", "ec_paramgen_curve:prime256v1", "-nodes", "-days", "1", "-subj", "/CN=127.0.0.1", "-addext", "subjectAltName=IP:127.0.0.1", "-keyout", key, "-out", cert], { stdio: "ignore" });
  const subs = new Map<string, Sub>();
  const received: ReceivedPush[] = [];
  const refused: string[] = [];
  const server = https.createServer({ cert: fs.readFileSync(cert), key: fs.readFileSync(key) }, (req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => {
      const m = /^\/push\/([0-9a-f]+)$/.exec(req.url ?? "");
      const sub = m ? subs.get(m[1]) : undefined;
      if (!sub || req.method !== "POST") return void res.writeHead(404).end();
      if (sub.gone) return void res.writeHead(410).end("gone");
      const vapid = /^vapid t=[\w-]+\.[\w-]+\.[\w-]+, k=[\w-]+$/.test(String(req.headers.authorization ?? ""));
      const encoding = req.headers["content-encoding"];
      try {
        if (!vapid || encoding !== "aes128gcm") throw new Error(`vapid ${vapid}, encoding ${encoding}`);
        const plain = decryptAes128gcm(Buffer.concat(chunks), sub.ecdh, sub.auth);
        received.push({ subId: sub.id, payload: JSON.parse(plain.toString("utf8")), vapid, encoding });
        res.writeHead(201, { location: `/msg/${received.length}` }).end();
      } catch (err) {
        refused.push(err instanceof Error ? err.message : String(err));
        res.writeHead(400).end("cannot decrypt");
      }
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  const addr = server.address();
  const port = typeof addr === "object" && addr ? addr.port : 0;
  return {
    caFile: cert,
    received,
    refused,
    /** a browser-side subscription, as PushSubscription.toJSON() gives it */
    subscribe() {
      const id = crypto.randomBytes(8).toString("hex");
      const ecdh = crypto.createECDH("prime256v1");
      ecdh.generateKeys();
      const auth = crypto.randomBytes(16);
      subs.set(id, { id, ecdh, auth, gone: false });
      return { id, endpoint: `https://127.0.0.1:${port}/push/${id}`, keys: { p256dh: ecdh.getPublicKey().toString("base64url"), auth: auth.toString("base64url") } };
    },
    markGone(id: string) {
      const s = subs.get(id);
      if (s) s.gone = true;
    },
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}
