// The wallboard: a hall's lines, full screen and dark, live, for a viewer-level kiosk.
import { DEMO_AREAS, DEMO_LINES } from "../../lib/demo-plant";
import { signIn, snap, expect, test } from "./helpers";
import { listFixtureDevices, startPlantSimulator, testPool } from "./line-fixtures";

let sim: Awaited<ReturnType<typeof startPlantSimulator>> | null = null;

test.describe.configure({ mode: "serial" });

test.beforeAll(async () => {
  test.setTimeout(300_000);
  const pool = testPool();
  const devices = await listFixtureDevices(pool);
  await pool.end();
  sim = await startPlantSimulator({ devices });
});

test.afterAll(async () => {
  await sim?.stop();
});

test("a signed-out screen is sent to sign-in and comes back to the wallboard", async ({ page }) => {
  await page.goto("/wallboard");
  await expect(page).toHaveURL(/\/sign-in\?callbackUrl=%2Fwallboard|\/sign-in\?callbackUrl=\/wallboard/);
});

test("a viewer kiosk shows one hall's lines live on a dark full screen", async ({ page }) => {
  await page.setViewportSize({ width: 1920, height: 1080 });
  await signIn(page, "viewer");
  await page.goto("/wallboard");
  await page.getByTestId("wall-hall-link").filter({ hasText: DEMO_AREAS[0].name }).click();
  await expect(page.getByTestId("wallboard")).toBeVisible();
  await expect(page.getByRole("navigation", { name: "Main" })).toHaveCount(0); // no app shell
  const lines = DEMO_LINES.filter((l) => l.areaSlug === DEMO_AREAS[0].slug);
  await expect(page.getByTestId("wall-line")).toHaveCount(lines.length);
  for (const l of lines) await expect(page.getByTestId("wall-line").filter({ hasText: l.name }).getByTestId("wall-point")).toHaveCount(l.points.length);
  await expect(page.getByTestId("stream-status")).toHaveAttribute("data-status", "live", { timeout: 20_000 });
  const values = () => page.getByTestId("wall-value").allTextContents();
  await expect.poll(async () => (await values()).filter((v) => /\d/.test(v)).length, { timeout: 30_000 }).toBeGreaterThanOrEqual(lines.reduce((n, l) => n + l.points.length, 0) - 1);
  const before = await values();
  await expect.poll(async () => (await values()).filter((v, i) => v !== before[i]).length, { timeout: 15_000 }).toBeGreaterThan(0);
  // dark background, large figures
  const bg = await page.getByTestId("wallboard").evaluate((el) => getComputedStyle(el.parentElement!).backgroundColor);
  const [r, g, b] = (bg.match(/\d+/g) ?? []).map(Number);
  expect(r + g + b).toBeLessThan(120);
  const fontPx = await page.getByTestId("wall-value").first().evaluate((el) => parseFloat(getComputedStyle(el).fontSize));
  expect(fontPx).toBeGreaterThanOrEqual(56);
  await expect(page.getByTestId("wall-clock")).toHaveText(/^\d{2}:\d{2}$/);
  await page.waitForTimeout(1_500);
  await snap(page, "wallboard-1920x1080");
  await page.setViewportSize({ width: 1366, height: 768 });
  await page.waitForTimeout(1_500);
  await snap(page, "wallboard-1366x768");
});
