// Alerts in the browser: a shift lead acknowledges one alert and shelves another from
// the list; a viewer sees the list but cannot acknowledge (no buttons, and 403 from the API as
// well); the alert-load and on-call pages render. Alerts are written straight into the stack's
// test database (as the alerts runner would), so the test does not wait for real excursions.
import type mysql from "mysql2/promise";
import { apiAs, signIn, snap, expect, test } from "./helpers";
import { testPool } from "./line-fixtures";

test.describe.configure({ mode: "serial" });

let chargeAlertId = 0;
let forecastAlertId = 0;
let viewerTargetId = 0;

async function insertAlert(pool: mysql.Pool, values: Record<string, unknown>): Promise<number> {
  const [res] = await pool.query("INSERT INTO alerts SET ?", [values]);
  const id = Number((res as { insertId: number }).insertId);
  await pool.query("INSERT INTO alert_events (alert_id, ts, kind, value) VALUES (?, ?, 'raised', ?)", [id, values.start_ts, String(values.peak_value)]);
  return id;
}

test.beforeAll(async () => {
  const pool = testPool();
  const [rows] = await pool.query(
    "SELECT p.id AS pointId, l.id AS lineId, l.area_id AS areaId FROM points p JOIN `lines` l ON l.id = p.line_id WHERE l.slug = 'gravure-1' AND p.position = 1",
  );
  const at = (rows as Array<{ pointId: number; lineId: number; areaId: number }>)[0];
  const [rules] = await pool.query("SELECT id, kind FROM rules WHERE point_id IS NULL AND line_id IS NULL AND area_id IS NULL ORDER BY id");
  const ruleOf = (kind: string) => (rules as Array<{ id: number; kind: string }>).find((r) => r.kind === kind)!.id;
  const now = Date.now();
  chargeAlertId = await insertAlert(pool, {
    rule_id: ruleOf("charge_high"),
    rule_version: 1,
    kind: "charge_high",
    severity: "high",
    subject_key: `point:${at.pointId}`,
    area_id: at.areaId,
    line_id: at.lineId,
    point_id: at.pointId,
    state: "active_unacked",
    message: "Charge −22.4 kV at Unwind on Gravure Press 1, over the 20 kV limit",
    start_ts: now - 6 * 60_000,
    peak_value: -23.1,
  });
  forecastAlertId = await insertAlert(pool, {
    rule_id: ruleOf("rh_forecast"),
    rule_version: 1,
    kind: "rh_forecast",
    severity: "medium",
    subject_key: `area:${at.areaId}`,
    area_id: at.areaId,
    state: "active_unacked",
    message: "Relative humidity in Press Hall is 34.2 % and falling 0.09 %/min: expected under the 30 % limit in about 47 min",
    start_ts: now - 12 * 60_000,
    peak_value: 34.2,
    expected_crossing_ts: now + 47 * 60_000,
  });
  viewerTargetId = await insertAlert(pool, {
    rule_id: ruleOf("sensor_silent"),
    rule_version: 1,
    kind: "sensor_silent",
    severity: "medium",
    subject_key: "sensor:fm-slitter-1-knife-exit",
    state: "active_unacked",
    message: "No data from fm-slitter-1-knife-exit (Knife exit on Slitter-Rewinder S1) for 3 min",
    start_ts: now - 3 * 60_000,
    peak_value: 180,
  });
  await pool.end();
});

test("a shift lead acknowledges one alert and shelves another from the list", async ({ page }) => {
  await signIn(page, "shift_lead");
  await page.goto("/alerts");
  const charge = page.locator(`[data-testid="alert-row"][data-alert-id="${chargeAlertId}"]`);
  const forecast = page.locator(`[data-testid="alert-row"][data-alert-id="${forecastAlertId}"]`);
  await expect(charge).toBeVisible();
  await expect(charge).toHaveAttribute("data-state", "active_unacked");
  await expect(charge).toContainText("Charge over limit");
  await expect(charge).toContainText("−23.1 kV");
  await expect(charge.getByTestId("alert-line-link")).toHaveAttribute("href", /\/lines\/\d+\?at=\d+/);
  // open alerts first: the high-severity one above the medium one
  const order = await page.locator('[data-testid="alert-row"]').evaluateAll((rows) => rows.map((r) => Number(r.getAttribute("data-alert-id"))));
  expect(order.indexOf(chargeAlertId)).toBeLessThan(order.indexOf(forecastAlertId));
  await snap(page, "alerts");

  await charge.getByRole("button", { name: "Acknowledge" }).click();
  await expect(charge).toHaveAttribute("data-state", "active_acked", { timeout: 15_000 });
  await expect(charge).toContainText("Acked by Sam Okafor");

  await forecast.getByTestId("alert-details-toggle").click();
  const detail = page.getByTestId("alert-detail");
  await expect(detail).toBeVisible();
  await detail.getByLabel("For").selectOption("120");
  await detail.getByLabel("Reason").fill("Humidifier being refilled, hall manager informed");
  await detail.getByRole("button", { name: "Shelve alert" }).click();
  await expect(forecast).toHaveAttribute("data-shelved", "true", { timeout: 15_000 });
  await expect(forecast).toContainText("Shelved until");
  await expect(page.getByTestId("alert-events")).toContainText("Shelved by Sam Okafor");
  await expect(page.getByTestId("alert-events")).toContainText("Humidifier being refilled");
  await snap(page, "alerts-shelved");

  // the lead's actions are in the alert's history from the API too
  const res = await page.request.get(`/api/alerts/${chargeAlertId}`);
  expect(res.status()).toBe(200);
  const body = (await res.json()) as { alert: { state: string; events: Array<{ kind: string; personName: string | null }> } };
  expect(body.alert.state).toBe("active_acked");
  expect(body.alert.events.map((e) => [e.kind, e.personName])).toContainEqual(["acknowledged", "Sam Okafor"]);
});

test("a viewer sees alerts but cannot acknowledge them (403 from the API as well)", async ({ page, baseURL }) => {
  await signIn(page, "viewer");
  await page.goto("/alerts");
  const row = page.locator(`[data-testid="alert-row"][data-alert-id="${viewerTargetId}"]`);
  await expect(row).toBeVisible();
  await expect(row.getByRole("button", { name: "Acknowledge" })).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Acknowledge" })).toHaveCount(0);

  const viewer = await apiAs(baseURL!, "viewer");
  for (const [path, body] of [
    ["ack", {}],
    ["comment", { comment: "seen" }],
    ["shelve", { durationMin: 60, reason: "nuisance" }],
    ["unshelve", {}],
  ] as const) {
    const res = await viewer.post(`/api/alerts/${viewerTargetId}/${path}`, { data: body });
    expect(res.status(), path).toBe(403);
  }
  const still = await viewer.get(`/api/alerts/${viewerTargetId}`);
  expect(((await still.json()) as { alert: { state: string } }).alert.state).toBe("active_unacked");

  // a shift lead's API call with the same body works
  const lead = await apiAs(baseURL!, "shift_lead");
  const ok = await lead.post(`/api/alerts/${viewerTargetId}/comment`, { data: { comment: "Meter cable checked" } });
  expect(ok.status()).toBe(200);
  const bad = await lead.post(`/api/alerts/${viewerTargetId}/shelve`, { data: { durationMin: 60 } });
  expect(bad.status()).toBe(400);
});

test("the alert-load and on-call pages show the figures and the roster", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/alert-load");
  await expect(page.getByRole("heading", { name: "Alert load" })).toBeVisible();
  await expect(page.getByTestId("load-verdict")).toContainText("alerts per 10 minutes");
  await expect(page.getByText("EEMUA Publication 191", { exact: false })).toBeVisible();
  await snap(page, "alert-load");
  await page.goto("/oncall");
  await expect(page.getByTestId("oncall-now")).toBeVisible();
  await expect(page.getByTestId("roster")).toBeVisible();
  await expect(page.getByRole("button", { name: "Add to roster" })).toBeVisible();
  await snap(page, "oncall");
});
