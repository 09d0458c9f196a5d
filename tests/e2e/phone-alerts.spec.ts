// The on-call engineer's phone (390 × 844): the navigation is one "Menu" button that opens the
// links; the Alerts page shows cards, and an alert is acknowledged from its card with the thumb;
// the alert page shows the hour's chart with the limit, the rule in words and the actions; the
// app installs (manifest with icons) and registers its service worker.
import { expect, signIn, test } from "./helpers";
import { testPool } from "./line-fixtures";

let alertId = 0;

test.beforeAll(async () => {
  const pool = testPool();
  const [pts] = await pool.query("SELECT p.id AS pointId, l.id AS lineId, l.area_id AS areaId FROM points p JOIN `lines` l ON l.id = p.line_id WHERE l.slug = 'flexo-2' AND p.position = 1");
  const at = (pts as Array<{ pointId: number; lineId: number; areaId: number }>)[0];
  const [rules] = await pool.query("SELECT id FROM rules WHERE kind = 'charge_high' AND point_id IS NULL AND line_id IS NULL AND area_id IS NULL ORDER BY id LIMIT 1");
  const now = Date.now();
  const [res] = await pool.query("INSERT INTO alerts SET ?", [
    {
      rule_id: (rules as Array<{ id: number }>)[0].id,
      rule_version: 1,
      kind: "charge_high",
      severity: "high",
      subject_key: `point:${at.pointId}`,
      area_id: at.areaId,
      line_id: at.lineId,
      point_id: at.pointId,
      state: "active_unacked",
      message: "Charge −14.1 kV at Unwind on Flexo Press 2, over the 12 kV limit",
      start_ts: now - 4 * 60_000,
      peak_value: -14.1,
    },
  ]);
  alertId = Number((res as { insertId: number }).insertId);
  await pool.query("INSERT INTO alert_events (alert_id, ts, kind, value) VALUES (?, ?, 'raised', '-14.1')", [alertId, now - 4 * 60_000]);
  await pool.end();
});

test.use({ viewport: { width: 390, height: 844 } });

test("navigation folds into a menu; an alert is acknowledged from its card", async ({ page }) => {
  await signIn(page, "shift_lead");
  await expect(page.getByTestId("nav-menu-button")).toBeVisible();
  await expect(page.getByRole("navigation", { name: "Main" })).toBeHidden();
  await page.getByTestId("nav-menu-button").click();
  await page.getByTestId("nav-menu-panel").getByRole("link", { name: "Alerts" }).click();
  await page.waitForURL("**/alerts");
  const card = page.locator(`[data-testid="alert-card"][data-alert-id="${alertId}"]`);
  await expect(card).toBeVisible();
  await expect(page.getByTestId("alerts-table")).toHaveCount(0);
  const ack = card.getByTestId("alert-ack");
  const box = await ack.boundingBox();
  expect(box!.height).toBeGreaterThanOrEqual(44); // a thumb-sized target
  await ack.click();
  await expect(card).toHaveAttribute("data-state", "active_acked");
});

test("the alert page: chart with the limit and the raise, the rule, who was told, actions", async ({ page }) => {
  await signIn(page, "shift_lead");
  await page.goto(`/alerts/${alertId}`);
  await expect(page.getByTestId("alert-page")).toBeVisible();
  const chart = page.getByTestId("alert-chart");
  await expect(chart.locator("svg")).toBeVisible();
  await expect(chart).toContainText("limit +12 kV");
  await expect(chart).toContainText("raised");
  await expect(page.getByTestId("alert-rule")).toContainText("above 12 kV");
  await expect(page.getByRole("button", { name: "Comment" })).toBeVisible();
  const link = page.getByTestId("alert-line-link");
  const href = await link.getAttribute("href");
  expect(href).toMatch(/\/lines\/\d+\?at=\d+&range=custom&from=\d+&to=\d+$/);
  await link.click();
  await page.waitForURL(/\/lines\/\d+\?/);
  // the line page opens on that range (Custom), not the live view
  await expect(page.getByRole("button", { name: "Custom" })).toHaveAttribute("aria-pressed", "true");
});

test("installs as a web app: manifest, icons and the service worker", async ({ page, request }) => {
  const manifest = await (await request.get("/manifest.webmanifest")).json();
  expect(manifest.display).toBe("standalone");
  for (const icon of manifest.icons as Array<{ src: string }>) expect((await request.get(icon.src)).headers()["content-type"]).toBe("image/png");
  const offline = await request.get("/offline.html");
  expect(await offline.text()).toContain("nothing here is live");
  await signIn(page, "viewer");
  await expect.poll(() => page.evaluate(async () => (await navigator.serviceWorker.getRegistration("/"))?.active?.scriptURL ?? ""), { timeout: 15_000 }).toContain("/sw.js");
});
