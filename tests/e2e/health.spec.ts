// The Health page: an admin sees each process of the test stack with its figures and since when
// it runs (a restart shows as a recent start), at desk and phone widths; other roles are refused.
import { expect, signIn, snap, test } from "./helpers";

for (const width of [1366, 390]) {
  test(`an admin sees the broker, the worker and since when they run (${width} px)`, async ({ page }) => {
    await page.setViewportSize({ width, height: width > 500 ? 900 : 844 });
    await signIn(page, "admin");
    await page.goto("/health");
    await expect(page.getByRole("heading", { name: "Health" })).toBeVisible();
    const worker = page.getByTestId("health-worker").first();
    const broker = page.getByTestId("health-broker").first();
    // right after the stack starts the worker and the broker may not have written their first
    // figures yet (the broker writes its first after 10 s)
    await expect(async () => {
      if (!(await worker.isVisible()) || !(await broker.isVisible())) await page.reload();
      await expect(worker).toContainText("Running since", { timeout: 1000 });
      await expect(broker).toContainText("Running since", { timeout: 1000 });
    }).toPass({ timeout: 40_000 });
    // the test stack's worker started minutes ago at most: a recent start, in UTC
    await expect(worker).toContainText(/Running since\s*\d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC \(/);
    await expect(worker).toContainText("Readings stored per second");
    await expect(worker).toContainText("Reading age when stored, p95");
    await expect(broker).toContainText("Clients connected");
    // one worker and no lease: the rules run in that worker, and the card names it
    const workerId = (await page.getByRole("heading", { name: /^Ingest worker / }).first().textContent())!.replace("Ingest worker", "").trim();
    await expect(page.getByTestId("health-owner")).toContainText(`Rules run in${workerId}`);
    await expect(page.getByTestId("health-owner")).toContainText("its own readings, no lease (one worker)");
    await expect(page.getByTestId("health-verdict")).toBeVisible();
    // nothing wider than the screen
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width);
    await snap(page, `health-admin-${width}`);
  });
}

test("a shift lead is refused the Health page", async ({ page }) => {
  await signIn(page, "shift_lead");
  await page.goto("/health");
  await expect(page.getByText("Not allowed (403)")).toBeVisible();
  await expect(page.getByTestId("health-worker")).toHaveCount(0);
});
