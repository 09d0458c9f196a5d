// Web-tier benchmark (npm run bench:web). Against a running Stillfield with its live simulator
// (npm run demo, or any stack; APP_URL), with autocannon at 50 concurrent connections, each
// signed in as its own viewer session:
//   (a) GET /api/floor                        — the Floor's snapshot
//   (b) GET /api/history, 7 days of one point — a chart from the 1-minute rollups
//   (c) GET /floor                            — the server-rendered page
// requests/s and p95 latency for each; then
//   (d) the Floor's snapshot for a generated plant of 1,000 points (a scratch database of its own,
//       20 halls × 5 lines × 10 points, 16 minutes of 1 Hz readings through the worker's writer):
//       the read model and its serialisation in this process, uncached, median of 7 calls.
// Targets (README "Benchmarks"): /api/floor p95 < 150 ms at 50 concurrent; 1,000 points < 200 ms.
// The last line reads:
//   web: floor <N> req/s p95 <ms> ms, history <N> req/s p95 <ms> ms, page <N> req/s p95 <ms> ms, floor 1000 points <ms> ms
// Options: --connections (50) --seconds (20 per endpoint) --skip-1000 --only floor|history|page (one
// endpoint, e.g. while profiling the app; the last line then names only that one)
// Not part of npm test.
import { parseArgs } from "node:util";
import autocannon from "autocannon";
import { DEMO_PEOPLE } from "../lib/demo-plant";
import { generatePlant } from "./bench-web-plant";

const { values: argv } = parseArgs({
  options: {
    connections: { type: "string", default: "50" },
    seconds: { type: "string", default: "20" },
    "skip-1000": { type: "boolean", default: false },
    only: { type: "string" },
  },
});
const appUrl = (process.env.APP_URL ?? "http://127.0.0.1:3000").replace(/\/$/, "");
const connections = Number(argv.connections);
const seconds = Number(argv.seconds);
const log = (msg: string) => process.stdout.write(`[bench:web] ${msg}\n`);

/** Signs a demo person in through next-auth's credentials flow; returns the Cookie header. */
async function signIn(email: string, password: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair.indexOf("=");
      jar.set(pair.slice(0, i), pair.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrfRes = await fetch(`${appUrl}/api/auth/csrf`);
  keep(csrfRes);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${appUrl}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "Content-Type": "application/x-www-form-urlencoded", Cookie: cookie(), Origin: appUrl },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  keep(res);
  const me = await fetch(`${appUrl}/api/me`, { headers: { Cookie: cookie() } });
  if (me.status !== 200) throw new Error(`sign-in of ${email} failed (GET /api/me answered ${me.status})`);
  return cookie();
}

type Result = { rps: number; p95: number; errors: number; non2xx: number; bytes: number };

function run(path: string, cookies: string[]): Promise<Result> {
  return new Promise((resolve, reject) => {
    let next = 0;
    const instance = autocannon(
      {
        url: `${appUrl}${path}`,
        connections,
        duration: seconds,
        // each connection is its own viewer session
        setupClient: (client) => client.setHeaders({ cookie: cookies[next++ % cookies.length], accept: "*/*" }),
      },
      (err, r) => {
        if (err) return reject(err);
        resolve({ rps: r.requests.average, p95: r.latency.p97_5 === undefined ? NaN : percentile95(r), errors: r.errors + r.timeouts, non2xx: r.non2xx, bytes: r.throughput.average / Math.max(1, r.requests.average) });
      },
    );
    autocannon.track(instance, { renderProgressBar: false, renderResultsTable: false, renderLatencyTable: false });
  });
}

/** autocannon reports p90 and p97.5 but not p95: interpolate between them (stated as such). */
function percentile95(r: autocannon.Result): number {
  const p90 = r.latency.p90;
  const p975 = r.latency.p97_5;
  return p90 + ((95 - 90) / (97.5 - 90)) * (p975 - p90);
}

async function main() {
  try {
    await fetch(`${appUrl}/sign-in`);
  } catch (err) {
    throw new Error(`No Stillfield answers at ${appUrl} (${err instanceof Error ? err.message : err}). Start it with npm run demo, or set APP_URL.`);
  }
  const viewer = DEMO_PEOPLE.find((p) => p.role === "viewer")!;
  log(`signing in ${connections} viewer sessions at ${appUrl}…`);
  const cookies: string[] = [];
  for (let i = 0; i < connections; i++) cookies.push(await signIn(viewer.email, viewer.password));

  const floorRes = await fetch(`${appUrl}/api/floor`, { headers: { Cookie: cookies[0] } });
  const floorBody = await floorRes.text();
  const floor = JSON.parse(floorBody) as { areas: Array<{ lines: Array<{ points: Array<{ id: number }> }> }>; series: unknown[] };
  const pointId = floor.areas.flatMap((a) => a.lines.flatMap((l) => l.points))[0]?.id;
  if (!pointId) throw new Error("the plant has no points");
  log(`one /api/floor: ${(floorBody.length / 1024).toFixed(1)} KB, ${floor.series.length} series`);
  const now = Date.now();
  const historyPath = `/api/history?pointId=${pointId}&channel=charge_kv&from=${now - 7 * 86_400_000}&to=${now}&maxPoints=1000`;
  const h = await fetch(`${appUrl}${historyPath}`, { headers: { Cookie: cookies[0] } });
  if (h.status !== 200) throw new Error(`GET ${historyPath} answered ${h.status}: ${(await h.text()).slice(0, 200)}`);

  const results: Record<string, Result> = {};
  const endpoints = ([["floor", "/api/floor"], ["history", historyPath], ["page", "/floor"]] as const).filter(([name]) => !argv.only || argv.only === name);
  if (endpoints.length === 0) throw new Error(`--only takes floor, history or page (got ${argv.only})`);
  for (const [name, path] of endpoints) {
    log(`${name}: ${connections} connections for ${seconds} s on ${path.split("?")[0]}…`);
    const r = await run(path, cookies);
    results[name] = r;
    log(`${name}: ${r.rps.toFixed(0)} req/s, p95 ${r.p95.toFixed(0)} ms, ${(r.bytes / 1024).toFixed(1)} KB each, ${r.errors} errors, ${r.non2xx} non-2xx`);
    if (r.non2xx > 0 || r.errors > 0) log(`${name}: WARNING — some requests failed`);
  }

  let thousandMs = NaN;
  if (!argv["skip-1000"]) {
    log("generating a plant of 1,000 points in a scratch database…");
    const gen = await generatePlant(1000);
    try {
      thousandMs = gen.medianSnapshotMs;
      log(`1,000 points: snapshot ${gen.medianSnapshotMs.toFixed(0)} ms median of ${gen.runs} (${(gen.bytes / 1024).toFixed(0)} KB, ${gen.series} series)`);
    } finally {
      await gen.close();
    }
  }
  if (argv.only) {
    const r = results[argv.only];
    console.log(`web: ${argv.only} ${r.rps.toFixed(0)} req/s p95 ${r.p95.toFixed(0)} ms (only this one)`);
    return;
  }
  const f = results.floor;
  const hi = results.history;
  const pg = results.page;
  const ok = f.p95 < 150 && (Number.isNaN(thousandMs) || thousandMs < 200);
  log(`targets: /api/floor p95 < 150 ms, 1,000 points < 200 ms — ${ok ? "met" : "NOT met"}`);
  console.log(
    `web: floor ${f.rps.toFixed(0)} req/s p95 ${f.p95.toFixed(0)} ms, history ${hi.rps.toFixed(0)} req/s p95 ${hi.p95.toFixed(0)} ms, page ${pg.rps.toFixed(0)} req/s p95 ${pg.p95.toFixed(0)} ms, floor 1000 points ${Number.isNaN(thousandMs) ? "skipped" : thousandMs.toFixed(0)} ms`,
  );
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
