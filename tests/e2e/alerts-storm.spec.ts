// A storm on the Alerts page: four alerts of the Press Hall that on call got in one message
// (they share alerts.notify_group, as ingest/alerts-notify-send.ts writes it) show as one group
// with its title, count and time span, opening to the four alerts, at the desk (1366 px) and on a
// phone (390 px) without sideways scrolling; an alert of the group says what it went with.
import type { Page } from "@playwright/test";
import { expect, signIn, snap, test } from "./helpers";
import { testPool } from "./line-fixtures";

const TITLE = /^Press Hall: RH 23 % and 3 points over on Gravure Press 1$/;
const ids: number[] = [];
let groupKey = "";

test.beforeAll(async () => {
  const pool = testPool();
  const [pts] = await pool.query(
    "SELECT p.id AS pointId, l.id AS lineId, l.area_id AS areaId FROM points p JOIN `lines` l ON l.id = p.line_id WHERE l.slug = 'gravure-1' ORDER BY p.position LIMIT 3",
  );
  const at = pts as Array<{ pointId: number; lineId: number; areaId: number }>;
  const ruleOf = async (kind: string) => ((await pool.query("SELECT id FROM rules WHERE kind = ? ORDER BY id LIMIT 1", [kind]))[0] as Array<{ id: number }>)[0].id;
  const t0 = Date.now() - 9 * 60_000;
  const rows = [
    { kind: "rh_low", severity: "medium", subject_key: `area:${at[0].areaId}`, line_id: null, point_id: null, message: "Hall humidity 23.4 % RH, under the 30 % limit", start_ts: t0, peak_value: 23.4 },
    { kind: "charge_high", severity: "medium", subject_key: `point:${at[0].pointId}`, line_id: at[0].lineId, point_id: at[0].pointId, message: "Charge −14.2 kV at Unwind, over the 12 kV limit", start_ts: t0 + 40_000, peak_value: -14.2 },
    { kind: "charge_high", severity: "high", subject_key: `point:${at[1].pointId}`, line_id: at[1].lineId, point_id: at[1].pointId, message: "Charge −21.5 kV at Infeed idlers, over the 20 kV limit", start_ts: t0 + 80_000, peak_value: -21.5 },
    { kind: "charge_high", severity: "medium", subject_key: `point:${at[2].pointId}`, line_id: at[2].lineId, point_id: at[2].pointId, message: "Charge +13.1 kV at Dryer exit, over the 12 kV limit", start_ts: t0 + 170_000, peak_value: 13.1 },
  ];
  for (const r of rows) {
    const [res] = await pool.query("INSERT INTO alerts SET ?", [{ ...r, rule_id: await ruleOf(r.kind), rule_version: 1, area_id: at[0].areaId, state: "active_unacked", notified_level: 1 }]);
    ids.push(Number((res as { insertId: number }).insertId));
  }
  groupKey = `area:${at[0].areaId}:${t0}:${ids[0]}`;
  await pool.query("UPDATE alerts SET notify_group = ? WHERE id IN (?)", [groupKey, ids]);
  for (const [i, id] of ids.entries()) {
    await pool.query("INSERT INTO alert_events (alert_id, ts, kind, value) VALUES (?, ?, 'raised', ?)", [id, rows[i].start_ts, String(rows[i].peak_value)]);
    await pool.query("INSERT INTO alert_events (alert_id, ts, kind, comment, value) VALUES (?, ?, 'notified', ?, '1')", [
      id,
      t0 + 5 * 60_000,
      'Order 1: Dana Fairweather <oncall@harrowfen.example>; sent together with 3 other alerts as "Press Hall: RH 23 % and 3 points over on Gravure Press 1"',
    ]);
  }
  await pool.end();
});

test.afterAll(async () => {
  // leave the shared test plant as the other specs expect it
  const pool = testPool();
  await pool.query("DELETE FROM alert_events WHERE alert_id IN (?)", [ids]);
  await pool.query("DELETE FROM alerts WHERE id IN (?)", [ids]);
  await pool.end();
});

async function noSidewaysScroll(page: Page) {
  const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
  expect(widths.scroll).toBeLessThanOrEqual(widths.client);
}

test.describe("at the desk", () => {
  test.use({ viewport: { width: 1366, height: 900 } });

  test("the storm is one group: title, count and span; opening it lists the four alerts", async ({ page }) => {
    await signIn(page, "shift_lead");
    await page.goto("/alerts");
    const group = page.locator(`[data-testid="alert-group"][data-group-key="${groupKey}"]`);
    await expect(group).toBeVisible();
    await expect(group).toHaveAttribute("data-count", "4");
    await expect(group.getByTestId("alert-group-title")).toHaveText(TITLE);
    await expect(group).toContainText("Sent together · 4 alerts");
    await expect(group).toContainText("within 2 min 50 s");
    await expect(group).toContainText("4 not acknowledged");
    for (const id of ids) await expect(page.locator(`[data-testid="alert-row"][data-alert-id="${id}"]`)).toHaveCount(0);
    await snap(page, "storm-desk-closed");

    const toggle = group.getByTestId("alert-group-toggle");
    await expect(toggle).toHaveAttribute("aria-expanded", "false");
    await toggle.click();
    await expect(toggle).toHaveAttribute("aria-expanded", "true");
    for (const id of ids) await expect(page.locator(`[data-testid="alert-row"][data-alert-id="${id}"]`)).toBeVisible();
    await snap(page, "storm-desk-open");
  });

  test("an alert of the group says what it was sent together with", async ({ page }) => {
    await signIn(page, "viewer");
    await page.goto(`/alerts/${ids[1]}`);
    const together = page.getByTestId("alert-sent-together");
    await expect(together).toContainText("Sent together with 3 other alerts");
    await expect(together).toContainText("Press Hall: RH 23 % and 3 points over on Gravure Press 1");
    for (const id of [ids[0], ids[2], ids[3]]) await expect(together.locator(`a[href="/alerts/${id}"]`)).toBeVisible();
    await expect(together.locator(`a[href="/alerts/${ids[1]}"]`)).toHaveCount(0);
    await snap(page, "storm-alert-page-desk");
  });
});

test.describe("on a phone", () => {
  test.use({ viewport: { width: 390, height: 844 } });

  test("the storm is one card that opens to the alerts' cards, with nothing off the side", async ({ page }) => {
    await signIn(page, "shift_lead");
    await page.goto("/alerts");
    const group = page.locator(`[data-testid="alert-group"][data-group-key="${groupKey}"]`);
    await group.scrollIntoViewIfNeeded();
    await expect(group.getByTestId("alert-group-title")).toHaveText(TITLE);
    await expect(group).toContainText("Sent together · 4 alerts");
    await noSidewaysScroll(page);
    await snap(page, "storm-phone-closed");
    await group.getByTestId("alert-group-toggle").click();
    for (const id of ids) await expect(group.locator(`[data-testid="alert-card"][data-alert-id="${id}"]`)).toBeVisible();
    await noSidewaysScroll(page);
    await group.scrollIntoViewIfNeeded();
    await snap(page, "storm-phone-open");
    await page.goto(`/alerts/${ids[0]}`);
    await expect(page.getByTestId("alert-sent-together")).toContainText("Sent together with 3 other alerts");
    await noSidewaysScroll(page);
    await snap(page, "storm-alert-page-phone");
  });
});

test.describe("answering a storm", () => {
  test.use({ viewport: { width: 1366, height: 900 } });

  test("a viewer sees the group but no acknowledge; a shift lead acknowledges all four at once", async ({ page }) => {
    await signIn(page, "viewer");
    await page.goto("/alerts");
    const group = page.locator(`[data-testid="alert-group"][data-group-key="${groupKey}"]`);
    await expect(group.getByTestId("alert-group-title")).toHaveText(TITLE);
    await expect(group.getByRole("button", { name: /Acknowledge/ })).toHaveCount(0);
    await page.context().clearCookies();

    await signIn(page, "shift_lead");
    await page.goto("/alerts");
    await group.getByRole("button", { name: "Acknowledge all 4" }).click();
    await expect(group).toContainText("all acknowledged", { timeout: 15_000 });
    await group.getByTestId("alert-group-toggle").click();
    for (const id of ids) await expect(page.locator(`[data-testid="alert-row"][data-alert-id="${id}"]`)).toHaveAttribute("data-state", "active_acked");
    await expect(page.locator(`[data-testid="alert-row"][data-alert-id="${ids[2]}"]`)).toContainText("Acked by Sam Okafor");
    await snap(page, "storm-desk-acknowledged");
  });
});
