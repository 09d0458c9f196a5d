// npm run soak:wallboard — keeps the wallboard open in Chromium against a running Stillfield
// with its live simulator (npm run demo, or any stack) and checks that the page's JavaScript
// heap stays flat: garbage is collected before each measurement, the heap is sampled every
// minute, and the end is compared with the start (after a warm-up). Not part of npm test.
//
//   APP_URL        the running app (default http://127.0.0.1:3000, the demo)
//   SOAK_MINUTES   how long (default 10)
//   SOAK_AREA      the hall id to show (default: the first hall)
//   SOAK_EMAIL / SOAK_PASSWORD   the kiosk account (default: the demo viewer)
// Exits 1 when the heap grew by more than 20 %, the page stopped updating, or it showed errors.
import path from "node:path";
import { chromium } from "@playwright/test";
import { DEMO_PEOPLE } from "../lib/demo-plant";

const appUrl = (process.env.APP_URL ?? "http://127.0.0.1:3000").replace(/\/$/, "");
const minutes = Number(process.env.SOAK_MINUTES ?? 10);
const warmupMs = Math.min(60_000, (minutes * 60_000) / 5);
const viewer = DEMO_PEOPLE.find((p) => p.role === "viewer")!;
const email = process.env.SOAK_EMAIL ?? viewer.email;
const password = process.env.SOAK_PASSWORD ?? viewer.password;
const MAX_GROWTH = 0.2;

const mb = (bytes: number) => `${(bytes / 1_048_576).toFixed(2)} MB`;
const log = (msg: string) => process.stdout.write(`[soak] ${msg}\n`);

async function main() {
  try {
    const res = await fetch(`${appUrl}/sign-in`);
    if (!res.ok) throw new Error(`HTTP ${res.status}`);
  } catch (err) {
    throw new Error(`No Stillfield answers at ${appUrl} (${err instanceof Error ? err.message : err}). Start it with npm run demo, or set APP_URL.`);
  }
  const dataDir = path.resolve(process.env.DATA_DIR ?? ".data");
  const browser = await chromium.launch({
    executablePath: "/usr/bin/chromium",
    // keep the browser from writing under the home folder
    env: { ...process.env, XDG_CONFIG_HOME: path.join(dataDir, "xdg/config"), XDG_CACHE_HOME: path.join(dataDir, "xdg/cache") },
    args: ["--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1"],
  });
  let failed = false;
  try {
    const page = await browser.newPage({ viewport: { width: 1920, height: 1080 } });
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    await page.goto(`${appUrl}/sign-in?callbackUrl=/wallboard`);
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL("**/wallboard", { timeout: 60_000 });
    const area = process.env.SOAK_AREA;
    if (area) await page.goto(`${appUrl}/wallboard/${area}`);
    else await page.getByTestId("wall-hall-link").first().click();
    await page.getByTestId("wallboard").waitFor({ timeout: 60_000 });
    log(`wallboard open at ${page.url()} for ${minutes} min (warm-up ${Math.round(warmupMs / 1000)} s)`);

    const cdp = await page.context().newCDPSession(page);
    await cdp.send("HeapProfiler.enable");
    const heap = async () => {
      await cdp.send("HeapProfiler.collectGarbage");
      const usage = (await cdp.send("Runtime.getHeapUsage")) as { usedSize: number; totalSize: number };
      return usage.usedSize;
    };
    const values = () => page.getByTestId("wall-value").allTextContents();
    const domNodes = () => page.evaluate(() => document.getElementsByTagName("*").length);

    await page.waitForTimeout(warmupMs);
    const start = await heap();
    const startNodes = await domNodes();
    const startValues = await values();
    log(`start: heap ${mb(start)}, ${startNodes} DOM elements`);

    const endAt = Date.now() + minutes * 60_000 - warmupMs;
    let changes = 0;
    let lastValues = startValues;
    while (Date.now() < endAt) {
      await page.waitForTimeout(Math.min(60_000, Math.max(0, endAt - Date.now())));
      const v = await values();
      if (v.some((x, i) => x !== lastValues[i])) changes++;
      lastValues = v;
      const status = await page.getByTestId("stream-status").getAttribute("data-status");
      log(`${new Date().toISOString().slice(11, 19)} heap ${mb(await heap())}, stream ${status}`);
    }
    const end = await heap();
    const endNodes = await domNodes();
    const growth = (end - start) / start;
    log(`end: heap ${mb(end)}, ${endNodes} DOM elements`);
    if (changes === 0) {
      failed = true;
      log("the values never changed: is the simulator running? (npm run demo starts it)");
    }
    if (errors.length) {
      failed = true;
      log(`page errors: ${errors.slice(0, 5).join(" | ")}`);
    }
    if (growth > MAX_GROWTH) failed = true;
    log(`wallboard heap: start ${mb(start)}, end ${mb(end)}, change ${(growth * 100).toFixed(1)} % (limit ${MAX_GROWTH * 100} %) — ${growth > MAX_GROWTH ? "GREW" : "flat"}`);
  } finally {
    await browser.close();
  }
  if (failed) process.exitCode = 1;
}

main().catch((err) => {
  console.error(`[soak] failed: ${err instanceof Error ? err.message : err}`);
  process.exit(1);
});
