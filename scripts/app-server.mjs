// Serves the built Next.js app (what `next start` does) and passes each request's socket
// address to the app. Next keeps a client's own X-Forwarded-For as it is, so without this the
// sign-in throttle could only trust what the client says. The address travels in a header whose
// name is random per process (set before Next loads, read by app/_server/client-address.ts), so
// a client cannot send it; any header of that family it sends is dropped first.
//   node scripts/app-server.mjs [-H 127.0.0.1] [-p 3000] [--instances N]
// With --instances N (or APP_INSTANCES; lib/settings.ts; the demo runs 2, scripts/stack-env.sh) N Next.js instances serve the
// one port side by side (node:cluster; the first process only hands connections out in turn and
// restarts an instance that dies, after 1 s). Each instance has its own live subscription and
// its own one-second Floor cache; sessions are signed tokens, valid on all of them, and the
// sign-in throttle and everything else a person changes live in MariaDB. One instance of Node
// uses at most one core; on a machine with two or more cores two instances answer the Floor's
// many screens sooner (npm run bench:web).
import cluster from "node:cluster";
import http from "node:http";
import { randomBytes } from "node:crypto";
import path from "node:path";

const args = process.argv.slice(2);
const arg = (flag, fallback) => {
  const i = args.indexOf(flag);
  return i >= 0 && args[i + 1] ? args[i + 1] : fallback;
};
const hostname = arg("-H", "127.0.0.1");
const port = Number(arg("-p", process.env.APP_PORT ?? "3000"));
const instances = Math.max(1, Math.min(16, Math.floor(Number(arg("--instances", process.env.APP_INSTANCES ?? "1"))) || 1));

if (instances > 1 && cluster.isPrimary) runPrimary();
else await serve();

function runPrimary() {
  let stopping = false;
  let listening = 0;
  const start = () => {
    const w = cluster.fork();
    w.on("listening", () => {
      if (++listening === instances) console.log(`Stillfield app on http://${hostname}:${port} (${instances} instances)`);
    });
  };
  for (let i = 0; i < instances; i++) start();
  cluster.on("exit", (w, code, signal) => {
    if (stopping) return;
    console.error(`app instance ${w.process.pid} stopped (${signal ?? `code ${code}`}); starting another in 1 s`);
    setTimeout(() => !stopping && start(), 1000);
  });
  for (const signal of ["SIGINT", "SIGTERM"]) {
    process.on(signal, () => {
      stopping = true;
      for (const w of Object.values(cluster.workers ?? {})) w?.process.kill("SIGTERM");
      const done = () => Object.keys(cluster.workers ?? {}).length === 0 && process.exit(0);
      cluster.on("exit", done);
      done();
      setTimeout(() => process.exit(0), 4000).unref();
    });
  }
}

async function serve() {
  const PREFIX = "x-stillfield-peer";
  const headerName = `${PREFIX}-${randomBytes(12).toString("hex")}`;
  process.env.STILLFIELD_PEER_HEADER = headerName;
  process.env.NEXT_TELEMETRY_DISABLED = "1";
  const { default: next } = await import("next");
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
  server.listen(port, hostname, () => {
    if (cluster.isPrimary) console.log(`Stillfield app on http://${hostname}:${port}`);
  });
  for (const signal of ["SIGINT", "SIGTERM"]) {
    process.on(signal, () => {
      server.close(() => process.exit(0));
      server.closeAllConnections();
      setTimeout(() => process.exit(0), 3000).unref();
    });
  }
}
