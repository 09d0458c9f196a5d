// Compare on a line page at phone width (390 × 844): the charge charts overlay the same span of
// the day before, dashed, with a legend; "Link to this view" freezes the window and the overlay.
// History comes from the plant simulator's 7-day backfill.
import { signIn, snap, expect, test } from "./helpers";
import { listFixtureDevices, startPlantSimulator, testPool } from "./line-fixtures";

let sim: Awaited<ReturnType<typeof startPlantSimulator>> | null = null;
let gravureId: number;

test.describe.configure({ mode: "serial" });

test.beforeAll(async () => {
  test.setTimeout(300_000);
  const pool = testPool();
  const devices = await listFixtureDevices(pool);
  const [rows] = await pool.query("SELECT id FROM `lines` WHERE slug = 'gravure-1'");
  gravureId = Number((rows as Array<{ id: number }>)[0].id);
  await pool.end();
  sim = await startPlantSimulator({ devices });
});

test.afterAll(async () => {
  await sim?.stop();
});

test("a line chart overlays the day before, dashed with a legend, and the frozen link keeps range and overlay", async ({ page }) => {
  test.setTimeout(120_000);
  await page.setViewportSize({ width: 390, height: 844 });
  await signIn(page, "viewer");
  await page.goto(`/lines/${gravureId}?range=24h`);
  const first = page.locator('[data-testid="line-chart"][data-kind="charge"]').first();
  await expect(first).toHaveAttribute("data-compare", "");
  await expect(page.getByTestId("compare-legend")).toHaveCount(0);

  await page.getByLabel("Compare with").selectOption("day");
  await expect(page).toHaveURL(/range=24h&compare=day/);
  await expect(first).toHaveAttribute("data-compare", /^Day before \([A-Z][a-z]{2} \d{1,2} [A-Z][a-z]{2} \d\d:\d\d–\d\d:\d\d\)$/);
  await expect.poll(async () => Number(await first.getAttribute("data-compare-points")), { timeout: 20_000 }).toBeGreaterThan(100);
  const legend = page.getByTestId("compare-legend").first();
  await expect(legend).toContainText("This window");
  await expect(legend).toContainText("Day before");

  // the frozen link: exactly the shown 24 h as a custom range, with the overlay
  const href = (await page.getByTestId("frozen-link").getAttribute("href"))!;
  const m = /^\/lines\/(\d+)\?range=custom&from=(\d+)&to=(\d+)&compare=day$/.exec(href);
  expect(m, href).not.toBeNull();
  expect(Number(m![1])).toBe(gravureId);
  expect(Number(m![3]) - Number(m![2])).toBe(86_400_000);
  const rangeText = await page.getByTestId("range-text").textContent();
  const { scroll, inner } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
  expect(scroll).toBeLessThanOrEqual(inner);
  await first.scrollIntoViewIfNeeded();
  await page.waitForTimeout(600);
  await snap(page, "phone-390-line-compare");

  // opened later (here: at once, in a fresh page), the link shows the same window and overlay
  const later = await page.context().newPage();
  await later.setViewportSize({ width: 390, height: 844 });
  await later.goto(href);
  await expect(later.getByTestId("range-text")).toHaveText(rangeText!);
  await expect(later.getByLabel("Compare with")).toHaveValue("day");
  await expect(later.locator('[data-testid="line-chart"][data-kind="charge"]').first()).toHaveAttribute("data-compare", /^Day before/);

  // switching the overlay off keeps the range
  await page.getByLabel("Compare with").selectOption("");
  await expect(page).toHaveURL(/range=24h$/);
  await expect(page.getByTestId("compare-legend")).toHaveCount(0);
});
