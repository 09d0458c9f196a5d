// Every page at desk width (1366 × 768) and phone width (390 × 844): axe-core (WCAG 2.1 A/AA
// rules) finds no serious or critical violation, and on the phone the page never scrolls
// sideways (its scrollWidth is no wider than the viewport). Signed in as the admin, who sees
// every page; the sign-in page is checked signed out.
import AxeBuilder from "@axe-core/playwright";
import type { Page } from "@playwright/test";
import { expect, signIn, snap, test } from "./helpers";
import { testPool } from "./line-fixtures";

type Target = { name: string; path: string };
let targets: Target[] = [];

test.beforeAll(async () => {
  const pool = testPool();
  const one = async (sql: string) => {
    const [rows] = await pool.query(sql);
    return (rows as Array<{ id: number }>)[0]?.id ?? null;
  };
  const lineId = await one("SELECT id FROM `lines` WHERE slug = 'gravure-1'");
  const areaId = await one("SELECT id FROM areas ORDER BY display_order, id LIMIT 1");
  const deviceId = await one("SELECT id FROM devices ORDER BY id LIMIT 1");
  const equipmentId = await one("SELECT id FROM neutralizers ORDER BY id LIMIT 1");
  const surveyId = await one("SELECT id FROM surveys ORDER BY id LIMIT 1");
  const planId = await one("SELECT id FROM survey_plans ORDER BY id LIMIT 1");
  const [rules] = await pool.query("SELECT id FROM rules WHERE kind = 'charge_high' AND point_id IS NULL AND line_id IS NULL AND area_id IS NULL LIMIT 1");
  const [pts] = await pool.query("SELECT p.id AS pointId, l.area_id AS areaId FROM points p JOIN `lines` l ON l.id = p.line_id WHERE l.id = ? AND p.position = 1", [lineId]);
  const at = (pts as Array<{ pointId: number; areaId: number }>)[0];
  const now = Date.now();
  const [res] = await pool.query("INSERT INTO alerts SET ?", [
    {
      rule_id: (rules as Array<{ id: number }>)[0].id,
      rule_version: 1,
      kind: "charge_high",
      severity: "high",
      subject_key: `point:${at.pointId}`,
      area_id: at.areaId,
      line_id: lineId,
      point_id: at.pointId,
      state: "active_unacked",
      message: "Charge −22.4 kV at Unwind on Gravure Press 1, over the 20 kV limit",
      start_ts: now - 8 * 60_000,
      peak_value: -22.4,
    },
  ]);
  const alertId = Number((res as { insertId: number }).insertId);
  await pool.query("INSERT INTO alert_events (alert_id, ts, kind, value) VALUES (?, ?, 'raised', '-22.4')", [alertId, now - 8 * 60_000]);
  await pool.end();
  targets = [
    { name: "floor", path: "/floor" },
    { name: "alerts", path: "/alerts" },
    { name: "alert", path: `/alerts/${alertId}` },
    { name: "line", path: `/lines/${lineId}` },
    { name: "limits", path: "/limits" },
    { name: "alert-load", path: "/alert-load" },
    { name: "equipment", path: "/equipment" },
    { name: "equipment-item", path: `/equipment/${equipmentId}` },
    { name: "checks", path: "/checks" },
    { name: "checks-import", path: "/checks/import" },
    { name: "surveys", path: "/surveys" },
    ...(surveyId ? [{ name: "survey", path: `/surveys/${surveyId}` }] : []),
    ...(planId ? [{ name: "survey-plan", path: `/surveys/plans/${planId}` }] : []),
    { name: "devices", path: "/devices" },
    { name: "device", path: `/devices/${deviceId}` },
    { name: "gateways", path: "/gateways" },
    { name: "reports", path: "/reports" },
    { name: "handover", path: "/reports/handover" },
    { name: "weekly", path: "/reports/weekly" },
    { name: "equipment-report", path: "/reports/equipment" },
    { name: "calculators", path: "/calculators" },
    { name: "oncall", path: "/oncall" },
    { name: "notifications", path: "/notifications" },
    { name: "people", path: "/people" },
    { name: "wallboard", path: "/wallboard" },
    { name: "wallboard-hall", path: `/wallboard/${areaId}` },
  ];
});

async function seriousViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"]).analyze();
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => `${v.id} (${v.impact}, ${v.nodes.length}): ${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join(" | ")}`);
}

async function settle(page: Page) {
  await page.waitForLoadState("domcontentloaded");
  await page.locator("main, body").first().waitFor();
  await page.waitForTimeout(600);
}

for (const width of [1366, 390] as const) {
  test(`every page at ${width} px: no serious or critical axe violation${width === 390 ? ", no sideways scroll" : ""}`, async ({ page }) => {
    test.setTimeout(240_000);
    await page.setViewportSize(width === 390 ? { width: 390, height: 844 } : { width: 1366, height: 768 });
    await page.goto("/sign-in");
    await settle(page);
    const problems: string[] = (await seriousViolations(page)).map((v) => `sign-in: ${v}`);
    await signIn(page, "admin");
    for (const t of targets) {
      await page.goto(t.path);
      await settle(page);
      for (const v of await seriousViolations(page)) problems.push(`${t.name}: ${v}`);
      if (width === 390) {
        const { scroll, inner } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
        if (scroll > inner) problems.push(`${t.name}: page is ${scroll} px wide in a ${inner} px viewport`);
        if (["floor", "alerts", "alert", "line"].includes(t.name)) await snap(page, `phone-390-${t.name}`);
      }
    }
    expect(problems, problems.join("\n")).toEqual([]);
  });
}
