// The Floor: a viewer sees every demo line with values that change while the plant
// simulator runs, each state as a word and a shape, and the halls' climate. Screenshots at
// 1366×768 and 1920×1080 go to the test output.
import type { Page } from "@playwright/test";
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

async function pointTimes(page: Page): Promise<Map<string, number>> {
  const rows = await page.getByTestId("point-value").evaluateAll((els) =>
    els.map((el) => [el.closest("[data-point-id]")?.getAttribute("data-point-id") ?? "", Number(el.getAttribute("data-ts") || 0), el.getAttribute("data-value") ?? ""] as const),
  );
  return new Map(rows.filter((r) => r[2] !== "").map((r) => [r[0], r[1]]));
}

test("a viewer sees every demo line with values that change while the simulator runs", async ({ page }) => {
  await signIn(page, "viewer");
  await expect(page.getByRole("heading", { name: "Floor" })).toBeVisible();
  for (const a of DEMO_AREAS) await expect(page.getByRole("heading", { name: a.name })).toBeVisible();
  for (const l of DEMO_LINES) {
    const card = page.getByTestId("floor-line").filter({ has: page.getByRole("link", { name: l.name, exact: true }) });
    await expect(card).toBeVisible();
    await expect(card.getByTestId("floor-point")).toHaveCount(l.points.length);
    await expect(card.getByTestId("floor-point").first()).toContainText(l.points[0].name);
    // solvent lines show the spark-energy margin at their worst charge; the others do not
    if (l.solventName) await expect(card.getByTestId("spark-margin")).toContainText(`${l.solventName} MIE ${l.solventMieMj} mJ`);
    else await expect(card.getByTestId("spark-margin")).toHaveCount(0);
  }
  await expect(page.getByTestId("stream-status")).toHaveAttribute("data-status", "live", { timeout: 20_000 });

  // nearly every sensor has a value (the scenario may silence one), and the values move
  const total = DEMO_LINES.reduce((n, l) => n + l.points.length, 0);
  await expect.poll(async () => (await pointTimes(page)).size, { timeout: 30_000 }).toBeGreaterThanOrEqual(total - 2);
  const before = await pointTimes(page);
  await page.waitForTimeout(5_000);
  const after = await pointTimes(page);
  const moved = [...after].filter(([id, ts]) => ts > (before.get(id) ?? 0)).map(([id]) => id);
  expect(moved.length).toBeGreaterThanOrEqual(total - 2);
  for (const l of DEMO_LINES) {
    const card = page.getByTestId("floor-line").filter({ has: page.getByRole("link", { name: l.name, exact: true }) });
    const ids = await card.getByTestId("floor-point").evaluateAll((els) => els.map((e) => e.getAttribute("data-point-id") ?? ""));
    expect(ids.some((id) => moved.includes(id)), `${l.name} has a changing value`).toBe(true);
    await expect(card.locator("[data-run]")).toHaveAttribute("data-run", /running|stopped/);
  }

  // every state is a word as well as a colour
  const states = await page.getByTestId("floor-point").evaluateAll((els) => els.map((e) => [e.getAttribute("data-state"), e.textContent ?? ""] as const));
  const words: Record<string, string> = { normal: "OK", near: "Near", over: "Over", silent: "Silent", shelved: "Shelved" };
  for (const [state, text] of states) expect(text).toContain(words[state ?? "normal"]);
  // the halls' climate: RH with temperature and dew point beside it
  for (const rh of await page.getByTestId("hall-rh").all()) await expect(rh).toHaveText(/\d+(\.\d)? %/);
  await expect(page.getByText("Dew point").first()).toBeVisible();

  await snap(page, "floor-1366x768");
  await page.setViewportSize({ width: 1920, height: 1080 });
  await page.waitForTimeout(1_500);
  await snap(page, "floor-1920x1080");
});

test("signed-out visitors cannot read the floor data or the live stream", async ({ request }) => {
  expect((await request.get("/api/floor")).status()).toBe(401);
  expect((await request.get("/api/live?scope=plant")).status()).toBe(401);
  expect((await request.get("/api/history?pointId=1&from=0&to=1000")).status()).toBe(401);
});
