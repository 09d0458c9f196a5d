// A line's page: live charts, 7 days from the rollups with min/max bands, notes
// (a shift lead adds one and sees it after a reload; a viewer is refused, by the API too),
// and the end-to-end time from a device's timestamped reading to the open page.
import type { Page } from "@playwright/test";
import { quantile } from "simple-statistics";
import { readDeviceSecrets } from "../../db/seed";
import { apiAs, signIn, snap, expect, test } from "./helpers";
import { FixturePublisher, listFixtureDevices, startPlantSimulator, testPool, type FixtureDevice } from "./line-fixtures";

/** this field meter is driven by the test itself (for the latency probe), the rest by the simulator */
const PROBE_CODE = "fm-labeller-1-dispense";

let sim: Awaited<ReturnType<typeof startPlantSimulator>> | null = null;
let probe: FixturePublisher | null = null;
let probeDevice: FixtureDevice;
let gravureId: number;

test.describe.configure({ mode: "serial" });

test.beforeAll(async () => {
  test.setTimeout(300_000);
  const pool = testPool();
  const devices = await listFixtureDevices(pool);
  const [rows] = await pool.query("SELECT id FROM `lines` WHERE slug = 'gravure-1'");
  gravureId = Number((rows as Array<{ id: number }>)[0].id);
  await pool.end();
  probeDevice = devices.find((d) => d.code === PROBE_CODE)!;
  sim = await startPlantSimulator({ devices, exclude: [PROBE_CODE] });
  probe = new FixturePublisher([probeDevice], readDeviceSecrets(process.env.DB_NAME));
  await probe.start();
});

test.afterAll(async () => {
  await probe?.stop();
  await sim?.stop();
});

const charts = (page: Page, kind: string) => page.locator(`[data-testid="line-chart"][data-kind="${kind}"]`);

test("a viewer sees live charts, then 7 days of history with min/max bands; notes are refused", async ({ page, baseURL }) => {
  await signIn(page, "viewer");
  await page.goto(`/lines/${gravureId}`);
  await expect(page.getByRole("heading", { name: "Gravure Press 1" })).toBeVisible();
  await expect(charts(page, "charge")).toHaveCount(4);
  await expect(charts(page, "climate")).toHaveCount(1);
  await expect(charts(page, "speed")).toHaveCount(1);
  await expect(page.getByTestId("neutralizer")).toHaveCount(4);
  await expect(page.getByTestId("stream-status")).toHaveAttribute("data-status", "live", { timeout: 20_000 });

  // live: the charts fill and keep growing as readings stream in (raw readings, no band)
  const first = charts(page, "charge").first();
  await expect(first).toHaveAttribute("data-source", "raw");
  await expect.poll(async () => Number(await first.getAttribute("data-points")), { timeout: 20_000 }).toBeGreaterThan(30);
  const liveValue = page.getByTestId("live-value").first();
  const ts0 = Number(await liveValue.getAttribute("data-ts"));
  await expect.poll(async () => Number(await liveValue.getAttribute("data-ts")), { timeout: 10_000 }).toBeGreaterThan(ts0);
  await expect(page.locator("canvas").first()).toBeVisible();
  await snap(page, "line-live-1366x768");

  // 7 days: the rollups answer and the min/max band is drawn
  await page.getByRole("button", { name: "7 days" }).click();
  await expect(page).toHaveURL(/range=7d/);
  await expect(first).toHaveAttribute("data-source", "1m", { timeout: 20_000 });
  await expect(first).toHaveAttribute("data-band", "on");
  await expect.poll(async () => Number(await first.getAttribute("data-points"))).toBeGreaterThan(400);
  await expect(page.getByTestId("history-source")).toContainText("min–max band");
  await page.waitForTimeout(800);
  await snap(page, "line-7d-1366x768");
  await page.setViewportSize({ width: 1920, height: 1080 });
  await page.waitForTimeout(1_200);
  await snap(page, "line-7d-1920x1080");

  // 30 days come from the hourly rollups
  await page.getByRole("button", { name: "30 days" }).click();
  await expect(first).toHaveAttribute("data-source", "1h", { timeout: 20_000 });

  // a viewer has no note form, and the API refuses the note with 403
  await expect(page.getByRole("button", { name: "Add note" })).toHaveCount(0);
  await expect(page.getByText("your role can read them")).toBeVisible();
  const api = await apiAs(baseURL!, "viewer");
  const refused = await api.post("/api/notes", { data: { lineId: gravureId, ts: Date.now(), text: "viewer note" } });
  expect(refused.status()).toBe(403);
  // bad query parameters get 400 with the reason
  const bad = await api.get(`/api/history?pointId=1&from=20&to=10`);
  expect(bad.status()).toBe(400);
  expect((await bad.json()).error).toMatch(/from must be before to/);
  const badChannel = await api.get(`/api/history?pointId=1&channel=rh_pct&from=0&to=1000`);
  expect(badChannel.status()).toBe(400);
  expect((await api.get(`/api/live?scope=line`)).status()).toBe(400);
  expect((await api.get(`/api/live?scope=line&id=999999`)).status()).toBe(404);
  await api.dispose();
});

test("a shift lead adds a note at a moment and sees it on the charts after a reload", async ({ page, baseURL }) => {
  await signIn(page, "shift_lead");
  await page.goto(`/lines/${gravureId}?range=24h`);
  await expect(charts(page, "charge")).toHaveCount(4);
  const text = `New roll of film, splice checked (${Date.now() % 100000})`;
  await page.getByLabel("Note text").fill(text);
  await page.getByRole("button", { name: "Add note" }).click();
  await expect(page.getByTestId("form-ok")).toContainText("Note added");
  await expect(page.getByTestId("line-note-text").filter({ hasText: text })).toBeVisible();
  await page.reload();
  await expect(page.getByTestId("line-note-text").filter({ hasText: text })).toBeVisible();
  await expect.poll(async () => Number(await charts(page, "charge").first().getAttribute("data-notes"))).toBeGreaterThanOrEqual(1);
  await page.waitForTimeout(800);
  await snap(page, "line-note-1366x768");
  // the API accepts it from a shift lead too, and refuses nonsense with the reason
  const api = await apiAs(baseURL!, "shift_lead");
  expect((await api.post("/api/notes", { data: { lineId: gravureId, ts: Date.now() - 60_000, text: "bar cleaned at the unwind" } })).status()).toBe(201);
  const bad = await api.post("/api/notes", { data: { lineId: gravureId, ts: Date.now(), text: "" } });
  expect(bad.status()).toBe(400);
  expect((await bad.json()).fieldErrors.text[0]).toMatch(/Write what happened/);
  await api.dispose();
});

test("a timestamped reading reaches the open line page within 2 s (p95)", async ({ page }) => {
  const pool = testPool();
  const [rows] = await pool.query("SELECT line_id AS lineId, point_id AS pointId FROM devices WHERE code = ?", [PROBE_CODE]);
  await pool.end();
  const { lineId, pointId } = (rows as Array<{ lineId: number; pointId: number }>)[0];
  await signIn(page, "viewer");
  await page.goto(`/lines/${lineId}`);
  await expect(page.getByTestId("stream-status")).toHaveAttribute("data-status", "live", { timeout: 20_000 });
  probe!.pause();
  await page.waitForTimeout(1_500);
  const delays: number[] = [];
  for (let i = 0; i < 20; i++) {
    const value = Number((-18 - i * 0.37).toFixed(2));
    const sentAt = Date.now();
    await probe!.publishNow(probeDevice.id, "charge_kv", value);
    await page.waitForFunction(
      ([pid, v]) => document.querySelector(`[data-testid="live-value"][data-point-id="${pid}"]`)?.getAttribute("data-value") === v,
      [String(pointId), String(value)] as const,
      { polling: 25, timeout: 10_000 },
    );
    delays.push(Date.now() - sentAt);
    await page.waitForTimeout(300);
  }
  probe!.pause(false);
  const p50 = quantile(delays, 0.5);
  const p95 = quantile(delays, 0.95);
  console.log(`live reading → open line page: p50 ${p50.toFixed(0)} ms, p95 ${p95.toFixed(0)} ms, max ${Math.max(...delays)} ms (n=${delays.length})`);
  test.info().annotations.push({ type: "latency", description: `p50 ${p50.toFixed(0)} ms, p95 ${p95.toFixed(0)} ms` });
  expect(p95).toBeLessThan(2_000);
  await snap(page, "line-labeller-over-1366x768");
});
