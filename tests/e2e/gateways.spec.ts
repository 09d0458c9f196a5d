// The Gateways page with the demo's Sparkplug gateway (seeded by db/seed-gateway.ts) brought to
// life by a simulated edge node (simulators/sparkplug-edge-node.ts) on the test stack's broker:
// it lists the node, its devices and metrics with last values; an engineer saves a mapping and
// a viewer sees the mappings without any form; no sideways scroll at desk or 390 px width. The
// node also plays a 20-minute outage on Labeller LB1 and uploads it as historical metrics: the
// line page shows the span filled. Screenshots go to .data/screenshots.
import fs from "node:fs";
import type { Page } from "@playwright/test";
import { readDeviceSecrets } from "../../db/seed";
import { DEMO_GATEWAY, DEMO_GATEWAY_METRICS } from "../../lib/demo-gateway";
import { EdgeNode, type EdgeDeviceSpec } from "../../simulators/sparkplug-edge-node";
import { signIn, expect, test } from "./helpers";
import { testPool } from "./line-fixtures";

const SHOTS = ".data/screenshots";
const MIN = 60_000;
let node: EdgeNode | null = null;
let labellerId = 0;

async function shot(page: Page, name: string) {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: `${SHOTS}/${name}.png`, fullPage: true });
}

async function noSideways(page: Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow, "the page scrolls sideways").toBeLessThanOrEqual(0);
}

/** Labeller LB1's values as its gateway sends them (V, m/min, running, N). */
function valuesAt(deviceName: string, ts: number): Record<string, number | boolean> {
  const wave = Math.sin(ts / 90_000);
  if (deviceName === "liner-unwind-meter") return { Charge: Math.round(-9000 - 2500 * wave) };
  if (deviceName === "dispense-meter") return { Charge: Math.round(-4000 - 1200 * wave) };
  return { "Line speed": 58 + 2 * wave, Running: true, "Web tension": 49.5 };
}

test.describe.configure({ mode: "default" });

test.beforeAll(async () => {
  test.setTimeout(180_000);
  const pool = testPool();
  const [rows] = await pool.query("SELECT id FROM `lines` WHERE slug = 'labeller-1'");
  labellerId = Number((rows as Array<{ id: number }>)[0].id);
  await pool.end();
  const specs: EdgeDeviceSpec[] = [...new Set(DEMO_GATEWAY_METRICS.map((m) => m.deviceName))].map((name) => ({
    name,
    metrics: DEMO_GATEWAY_METRICS.filter((m) => m.deviceName === name).map((m) => ({ name: m.name, datatype: m.datatype, ...(m.unit ? { unit: m.unit } : {}) })),
  }));
  const secret = readDeviceSecrets(process.env.DB_NAME)[DEMO_GATEWAY.code];
  node = new EdgeNode({ port: Number(process.env.MQTT_PORT ?? 1894), code: DEMO_GATEWAY.code, secret, groupId: DEMO_GATEWAY.groupId, nodeId: DEMO_GATEWAY.nodeId, devices: specs });
  await node.connect();
  // 45 → 25 minutes ago live, 25 → 5 minutes ago buffered through an outage and uploaded as
  // historical metrics once back, then live again up to now (every 5 s)
  const now = Date.now();
  const send = async (from: number, to: number) => {
    for (let ts = from; ts < to; ts += 5000) for (const d of specs) await node!.data(d.name, valuesAt(d.name, ts), ts);
  };
  await send(now - 45 * MIN, now - 25 * MIN);
  node.drop();
  node.offline = true;
  await send(now - 25 * MIN, now - 5 * MIN);
  await node.connect();
  node.offline = false;
  await node.uploadBuffer(60);
  await send(now - 5 * MIN, now);
});

test.afterAll(async () => {
  await node?.stop().catch(() => undefined);
});

const nodeCard = (page: Page) => page.locator(`[data-testid="edge-node"][data-code="${DEMO_GATEWAY.code}"]`);

test("the Gateways page lists the node, its devices and metrics; an engineer saves a mapping", async ({ page }) => {
  await signIn(page, "engineer");
  await page.goto("/gateways");
  await expect(page.getByRole("heading", { name: "Gateways", exact: true })).toBeVisible();
  const card = nodeCard(page);
  await expect(card).toContainText(DEMO_GATEWAY.label);
  await expect(card).toContainText(`${DEMO_GATEWAY.groupId}/${DEMO_GATEWAY.nodeId}`);
  for (const d of ["liner-unwind-meter", "dispense-meter", "drive"]) await expect(card).toContainText(d);
  await expect(card.getByTestId("metric-row")).toHaveCount(DEMO_GATEWAY_METRICS.length);
  // last values with their units, and the unmapped metric still listed; the worker stores last
  // values about once a second, so the page may have been drawn before the newest were in
  await expect(async () => {
    await page.reload();
    await expect(nodeCard(page).locator('[data-metric="drive/Web tension"]')).toContainText("49.5 N", { timeout: 1000 });
  }).toPass({ timeout: 20_000 });
  await expect(card.getByLabel("Device for drive Web tension")).toHaveValue("");
  await noSideways(page);
  await shot(page, "gateways-1366");

  // change the conversion of one mapping, save, and see it kept after a reload; then put it back
  const row = card.locator('[data-metric="liner-unwind-meter/Charge"]');
  const conversion = row.getByLabel("Conversion for Charge");
  await expect(conversion).toHaveValue("v_to_kv");
  await conversion.selectOption("none");
  await row.getByRole("button", { name: "Save" }).click();
  await expect(row).toContainText("Saved");
  await page.reload();
  await expect(nodeCard(page).locator('[data-metric="liner-unwind-meter/Charge"]').getByLabel("Conversion for Charge")).toHaveValue("none");
  const again = nodeCard(page).locator('[data-metric="liner-unwind-meter/Charge"]');
  await again.getByLabel("Conversion for Charge").selectOption("v_to_kv");
  await again.getByRole("button", { name: "Save" }).click();
  await expect(again).toContainText("Saved");
});

test("a viewer sees the mappings but no form to change them", async ({ page }) => {
  await signIn(page, "viewer");
  await page.goto("/gateways");
  const card = nodeCard(page);
  await expect(card.getByTestId("metric-row")).toHaveCount(DEMO_GATEWAY_METRICS.length);
  await expect(card.locator('[data-metric="dispense-meter/Charge"]')).toContainText("charge_kv");
  await expect(card.locator('[data-metric="drive/Web tension"]')).toContainText("Not mapped");
  await expect(card.getByRole("button", { name: "Save" })).toHaveCount(0);
  await expect(card.locator("select")).toHaveCount(0);
});

test("at 390 px the Gateways page does not scroll sideways (the metric table scrolls in its card)", async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 });
  await signIn(page, "engineer");
  await page.goto("/gateways");
  await expect(nodeCard(page).getByTestId("metric-row").first()).toBeVisible();
  await noSideways(page);
  await shot(page, "gateways-390");
});

test("the line page shows the outage filled by the historical upload", async ({ page }) => {
  await signIn(page, "viewer");
  // the last 50 minutes: live before the outage, the uploaded 20 minutes, live again
  const to = Date.now();
  const url = `/lines/${labellerId}?range=custom&from=${to - 50 * MIN}&to=${to}`;
  await page.goto(url);
  await expect(page.getByRole("heading", { name: "Labeller LB1" })).toBeVisible();
  const charge = page.locator('[data-testid="line-chart"][data-kind="charge"]').first();
  await expect(charge).toBeVisible();
  await expect.poll(async () => Number(await charge.getAttribute("data-points")), { timeout: 20_000 }).toBeGreaterThan(100);
  await noSideways(page);
  await shot(page, "line-labeller-filled-1366");
  await page.setViewportSize({ width: 390, height: 844 });
  await page.goto(url);
  await expect(page.locator('[data-testid="line-chart"][data-kind="charge"]').first()).toBeVisible();
  await noSideways(page);
  await shot(page, "line-labeller-filled-390");
});
