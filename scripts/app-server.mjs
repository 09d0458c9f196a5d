// Serves the built Next.js app (what `next start` does) and passes each request's socket
// address to the app. Next keeps a client's own X-Forwarded-For as it is, so without this the
// sign-in throttle could only trust what the client says. The address travels in a header whose
// name is random per process (set before Next loads, read by app/_server/client-address.ts), so
// a client cannot send it; any header of that family it sends is dropped first.
//   node scripts/app-server.mjs [-H 127.0.0.1] [-p 3000]
import http from "node:http";
import { randomBytes } from "node:crypto";
import path from "node:path";
import next from "next";

const args = process.argv.slice(2);
const arg = (flag, fallback) => {
  const i = args.indexOf(flag);
  return i >= 0 && args[i + 1] ? args[i + 1] : fallback;
};
const hostname = arg("-H", "127.0.0.1");
const port = Number(arg("-p", process.env.APP_PORT ?? "3000"));
const PREFIX = "x-stillfield-peer";
const headerName = `${PREFIX}-${randomBytes(12).toString("hex")}`;
process.env.STILLFIELD_PEER_HEADER = headerName;
process.env.NEXT_TELEMETRY_DISABLED = "1";

const app = next({ dev: false, hostname, port, dir: path.resolve(import.meta.dirname, "..") });
const handle = app.getRequestHandler();
await app.prepare();

const server = http.createServer((req, res) => {
  for (const name of Object.keys(req.headers)) if (name.startsWith(PREFIX)) delete req.headers[name];
  req.headers[headerName] = req.socket.remoteAddress ?? "";
  handle(req, res).catch((err) => {
    console.error("request failed:", err);
    if (!res.headersSent) res.statusCode = 500;
    res.end();
  });
});
server.listen(port, hostname, () => console.log(`Stillfield app on http://${hostname}:${port}`));
for (const signal of ["SIGINT", "SIGTERM"]) {
  process.on(signal, () => {
    server.close(() => process.exit(0));
    server.closeAllConnections();
    setTimeout(() => process.exit(0), 3000).unref();
  });
}
