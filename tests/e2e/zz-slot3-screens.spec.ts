// Temporary: screenshots for review (not committed).
import fs from "node:fs";
import type { Page } from "@playwright/test";
import { eq } from "drizzle-orm";
import { closeDb, getDb } from "../../db/client";
import { readDeviceSecrets } from "../../db/seed";
import { lines, neutralizers } from "../../db/schema";
import { hasReportFixture, seedReportFixture } from "../integration/reports-fixture";
import { FixturePublisher, listFixtureDevices, testPool } from "./line-fixtures";
import { signIn, test } from "./helpers";

const OUT = ".data/screenshots";
let pub: FixturePublisher | null = null;
let day = "";
let gravureId = 0;
let lamId = 0;

test.beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
  const db = getDb();
  const now = Date.now();
  if (!(await hasReportFixture(db))) await seedReportFixture(db, now);
  const { localDateOf } = await import("../../lib/plant-time");
  day = localDateOf(now - 8 * 86_400_000, "Europe/London");
  gravureId = (await db.select({ id: lines.id }).from(lines).where(eq(lines.slug, "gravure-1")))[0].id;
  lamId = (await db.select({ id: neutralizers.id }).from(neutralizers).where(eq(neutralizers.tag, "N-LAMINATOR-1-REWIND")))[0].id;
  const pool = testPool();
  const devs = (await listFixtureDevices(pool)).filter((d) => d.code.includes("gravure-1") || d.code.includes("flexo-2") || d.code === "th-press-hall");
  await pool.end();
  pub = new FixturePublisher(devs, readDeviceSecrets(process.env.DB_NAME));
  await pub.start();
  pub.pause();
  const unwind = devs.find((d) => d.code === "fm-gravure-1-unwind")!;
  const flexo = devs.find((d) => d.code === "fm-flexo-2-unwind")!;
  for (let i = 0; i < 5; i++) {
    await pub.publishNow(unwind.id, "charge_kv", -17.2);
    await pub.publishNow(flexo.id, "charge_kv", 0.4);
    await new Promise((r) => setTimeout(r, 1000));
  }
});
test.afterAll(async () => {
  await closeDb();
});

async function both(page: Page, name: string, url: string, wait?: (p: Page) => Promise<void>) {
  for (const w of [1366, 390]) {
    await page.setViewportSize({ width: w, height: w === 390 ? 844 : 900 });
    await page.goto(url);
    if (wait) await wait(page);
    await page.waitForTimeout(1500);
    await page.screenshot({ path: `${OUT}/${name}-${w}.png`, fullPage: true });
  }
}

test("screens", async ({ page }) => {
  test.setTimeout(240_000);
  await signIn(page, "engineer");
  await both(page, "calculators", "/calculators");
  await both(page, "equipment-item", `/equipment/${lamId}`);
  await both(page, "weekly", `/reports/weekly?line=${gravureId}&week=${day}`);
  await both(page, "checks", "/checks");
  await both(page, "floor", "/floor");
  await both(page, "line", `/lines/${gravureId}`);
  await page.setViewportSize({ width: 1920, height: 1080 });
  await page.goto("/wallboard");
  await page.waitForTimeout(2500);
  await page.screenshot({ path: `${OUT}/wallboard-1920.png` });
});
