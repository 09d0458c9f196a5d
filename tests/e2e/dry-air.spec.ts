// Tomorrow's dry air on the Floor: the test stack's mailer fetches the forecast for the seeded
// demo site from the weather fake (whose scripted cold snap arrives tomorrow) and keeps it in
// MariaDB; an engineer sees the warning with its source and time, a viewer does not. A phone
// screenshot (390 × 844) goes to the test output.
import { signIn, snap, expect, test } from "./helpers";

test("an engineer sees tomorrow's dry-air warning on the Floor, with the forecast's source; a viewer does not", async ({ page }) => {
  test.setTimeout(120_000);
  await page.setViewportSize({ width: 390, height: 844 });
  await signIn(page, "engineer");
  const banner = page.getByTestId("dry-air-warning");
  // the mailer fetches the forecast in its first round after the stack starts
  await expect
    .poll(
      async () => {
        await page.goto("/floor");
        return banner.count();
      },
      { timeout: 60_000, intervals: [1_000, 2_000, 5_000] },
    )
    .toBe(1);
  await expect(banner.getByRole("heading", { name: "Tomorrow's dry air" })).toBeVisible();
  await expect(banner.getByRole("listitem").filter({ hasText: "Press Hall" }).first()).toHaveText(
    /^[A-Z][a-z]{2} \d\d:00–\d\d:00: Press Hall expected \d+(–\d+)? % RH without humidification, below the 40 % limit; about \d+ kg\/h of water needed/,
  );
  await expect(banner).toContainText(/Forecast from 127\.0\.0\.1:\d+, fetched [A-Z][a-z]{2} \d\d:\d\d \(plant time\)/);
  const { scroll, inner } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
  expect(scroll).toBeLessThanOrEqual(inner);
  await banner.scrollIntoViewIfNeeded();
  await snap(page, "phone-390-floor-dry-air");

  await page.context().clearCookies();
  await signIn(page, "viewer");
  await page.goto("/floor");
  await expect(page.getByRole("heading", { name: "Floor" })).toBeVisible();
  await expect(page.getByTestId("dry-air-warning")).toHaveCount(0);
});
