// A technician-level engineer records checks with a photo, sees pass/fail and the due list
// change; imports an instrument's CSV log; records a cleaning.
import fs from "node:fs";
import path from "node:path";
import sharp from "sharp";
import type { Page } from "@playwright/test";
import { signIn, snap, expect, test } from "./helpers";

async function photo(): Promise<Buffer> {
  // a small "photo of the emitters": grey bar on a darker background
  return sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 60, g: 66, b: 72 } } })
    .composite([{ input: Buffer.from('<svg width="640" height="480"><rect x="40" y="200" width="560" height="60" fill="#b8bcc2"/></svg>'), top: 0, left: 0 }])
    .jpeg()
    .toBuffer();
}

async function recordCheck(page: Page, tag: string, values: { pos: string; neg: string; offset: string }, file?: { name: string; buffer: Buffer }) {
  const form = page.getByTestId("record-check-form");
  await form.getByLabel("Neutralizer").selectOption({ label: tag });
  await form.getByLabel("Decay + (s)").fill(values.pos);
  await form.getByLabel("Decay − (s)").fill(values.neg);
  await form.getByLabel("Offset (V)").fill(values.offset);
  await form.getByLabel("Instrument", { exact: true }).fill("Plate monitor PM-7 #0412");
  if (file) await form.getByLabel("Photos or printout of the check").setInputFiles({ name: file.name, mimeType: "image/jpeg", buffer: file.buffer });
  await form.getByRole("button", { name: "Record check" }).click();
}

test.describe("checks", () => {
  test("an engineer records a failing and a passing check with photos; pass/fail shows and the due list updates", async ({ page }) => {
    await signIn(page, "engineer");
    await page.goto("/checks");
    await expect(page.getByRole("heading", { name: "Checks", exact: true })).toBeVisible();
    await expect(page.getByTestId("hv-caution")).toContainText("Isolate the power unit");
    // editions of each published figure (ANSI/ESD STM3.1-2015, IEC 61340-4-7:2017, ANSI/ESD S20.20-2021)
    await expect(page.getByTestId("limit-sources")).toContainText("ANSI/ESD STM3.1-2015");
    await expect(page.getByTestId("limit-sources")).toContainText("IEC 61340-4-7:2017");
    await expect(page.getByTestId("limit-sources")).toContainText("±35 V is the ionizer offset limit of ANSI/ESD S20.20-2021");
    await expect(page.getByTestId("limit-sources")).toContainText("written for handling electrostatic-discharge-sensitive electronic parts");
    // each kind's default with its source: pulsed-DC bars 100–600 mm (common practice)
    await expect(page.getByTestId("kind-defaults")).toContainText("100–600 mm");
    // the plate of the test method is asked for, filled with the standard one
    const plate = page.getByTestId("plate-fields");
    await expect(plate.getByLabel("Plate (pF)")).toHaveValue("20");
    await expect(plate.getByLabel("Width (mm)")).toHaveValue("150");
    await expect(plate.getByLabel("Test distance (mm)")).toBeVisible();

    // never checked since installation: its verification is overdue; its cleaning is not due yet
    const dueList = page.getByTestId("due-list");
    const dispenseCheck = dueList.locator('[data-testid="due-item"][data-label="N-LABELLER-1-DISPENSE"][data-what="check"]');
    await expect(dispenseCheck).toHaveAttribute("data-overdue", "true");
    const dispenseCleaning = dueList.locator('[data-testid="due-item"][data-label="N-LABELLER-1-DISPENSE"][data-what="cleaning"]');
    const cleaningBefore = await dispenseCleaning.count();
    await snap(page, "checks-due-list-before");

    const jpeg = await photo();
    // a nozzle: decay − 24.8 s is over its 5 s default limit (lib/physics/neutralizer-kinds.ts)
    await recordCheck(page, "N-LABELLER-1-DISPENSE", { pos: "6.1", neg: "24.8", offset: "+9" }, { name: "emitters-dispense.jpg", buffer: jpeg });
    const result = page.getByTestId("check-result");
    await expect(result).toContainText("Fail");
    await expect(result).toContainText("Negative decay 24.8 s is over the 5 s limit.");
    await expect(result).toContainText("Marked as needing cleaning");
    await expect(result).toContainText("1 file attached.");
    await snap(page, "check-result-fail");

    // the due list now shows it needing cleaning now, and its verification is no longer due
    await expect(dueList.locator('[data-testid="due-item"][data-label="N-LABELLER-1-DISPENSE"][data-what="check"]')).toHaveCount(0);
    await expect(dispenseCleaning).toHaveCount(1);
    await expect(dispenseCleaning).toContainText("Marked as needing cleaning");
    expect(cleaningBefore).toBeLessThanOrEqual(1);

    // an AC bar: 0.9 / 1.1 s are within its 2 s default
    await recordCheck(page, "N-LABELLER-1-LINER-UNWIND", { pos: "0.9", neg: "1.1", offset: "-12" }, { name: "liner-unwind.jpg", buffer: jpeg });
    await expect(result).toContainText("Pass");
    await expect(result).toContainText("Offset -12 V is within ±35 V.");
    await expect(dueList.locator('[data-testid="due-item"][data-label="N-LABELLER-1-LINER-UNWIND"][data-what="check"]')).toHaveCount(0);
    await expect(page.getByTestId("recent-check").first()).toContainText("N-LABELLER-1-LINER-UNWIND");
    await snap(page, "checks-due-list-after");

    // the photo is on the neutralizer's page, as a thumbnail that loads
    await page.getByTestId("recent-check").filter({ hasText: "N-LABELLER-1-DISPENSE" }).getByRole("link").click();
    await expect(page.getByRole("heading", { name: "N-LABELLER-1-DISPENSE" })).toBeVisible();
    const thumb = page.getByTestId("uploads").locator("img").first();
    await expect(thumb).toBeVisible();
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.naturalWidth)).toBeGreaterThan(0);
    await expect(page.getByTestId("check-table")).toContainText("Fail");
    await expect(page.getByTestId("hv-caution")).toBeVisible();

    // a cleaning puts it back in service
    await page.getByRole("button", { name: "Record cleaning" }).click();
    await expect(page.getByText("Cleaning recorded")).toBeVisible();
    await page.reload();
    await expect(page.getByRole("main").getByText("In service").first()).toBeVisible();
    await expect(page.getByTestId("history")).toContainText("Needs cleaning → in service (cleaned).");
    await snap(page, "neutralizer-page");
  });

  test("an engineer imports an instrument's CSV log: preview, import, rejected rows with line numbers, re-import adds nothing", async ({ page }) => {
    await signIn(page, "engineer");
    await page.goto("/checks/import");
    const csv = fs.readFileSync(path.resolve(import.meta.dirname, "../fixtures/check-log-semicolon-bom.csv"));
    await page.getByLabel("CSV file").setInputFiles({ name: "cp-export.csv", mimeType: "text/csv", buffer: csv });
    await expect(page.getByTestId("import-detected")).toContainText("semicolons, decimal commas, byte-order mark, column names on line 5");
    await expect(page.getByTestId("import-preview")).toContainText("N-GRAVURE-1-UNWIND");
    await expect(page.getByLabel("Column for Offset (balance) voltage")).toHaveValue("4");
    await snap(page, "checks-import-preview");
    await page.getByRole("button", { name: "Import" }).click();
    const result = page.getByTestId("import-result");
    await expect(result).toContainText("3 checks added");
    await expect(result).toContainText("3 rows rejected");
    const rejected = page.getByTestId("import-rejected");
    await expect(rejected).toContainText('date "31/02/2026 10:00" is not a valid date');
    await expect(rejected.locator("tr", { hasText: "no neutralizer with tag" })).toContainText("11");
    await snap(page, "checks-import-result");

    await page.reload();
    await page.getByLabel("CSV file").setInputFiles({ name: "cp-export.csv", mimeType: "text/csv", buffer: csv });
    await expect(page.getByTestId("import-previous")).toBeVisible();
    await page.getByRole("button", { name: "Import" }).click();
    await expect(page.getByTestId("import-result")).toContainText("0 checks added");
    await expect(page.getByTestId("import-result")).toContainText("3 already there");
  });

  test("a viewer sees the due list but no check form, and the import page is refused", async ({ page }) => {
    await signIn(page, "viewer");
    await page.goto("/checks");
    await expect(page.getByTestId("due-list")).toBeVisible();
    await expect(page.getByTestId("record-check-form")).toHaveCount(0);
    await expect(page.getByRole("button", { name: "Send due list now" })).toHaveCount(0);
    await page.goto("/checks/import");
    await expect(page.getByText("Not allowed (403)")).toBeVisible();
  });
});
