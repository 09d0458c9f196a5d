// Planned work: an engineer plans work on a line from the line page, sees it on the Planned work
// page and as a hatched band on the line's charts (and on a phone); a viewer sees the windows but
// no form, and the API refuses them (403). Screenshots go to /tmp/shots-maint (outside the repo).
import fs from "node:fs";
import type { Page } from "@playwright/test";
import { apiAs, demoPerson, signIn, expect, test } from "./helpers";
import { listFixtureDevices, testPool, writeFixtureHistory } from "./line-fixtures";

const SHOTS = "/tmp/shots-maint";
const REASON = "Cleaning the bars at the unwind";
const HOUR = 3_600_000;
let lineId = 0;
let engineerId = 0;

test.describe.configure({ mode: "serial" });

test.beforeAll(async () => {
  test.setTimeout(240_000);
  fs.mkdirSync(SHOTS, { recursive: true });
  const pool = testPool();
  const [rows] = await pool.query("SELECT id, area_id AS areaId FROM `lines` WHERE slug = 'gravure-1'");
  const line = (rows as Array<{ id: number; areaId: number }>)[0];
  lineId = Number(line.id);
  const [who] = await pool.query("SELECT id FROM people WHERE email = ?", [demoPerson("engineer").email]);
  engineerId = Number((who as Array<{ id: number }>)[0].id);
  // a day of invented history for the line's sensors and its hall's logger, so the band sits on real curves
  const devices = (await listFixtureDevices(pool)).filter((d) => d.lineId === lineId || d.areaId === Number(line.areaId));
  const now = Date.now();
  await writeFixtureHistory(pool, devices, { fromTs: now - 26 * HOUR, toTs: now, rawMs: 5 * 60_000 });
  await pool.end();
});

async function noSideScroll(page: Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow, "page scrolls sideways").toBeLessThanOrEqual(1);
}

test("an engineer plans work on a line from its page; it is listed as running and drawn as a band on the line's charts", async ({ page }) => {
  await signIn(page, "engineer");
  await page.goto(`/lines/${lineId}`);
  await page.getByTestId("plan-work-link").click();
  await expect(page).toHaveURL(new RegExp(`/maintenance\\?target=line:${lineId}`));
  await expect(page.getByTestId("maint-target")).toHaveValue(`line:${lineId}`);
  await page.getByLabel("What is being done").fill(REASON);
  await page.getByRole("button", { name: "Plan the work" }).click();
  await expect(page.getByTestId("form-ok")).toContainText("Planned work saved");
  const running = page.getByTestId("maint-active").getByTestId("maint-window").filter({ hasText: REASON });
  await expect(running).toHaveCount(1);
  await expect(running).toContainText("Gravure Press 1");
  await expect(running).toHaveAttribute("data-status", "active");
  await expect(running.getByRole("button", { name: "End now" })).toBeVisible();

  // more than 12 h needs a reason: refused next to the field
  await page.getByLabel("What is being done").fill("Press rebuild");
  const planForm = page.locator("form").filter({ has: page.getByRole("button", { name: "Plan the work" }) });
  const start = await planForm.getByLabel("Start (plant time)").inputValue();
  const later = new Date(Date.parse(`${start}:00Z`) + 13 * HOUR).toISOString().slice(0, 16);
  await planForm.getByLabel("End (plant time)").fill(later);
  await page.getByRole("button", { name: "Plan the work" }).click();
  await expect(page.getByTestId("form-error")).toBeVisible();
  await expect(page.getByText("Longer than 12 h needs a reason.")).toBeVisible();
  await expect(planForm.getByText(/More than 12 h: tick/)).toBeVisible();
  // what was typed stays for the correction
  await expect(planForm.getByLabel("End (plant time)")).toHaveValue(later);
  await expect(planForm.getByLabel("What is being done")).toHaveValue("Press rebuild");
  // and the target and owner are still the ones chosen (a form reset must not move them to the first option)
  await expect(page.getByTestId("maint-target")).toHaveValue(`line:${lineId}`);
  await expect(planForm.getByLabel("Owner")).toHaveValue(String(engineerId));
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: `${SHOTS}/planned-work-1366.png`, fullPage: true });

  // as if the work had been done earlier today: the band then sits inside the 24 h chart
  const pool = testPool();
  const now = Date.now();
  await pool.query("UPDATE maintenance_windows SET start_ts = ?, end_ts = ? WHERE reason = ?", [now - 6 * HOUR, now - 3 * HOUR, REASON]);
  await pool.end();
  await page.goto(`/lines/${lineId}?range=24h`);
  const charge = page.locator('[data-testid="line-chart"][data-kind="charge"]');
  await expect(charge.first()).toHaveAttribute("data-planned-work", "1");
  await expect(charge).toHaveCount(4);
  for (const c of await charge.all()) await expect(c).toHaveAttribute("data-planned-work", "1");
  await expect(charge.first()).not.toHaveAttribute("data-points", "0");
  await expect(page.getByTestId("planned-work-list")).toContainText(`Gravure Press 1: ${REASON}`);
  await page.waitForTimeout(500);
  await page.screenshot({ path: `${SHOTS}/line-band-1366.png`, fullPage: false });

  // the Planned work page now lists it as ended
  await page.goto("/maintenance");
  await expect(page.getByTestId("maint-recent").getByTestId("maint-window").filter({ hasText: REASON })).toHaveAttribute("data-status", "ended");
});

test("a viewer sees planned work but no form, and the API refuses them (403)", async ({ page, baseURL }) => {
  await signIn(page, "viewer");
  await page.goto("/maintenance");
  await expect(page.getByTestId("maint-read-only")).toBeVisible();
  await expect(page.getByRole("button", { name: "Plan the work" })).toHaveCount(0);
  await expect(page.getByTestId("maint-window").filter({ hasText: REASON })).toHaveCount(1);
  await expect(page.getByRole("button", { name: "End now" })).toHaveCount(0);
  await page.goto(`/lines/${lineId}`);
  await expect(page.getByRole("heading", { name: "Gravure Press 1" })).toBeVisible();
  await expect(page.getByTestId("plan-work-link")).toHaveCount(0);

  const api = await apiAs(baseURL!, "viewer");
  const list = await api.get("/api/maintenance");
  expect(list.status()).toBe(200);
  const body = (await list.json()) as { recent: Array<{ id: number; reason: string }> };
  const ours = body.recent.find((w) => w.reason === REASON);
  expect(ours).toBeTruthy();
  const now = Date.now();
  const open = await api.post("/api/maintenance", { headers: { origin: baseURL! }, data: { targetKind: "line", targetId: lineId, ownerId: 1, reason: "Not allowed", startTs: now, endTs: now + HOUR } });
  expect(open.status()).toBe(403);
  const end = await api.post(`/api/maintenance/${ours!.id}/end`, { headers: { origin: baseURL! } });
  expect(end.status()).toBe(403);
  await api.dispose();

  // the same request from a shift lead is accepted (the 403 above is about the role, not the request)
  const lead = await apiAs(baseURL!, "shift_lead");
  const ok = await lead.post("/api/maintenance", { headers: { origin: baseURL! }, data: { targetKind: "line", targetId: lineId, ownerId: 1, reason: "Changing the web guide", startTs: now, endTs: now + HOUR } });
  expect(ok.status()).toBe(201);
  await lead.dispose();
});

test("after recording a cleaning on a bar, the page offers to plan work on that bar, prefilled", async ({ page }) => {
  const pool = testPool();
  const [rows] = await pool.query("SELECT n.id, n.tag FROM neutralizers n JOIN points p ON p.id = n.point_id WHERE p.line_id = ? ORDER BY p.position LIMIT 1", [lineId]);
  await pool.end();
  const bar = (rows as Array<{ id: number; tag: string }>)[0];
  await signIn(page, "engineer");
  await page.goto(`/equipment/${bar.id}`);
  await expect(page.getByTestId("plan-work-link")).toHaveAttribute("href", `/maintenance?target=neutralizer:${bar.id}#plan`);
  await expect(page.getByTestId("cleaned-plan-offer")).toHaveCount(0);
  await page.getByRole("button", { name: "Record cleaning" }).click();
  await page.getByTestId("cleaned-plan-offer").getByRole("link", { name: "Plan work on this bar" }).click();
  await expect(page).toHaveURL(new RegExp(`/maintenance\\?target=neutralizer:${bar.id}`));
  await expect(page.getByTestId("maint-target")).toHaveValue(`neutralizer:${bar.id}`);
  await expect(page.getByLabel("What is being done")).toHaveValue("Bar cleaned; settling");
});

test.describe("on a phone (390 px)", () => {
  test.use({ viewport: { width: 390, height: 844 } });

  test("the Planned work page and the line chart with its band fit the screen", async ({ page }) => {
    await signIn(page, "engineer");
    await page.goto("/maintenance");
    await expect(page.getByRole("button", { name: "Plan the work" })).toBeVisible();
    await expect(page.getByTestId("maint-active").getByTestId("maint-window").filter({ hasText: "Changing the web guide" })).toHaveCount(1);
    await noSideScroll(page);
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: `${SHOTS}/planned-work-390.png`, fullPage: true });

    await page.goto(`/lines/${lineId}?range=24h`);
    const charge = page.locator('[data-testid="line-chart"][data-kind="charge"]');
    // the ended window and the running one (from the shift lead above)
    await expect(charge.first()).toHaveAttribute("data-planned-work", "2");
    await noSideScroll(page);
    await page.waitForTimeout(500);
    await page.screenshot({ path: `${SHOTS}/line-band-390.png`, fullPage: false });
  });
});
