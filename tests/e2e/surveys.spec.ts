// Walk-down surveys on a phone (390 × 844): a whole round with the network cut half-way, sent
// exactly once when it returns (counted in the database); findings and an action made from
// one; refusals of impossible readings, non-image photos and a round sent twice.
import fs from "node:fs";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { apiAs, expect, signIn, test } from "./helpers";
import { testPool } from "./line-fixtures";

test.use({ viewport: { width: 390, height: 844 } });

const SHOTS = path.resolve(".data/screenshots");
// 1×1 PNG
const PNG = Buffer.from("iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==", "base64");

async function quickPlanId(): Promise<number> {
  const [rows] = await testPool().query("SELECT p.id FROM survey_plans p JOIN `lines` l ON l.id = p.line_id WHERE l.slug = 'slitter-2' AND p.name = 'Quick round'");
  return (rows as { id: number }[])[0].id;
}

async function roundsOfPlan(planId: number): Promise<{ id: number; readings: number }[]> {
  const [rows] = await testPool().query("SELECT s.id, (SELECT COUNT(*) FROM survey_readings r WHERE r.survey_id = s.id) AS readings FROM surveys s WHERE s.plan_id = ?", [planId]);
  return (rows as { id: number; readings: number }[]).map((r) => ({ id: r.id, readings: Number(r.readings) }));
}

async function noSideways(page: import("@playwright/test").Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow, "page scrolls sideways").toBeLessThanOrEqual(0);
}

async function enter(page: import("@playwright/test").Page, spot: string, sign: "+" | "−", magnitude: string) {
  const card = page.locator(`[data-testid="spot"][data-spot="${spot}"]`);
  // the next spot to measure opens by itself, in web-path order
  await expect(card.getByTestId("reading-form")).toBeVisible();
  await card.getByRole("button", { name: sign, exact: true }).click();
  await card.getByLabel("Reading magnitude").fill(magnitude);
  await card.getByLabel("Speed m/min").fill("380");
  return card;
}

test("a whole round on a phone with the network cut half-way is sent once when it returns", async ({ page, context }) => {
  fs.mkdirSync(SHOTS, { recursive: true });
  const planId = await quickPlanId();
  expect(await roundsOfPlan(planId)).toEqual([]);
  await signIn(page, "shift_lead");
  await page.goto("/surveys");
  await page.locator('[data-testid="plan-row"][data-plan="Quick round"]').getByRole("link", { name: "Walk the round" }).click();
  await expect(page.getByRole("heading", { name: /Slitter-Rewinder S2 · Quick round/ })).toBeVisible();
  await expect(page.getByTestId("survey-cautions")).toContainText("Caution");
  await page.getByLabel("Meter").fill("Handheld HF-07");
  await page.getByLabel("Calibrated on").fill("2026-06-15");
  await page.getByRole("button", { name: "Start the round" }).click();

  // an impossible reading and a zero distance are refused with the reason, and not saved
  let card = await enter(page, "unwind", "−", "90");
  await card.getByRole("button", { name: "Save reading" }).click();
  await expect(card.getByTestId("reading-refused")).toContainText("Air cannot hold this");
  await card.getByLabel("Reading magnitude").fill("18");
  await card.getByLabel("Distance mm").fill("0");
  await expect(card.getByTestId("distance-refused")).toContainText("more than 0 mm");
  // off the calibrated distance: warned, with the equivalent at 25 mm
  await card.getByLabel("Distance mm").fill("50");
  await expect(card.getByTestId("distance-warning")).toContainText("about −36.0 kV at 25 mm");
  await card.getByLabel("Distance mm").fill("25");
  await card.getByLabel("Photo").setInputFiles({ name: "unwind.png", mimeType: "image/png", buffer: PNG });
  await card.getByRole("button", { name: "Save reading" }).click();
  await expect(page.getByTestId("queue-status")).toHaveText("All readings sent");
  await expect(card).toContainText("−18.0 kV");
  await expect(card).toContainText("Over");
  // the first half has reached the server (reading and photo) before the network goes
  await expect(card.getByTestId("spot-judgement")).toContainText("Sent");
  await expect(page.getByTestId("photo-queue")).toHaveCount(0);
  await expect(page.getByTestId("queue-status")).toHaveText("All readings sent");

  // the network goes; the rest of the round is kept on the phone
  await context.setOffline(true);
  card = await enter(page, "knife-exit", "+", "4.2");
  await card.getByRole("button", { name: "Save reading" }).click();
  await expect(page.getByTestId("queue-status")).toHaveText("Offline · 1 reading waiting to be sent");
  await noSideways(page);
  // what the phone shows: the queue, then the spots in web-path order (viewport, not full page:
  // a full-page capture paints the sticky header over the middle of the page)
  await page.getByText(/^Meter Handheld HF-07/).scrollIntoViewIfNeeded();
  await page.screenshot({ path: path.join(SHOTS, "survey-round-phone.png") });
  await expect(page.getByTestId("queue-status")).toHaveText("Offline · 1 reading waiting to be sent");
  card = await enter(page, "rewind", "+", "9.5");
  await card.getByRole("button", { name: "Save reading" }).click();
  await expect(page.getByTestId("queue-status")).toHaveText("Offline · 2 readings waiting to be sent");
  await page.getByRole("button", { name: /Finish round \(3 of 3 spots\)/ }).click();
  await expect(page.getByTestId("round-finished")).toContainText("sent when the network is back");
  await noSideways(page);
  await page.screenshot({ path: path.join(SHOTS, "survey-round-phone-offline.png"), fullPage: true });
  let rounds = await roundsOfPlan(planId);
  expect(rounds).toHaveLength(1);
  expect(rounds[0].readings).toBe(1);

  // back online: sent, once
  await context.setOffline(false);
  await expect(page.getByTestId("queue-status")).toHaveText("All readings sent", { timeout: 20_000 });
  await expect(page.getByRole("link", { name: "Open the survey report" })).toBeVisible();
  rounds = await roundsOfPlan(planId);
  expect(rounds).toEqual([{ id: rounds[0].id, readings: 3 }]);
  // a later sync (page reopened) sends nothing more
  await page.reload();
  await page.waitForTimeout(1500);
  expect(await roundsOfPlan(planId)).toEqual([{ id: rounds[0].id, readings: 3 }]);
  const [photos] = await testPool().query("SELECT COUNT(*) AS n FROM survey_photos WHERE survey_id = ?", [rounds[0].id]);
  expect(Number((photos as { n: number }[])[0].n)).toBe(1);

  await page.goto(`/surveys/${rounds[0].id}`);
  await expect(page.getByTestId("finding").first()).toContainText("Unwind roll: −18.0 kV is over the 12.0 kV limit");
  await expect(page.locator('[data-testid="finding"][data-kind="charge_build"]')).toContainText("Knife exit");
  await noSideways(page);
  await page.screenshot({ path: path.join(SHOTS, "survey-report-phone.png"), fullPage: true });
  const pdf = await page.request.get(`/api/surveys/${rounds[0].id}/pdf`);
  expect(pdf.headers()["content-type"]).toBe("application/pdf");
  const bytes = await pdf.body();
  expect(bytes.subarray(0, 5).toString()).toBe("%PDF-");
  fs.writeFileSync(path.join(SHOTS, "survey-report.pdf"), bytes);
  const csv = await (await page.request.get(`/api/surveys/${rounds[0].id}/csv`)).text();
  expect(csv).toContain("Unwind roll");
});

test("the findings of a survey and an action made from one, on the due list", async ({ page }) => {
  await signIn(page, "shift_lead");
  const [rows] = await testPool().query("SELECT id FROM surveys WHERE client_id = '5e1f0c2a-0000-4000-8000-000000000001'");
  const surveyId = (rows as { id: number }[])[0].id;
  await page.goto(`/surveys/${surveyId}`);
  await expect(page.getByTestId("survey-cautions")).toContainText("IEC TS 60079-32-1");
  const findings = page.getByTestId("finding");
  await expect(findings).toHaveCount(5);
  await expect(page.locator('[data-testid="finding"][data-kind="low_reduction"]')).toContainText("Bar S2-1: 33 % reduction");
  // the seeded actions: one closed by the re-survey, one open
  await expect(page.locator('[data-testid="survey-action"][data-state="closed"]')).toContainText("closed by re-survey");
  const spreader = page.locator('[data-testid="finding"][data-kind="over_limit"]').filter({ hasText: "Spreader roller" });
  await spreader.getByRole("button", { name: "Make an action" }).click();
  await spreader.getByLabel("Action").selectOption("move_bar");
  await spreader.getByLabel("Owner").selectOption({ label: "Priya Lund" });
  await spreader.getByLabel("What is to be done").fill("Move bar S2-1 closer to the spreader roller");
  await spreader.getByRole("button", { name: "Add to the due list" }).click();
  await expect(page.locator('[data-testid="survey-action"][data-state="open"]').filter({ hasText: "Move bar S2-1 closer" })).toContainText("owner Priya Lund");
  await noSideways(page);
  const pdf = await page.request.get(`/api/surveys/${surveyId}/pdf`);
  expect(pdf.status()).toBe(200);
  fs.mkdirSync(SHOTS, { recursive: true });
  fs.writeFileSync(path.join(SHOTS, "survey-report-full.pdf"), await pdf.body());
  await page.goto("/checks");
  await expect(page.getByTestId("survey-actions").getByText("Move bar S2-1 closer to the spreader roller")).toBeVisible();
});

test("a round sent twice is stored once; a photo that is not an image is refused", async ({ baseURL }) => {
  const api = await apiAs(baseURL!, "shift_lead");
  const planId = await quickPlanId();
  const [v] = await testPool().query("SELECT current_version AS v FROM survey_plans WHERE id = ?", [planId]);
  const clientId = randomUUID();
  const now = Date.now();
  const body = {
    clientId,
    planId,
    planVersion: (v as { v: number }[])[0].v,
    startedTs: now - 60_000,
    finishedTs: now,
    meterLabel: "API meter",
    meterCalibratedOn: null,
    calibratedDistanceMm: 25,
    note: null,
    resurveyOfActionId: null,
    readings: [{ spotKey: "unwind", ts: now - 30_000, value: -6.5, unit: "kV", distanceMm: 25, running: true, speedMpm: 300, note: null }],
  };
  const first = await api.post("/api/surveys/rounds", { data: body });
  expect(first.status()).toBe(201);
  const again = await api.post("/api/surveys/rounds", { data: body });
  expect(again.status()).toBe(200);
  const [n] = await testPool().query("SELECT COUNT(*) AS n FROM surveys WHERE client_id = ?", [clientId]);
  expect(Number((n as { n: number }[])[0].n)).toBe(1);
  const bad = await api.post("/api/surveys/rounds", { data: { ...body, clientId: randomUUID(), readings: [{ ...body.readings[0], value: 120 }] } });
  expect(bad.status()).toBe(422);
  expect((await bad.json()).error).toMatch(/Air cannot hold this/);
  const photo = await api.post("/api/surveys/photos", { multipart: { clientId, spotKey: "unwind", file: { name: "unwind.jpg", mimeType: "image/jpeg", buffer: Buffer.from("this is not a picture at all") } } });
  expect(photo.status()).toBe(422);
  expect((await photo.json()).error).toMatch(/Only photos/);
  const viewer = await apiAs(baseURL!, "viewer");
  expect((await viewer.post("/api/surveys/rounds", { data: { ...body, clientId: randomUUID() } })).status()).toBe(403);
});
