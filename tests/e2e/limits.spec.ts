// The limits editor in the browser: an engineer overrides a charge limit at one point,
// replays it over two days of recorded data (beside the current rules), saves it, edits it
// again, and the audit log shows both changes; a viewer sees the limits but no editing, and the
// API refuses a viewer's save with 403.
import { apiAs, signIn, snap, expect, test } from "./helpers";
import { testPool } from "./line-fixtures";

test.describe.configure({ mode: "serial" });

const DAY = 86_400_000;

test.beforeAll(async () => {
  test.setTimeout(180_000);
  const pool = testPool();
  const [devs] = await pool.query("SELECT id, code FROM devices WHERE code IN ('fm-gravure-1-unwind', 'sg-gravure-1')");
  const byCode = new Map((devs as Array<{ id: number; code: string }>).map((d) => [d.code, d.id]));
  const meter = byCode.get("fm-gravure-1-unwind")!;
  const gw = byCode.get("sg-gravure-1")!;
  // two days at one reading every 5 s: −6 kV ± 3 kV over hours, with an excursion to about
  // −14 kV for 18 min every 9 hours (so a 12 kV limit sees a few, a 9 kV one more)
  const now = Date.now();
  const start = now - 2 * DAY;
  const rows: Array<[number, string, number, number]> = [];
  for (let t = start; t < now - 60_000; t += 5000) {
    const h = (t - start) / 3_600_000;
    let v = -(6 + 3 * Math.sin(h / 3) + 0.4 * Math.sin(t / 7000));
    if (Math.floor(h) % 9 === 4 && h % 1 < 0.3) v -= 8;
    rows.push([meter, "charge_kv", t, Number(v.toFixed(2))]);
    rows.push([gw, "running", t, 1]);
  }
  for (let i = 0; i < rows.length; i += 5000) await pool.query("INSERT IGNORE INTO readings (device_id, channel, ts, value) VALUES ?", [rows.slice(i, i + 5000)]);
  await pool.end();
});

test("an engineer overrides a limit at a point, replays it, saves it, edits it again, and the audit log shows it", async ({ page }) => {
  test.setTimeout(180_000);
  await signIn(page, "engineer");
  await page.goto("/limits");
  await expect(page.getByTestId("limits-place")).toContainText("Plant-wide defaults");
  await page.getByRole("navigation", { name: "Where" }).getByRole("button", { name: "Gravure Press 1" }).click();
  await page.getByRole("navigation", { name: "Where" }).getByRole("button", { name: "Unwind" }).first().click();
  await expect(page.getByTestId("limits-place")).toContainText("Gravure Press 1 › Unwind");

  const medium = page.locator('[data-testid="rule-row"][data-kind="charge_high"]').filter({ hasText: "Medium" });
  await expect(medium).toContainText("from plant-wide");
  await medium.getByRole("button", { name: "Override here" }).click();
  const editor = page.getByTestId("rule-editor");
  await expect(editor).toBeVisible();
  await expect(editor.getByTestId("save-button")).toBeDisabled();

  // a clear level on the unsafe side is refused next to the field
  await editor.getByLabel("Limit", { exact: true }).fill("9");
  await editor.getByLabel("Clear level", { exact: true }).fill("10");
  await editor.getByTestId("replay-button").click();
  await expect(editor.getByText("The clear level must be below the limit (on the safe side)", { exact: true })).toBeVisible();
  await expect(page.getByTestId("limits-message")).toHaveText("Please correct the marked fields.");

  await editor.getByLabel("Clear level", { exact: true }).fill("7.5");
  await editor.getByLabel("Why").fill("Unwind film charges more since the new supplier");
  await editor.getByTestId("replay-button").click();
  const result = editor.getByTestId("replay-result");
  await expect(result).toBeVisible({ timeout: 90_000 });
  const current = Number(await editor.getByTestId("replay-current").getAttribute("data-count"));
  const proposed = Number(await editor.getByTestId("replay-proposed").getAttribute("data-count"));
  // the data has an excursion to about −14 kV every 9 h: both limits see them, the lower one no fewer
  expect(current).toBeGreaterThan(0);
  expect(proposed).toBeGreaterThanOrEqual(current);
  await expect(editor.getByTestId("replay-episodes")).toContainText("Gravure Press 1 › Unwind");
  await expect(result).toContainText("raw readings");
  await snap(page, "limits-replay");

  // changing a value after the replay asks for a new replay before saving
  await editor.getByLabel("On-delay").fill("12");
  await expect(editor.getByTestId("save-button")).toBeDisabled();
  await editor.getByLabel("On-delay").fill("10");
  await expect(editor.getByTestId("save-button")).toBeEnabled();
  await editor.getByTestId("save-button").click();
  await expect(page.getByTestId("limits-message")).toContainText("Added a rule here");
  await expect(medium).toContainText("here");
  await expect(medium).toContainText("over 9 kV, clear under 7.5 kV");
  const audit = page.getByTestId("rule-audit");
  await expect(audit).toContainText("new rule (version 1)");
  await expect(audit).toContainText("Priya Lund");
  await expect(audit).toContainText("Unwind film charges more since the new supplier");

  // edit it again: version 1 → 2
  await medium.getByRole("button", { name: "Edit" }).click();
  await expect(editor).toContainText("version 1 → 2");
  await editor.getByLabel("Limit", { exact: true }).fill("8.5");
  await editor.getByTestId("replay-button").click();
  await expect(editor.getByTestId("replay-result")).toBeVisible({ timeout: 90_000 });
  await editor.getByTestId("save-button").click();
  await expect(page.getByTestId("limits-message")).toContainText("Saved version 2");
  await expect(audit).toContainText("version 1 → 2");
  await expect(audit).toContainText("limitKv 9");
  await expect(audit).toContainText("limitKv 8.5");
  await snap(page, "limits-saved");
});

test("a viewer sees the limits but cannot change them (403 from the API)", async ({ page, baseURL }) => {
  await signIn(page, "viewer");
  await page.goto("/limits");
  await expect(page.getByTestId("rules-table")).toBeVisible();
  await expect(page.getByRole("button", { name: /^(Edit|Override here)$/ })).toHaveCount(0);
  await expect(page.getByText("Engineers and admins edit limits")).toBeVisible();
  const viewer = await apiAs(baseURL!, "viewer");
  const body = { kind: "charge_high", scope: { pointId: null, lineId: null, areaId: null }, severity: "medium", onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 30, clearKv: 25 } };
  expect((await viewer.post("/api/rules", { data: body })).status()).toBe(403);
  expect((await viewer.post("/api/rules/replay", { data: body })).status()).toBe(403);
  const lead = await apiAs(baseURL!, "shift_lead");
  expect((await lead.post("/api/rules", { data: body })).status()).toBe(403);
});
