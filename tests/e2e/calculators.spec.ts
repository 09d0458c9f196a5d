// An engineer uses each calculator; the answers match the published worked values.
import type { Page } from "@playwright/test";
import { signIn, snap, expect, test } from "./helpers";

async function snapCard(page: Page, id: string, name: string) {
  await page.locator(`#${id}`).scrollIntoViewIfNeeded();
  const dir = process.env.PW_OUTPUT_DIR ?? ".data/test-output/e2e";
  await page.locator(`#${id}`).screenshot({ path: `${dir}/screens/${name}.png` });
}

test.describe("calculators", () => {
  test.beforeEach(async ({ page }) => {
    await signIn(page, "engineer");
    await page.goto("/calculators");
    await expect(page.getByRole("heading", { name: "Calculators" })).toBeVisible();
  });

  test("humidity planner: −10 °C, 80 % RH heated to 21 °C, on both bases", async ({ page }) => {
    const card = page.getByTestId("calc-humidity");
    await card.locator("#outdoorTempC").fill("-10");
    await card.locator("#outdoorRhPct").fill("80");
    await card.locator("#indoorTempC").fill("21");
    await card.locator("#basis").selectOption("ice");
    // ASHRAE Fundamentals 2017 ch. 1, over-ice basis: about 8.4 %
    await expect(card.getByTestId("indoor-rh")).toHaveText("8.4 %");
    await card.locator("#basis").selectOption("water");
    // over water (weather-service basis): about 9.2 %
    await expect(card.getByTestId("indoor-rh")).toHaveText("9.2 %");
    await expect(card.getByTestId("humidity-answer")).toContainText("holds only 9.2 % RH");
    await expect(card.getByTestId("humidity-answer")).toContainText("kg of water per hour");
    // where the flow is measured changes the dry-air mass: cold intake air is ~10 % denser (psychrolib; see unit test)
    await expect(card.locator("#flowAt")).toHaveValue("outdoor");
    await expect(card.getByTestId("humidity-answer")).toContainText("measured at the outdoor intake");
    const outdoorWater = await card.getByTestId("water-kg-per-h").textContent();
    await card.locator("#flowAt").selectOption("hall");
    await expect(card.getByTestId("water-kg-per-h")).not.toHaveText(outdoorWater ?? "");
    await expect(card).toContainText("would be", { useInnerText: true });
    await expect(card).toContainText("% more)");
    await card.locator("#flowAt").selectOption("outdoor");
    await expect(card.getByText("ASHRAE Handbook—Fundamentals 2017")).toBeVisible();
    await snap(page, "calculators-page");
    await snapCard(page, "humidity", "calculator-humidity");

    // a wrong entry is explained next to the field, in words
    await card.locator("#outdoorRhPct").fill("eighty");
    await expect(card.locator("#outdoorRhPct-error")).toHaveText("Enter the outdoor RH as a number, e.g. 80");
    await expect(card.getByText("Correct the marked fields to see the answer.")).toBeVisible();
    await snapCard(page, "humidity", "calculator-humidity-error");
  });

  test("charge reading explainer: 10 kV at 25 mm", async ({ page }) => {
    const card = page.getByTestId("calc-charge");
    await card.locator("#readingKv").fill("10");
    await card.locator("#distanceMm").fill("25");
    // E = 10 kV / 25 mm = 4 kV/cm; σ = ε0·E = 3.54 µC/m²; 13.3 % of 3 MV/m
    await expect(card.getByTestId("field")).toHaveText("4.00 kV/cm");
    await expect(card.getByTestId("sigma")).toHaveText("3.54 µC/m²");
    await expect(card.getByTestId("share")).toHaveText("13.3 %");
    // common practice: seen from about 8–10 kV, heard from about 5 kV
    await expect(card.getByTestId("perception")).toHaveText("would see the spark");
    await card.locator("#readingKv").fill("6");
    await expect(card.getByTestId("perception")).toHaveText("would feel and hear it");
    await card.locator("#readingKv").fill("2.5");
    await expect(card.getByTestId("perception")).toHaveText("would feel it");
    await expect(card.getByText("NFPA 77", { exact: false }).first()).toBeVisible();
    await snapCard(page, "charge", "calculator-charge");
  });

  test("spark-hazard check: a 200 pF conductor at 10 kV in ethanol vapour", async ({ page }) => {
    const card = page.getByTestId("calc-spark");
    await expect(card.getByTestId("spark-caution")).toContainText("NFPA 77");
    await expect(card.getByTestId("spark-caution")).toContainText("IEC TS 60079-32-1");
    await expect(card.getByTestId("spark-caution")).toContainText("qualified person");
    await expect(card.getByTestId("spark-caution")).toContainText("screening", { ignoreCase: true });
    await expect(card.getByTestId("mie-table")).toContainText("Ethyl acetate");
    await card.locator("#solvent").selectOption("Ethanol");
    await card.locator("#capacitancePf").fill("200");
    await card.locator("#voltageKv").fill("10");
    // ½CV² = ½ · 200 pF · (10 kV)² = 10 mJ
    await expect(card.getByTestId("spark-energy")).toHaveText("10.0 mJ");
    await expect(card.getByTestId("spark-answer")).toContainText("Can ignite");
    // 10 mJ / 0.23 mJ = 43× the MIE
    await expect(card.getByTestId("spark-ratio")).toHaveText("Spark margin: stored energy 43× the MIE: can ignite");
    await expect(card.getByTestId("propagating-brush-caution")).toContainText("2.5×10⁻⁴ C/m²");
    await expect(card.getByTestId("propagating-brush-caution")).toContainText("1 J");
    await card.locator("#capacitancePf").fill("100");
    await card.locator("#voltageKv").fill("2");
    await card.locator("#solvent").selectOption("Ethyl acetate");
    // 100 pF at 2 kV = 0.2 mJ, within tenfold of 0.46 mJ
    await expect(card.getByTestId("spark-energy")).toHaveText("0.20 mJ");
    await expect(card.getByTestId("spark-answer")).toContainText("Within tenfold");
    await snapCard(page, "spark", "calculator-spark");
  });

  test("relaxation time: εr 2, ρ 10¹⁰ Ω·m", async ({ page }) => {
    const card = page.getByTestId("calc-relaxation");
    await card.locator("#relativePermittivity").fill("2");
    await card.locator("#resistivity").fill("1e10");
    // τ = ε0 · 2 · 1e10 = 0.177 s
    await expect(card.getByTestId("tau")).toHaveText("177 ms");
    // the same figure in Ω·cm is 100× less resistive: 1e10 Ω·cm = 1e8 Ω·m → 1.77 ms
    await card.locator("#resistivityUnit").selectOption("ohm_cm");
    await expect(card.getByTestId("tau")).toHaveText("1.77 ms");
    await card.locator("#resistivityUnit").selectOption("ohm_m");
    await card.locator("#surfaceResistanceOhm").fill("1e12");
    await expect(card.getByTestId("surface-class")).toHaveText("insulative");
    await card.locator("#resistivity").fill("0");
    await expect(card.locator("#resistivity-error")).toContainText("must be above 0");
    await card.locator("#resistivity").fill("1e10");
    await snapCard(page, "relaxation", "calculator-relaxation");
  });
});
