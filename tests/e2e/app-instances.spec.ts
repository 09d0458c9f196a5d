// Two Next.js instances on one port (scripts/app-server.mjs --instances 2, what the demo runs):
// a session signed in on the test stack's app is valid on both, the Floor renders, and when one
// instance dies the other keeps answering while a new one is started in its place.
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import net from "node:net";
import path from "node:path";
import { expect, signIn, test } from "./helpers";

const ROOT = path.resolve(import.meta.dirname, "../..");
let primary: ChildProcess | null = null;
let port = 0;
let output = "";

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(p));
    });
  });
}

/** The instances: the primary's child processes. */
function instancePids(): number[] {
  try {
    return execFileSync("pgrep", ["-P", String(primary!.pid)], { encoding: "utf8" }).split("\n").filter(Boolean).map(Number);
  } catch {
    return [];
  }
}

test.describe.configure({ mode: "serial" });

test.beforeAll(async () => {
  test.setTimeout(120_000);
  port = await freePort();
  primary = spawn(process.execPath, ["scripts/app-server.mjs", "-H", "127.0.0.1", "-p", String(port), "--instances", "2"], {
    cwd: ROOT,
    env: { ...process.env, APP_INSTANCES: "1" }, // the flag wins over the setting
    stdio: ["ignore", "pipe", "pipe"],
  });
  primary.stdout!.on("data", (c: Buffer) => (output += c.toString()));
  primary.stderr!.on("data", (c: Buffer) => (output += c.toString()));
  await expect.poll(() => output, { timeout: 90_000, message: "both instances listening" }).toContain("(2 instances)");
});

test.afterAll(async () => {
  if (!primary || primary.exitCode !== null) return;
  const exited = new Promise((r) => primary!.once("exit", r));
  primary.kill("SIGTERM");
  await Promise.race([exited, new Promise((r) => setTimeout(r, 8000))]);
  if (primary.exitCode === null) primary.kill("SIGKILL");
});

test("a session from the app is valid on both instances, and one dying leaves the Floor up", async ({ page }) => {
  test.setTimeout(120_000);
  expect(instancePids()).toHaveLength(2);
  await signIn(page, "viewer");
  // the session cookie belongs to the host, so it goes to the second server as well
  const other = `http://127.0.0.1:${port}`;
  await page.goto(`${other}/floor`);
  await expect(page.getByTestId("signed-in-as")).toBeVisible();
  await expect(page.getByRole("heading", { name: "Press Hall" })).toBeVisible();

  // new connections are handed to the instances in turn: ten in a row reach both, all signed in
  const cookie = (await page.context().cookies(other)).map((c) => `${c.name}=${c.value}`).join("; ");
  const ask = async () => (await fetch(`${other}/api/me`, { headers: { cookie, connection: "close" } })).status;
  const statuses = await Promise.all(Array.from({ length: 10 }, ask));
  expect(statuses).toEqual(Array(10).fill(200));

  const [victim, survivor] = instancePids();
  process.kill(victim, "SIGKILL");
  // once the primary has seen it go (a connection handed over in that instant is reset), the
  // one left answers every request while the new one starts
  await expect.poll(() => output, { message: "the primary says it starts another" }).toContain(`app instance ${victim} stopped`);
  for (let i = 0; i < 6; i++) expect(await ask()).toBe(200);
  // and a new instance takes the dead one's place
  await expect.poll(() => instancePids().filter((p) => p !== victim && p !== survivor).length, { timeout: 60_000 }).toBe(1);
  await page.reload();
  await expect(page.getByRole("heading", { name: "Press Hall" })).toBeVisible();
});
