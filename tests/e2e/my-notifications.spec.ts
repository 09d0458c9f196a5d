// On a phone (390 × 844): an on-call engineer adds a mobile number (a reserved example number)
// and opts in per severity on "My notifications"; the phone's push subscription is saved through
// /api/me/push (same-origin only), whose GET hands out the install's VAPID public key; an admin
// sets the plant's location on the On-call page.
import { createECDH, randomBytes } from "node:crypto";
import { apiAs, signIn, snap, expect, test } from "./helpers";

test("an engineer sets their own texts and push on a phone", async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 });
  await signIn(page, "engineer");
  await page.goto("/notifications");
  await expect(page.getByRole("heading", { name: "My notifications" })).toBeVisible();
  await page.getByLabel("Mobile number").fill("+44 7700 900456");
  const texts = page.getByRole("group", { name: "Text me alerts of severity" });
  await texts.getByLabel("High").check();
  await page.getByRole("group", { name: "Push to my phone alerts of severity" }).getByLabel("Medium").check();
  await page.getByRole("button", { name: "Save", exact: true }).click();
  await expect(page.getByTestId("form-ok")).toContainText("Saved.");
  await page.reload();
  await expect(page.getByText("Now: +44 7700 900456")).toBeVisible();
  await expect(page.getByLabel("Mobile number")).toHaveValue("+447700900456");
  await expect(page.getByRole("group", { name: "Text me alerts of severity" }).getByLabel("High")).toBeChecked();
  await expect(page.getByRole("group", { name: "Text me alerts of severity" }).getByLabel("Medium")).not.toBeChecked();
  const { scroll, inner } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
  expect(scroll).toBeLessThanOrEqual(inner);
  await snap(page, "phone-390-notifications");

  // the route a phone uses, from the page itself (same origin)
  const key = await page.evaluate(async () => (await (await fetch("/api/me/push")).json()) as { publicKey: string });
  expect(Buffer.from(key.publicKey, "base64url")).toHaveLength(65); // an uncompressed P-256 point (RFC 8292 §3.2)
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  const sub = { endpoint: `https://push.example.test/send/${randomBytes(8).toString("hex")}`, keys: { p256dh: ecdh.getPublicKey().toString("base64url"), auth: randomBytes(16).toString("base64url") } };
  const saved = await page.evaluate(async (body) => (await fetch("/api/me/push", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) })).status, sub);
  expect(saved).toBe(201);
  await page.reload();
  await expect(page.getByText("1 phone allowed push")).toBeVisible();
  const bad = await page.evaluate(async () => (await fetch("/api/me/push", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint: "http://plain.example.test/x", keys: {} }) })).status);
  expect(bad).toBe(400);
  const removed = await page.evaluate(async (endpoint) => (await (await fetch("/api/me/push", { method: "DELETE", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint }) })).json()) as { removed: number }, sub.endpoint);
  expect(removed).toEqual({ removed: 1 });
});

test("a push subscription from another origin is refused; a viewer cannot open someone else's settings", async ({ baseURL, page }) => {
  const api = await apiAs(baseURL!, "viewer");
  const foreign = await api.post("/api/me/push", { headers: { Origin: "http://evil.example", "Sec-Fetch-Site": "cross-site" }, data: { endpoint: "https://push.example.test/x", keys: { p256dh: "a".repeat(87), auth: "b".repeat(22) } } });
  expect(foreign.status()).toBe(403);
  await api.dispose();
  await signIn(page, "viewer");
  await page.goto("/notifications?person=999999");
  await expect(page.getByText("Your role cannot change someone else's notifications.")).toBeVisible();
  await expect(page.getByLabel("Mobile number")).toHaveCount(0);
});

test("an admin sets the plant's location on the On-call page; a bad value is refused", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/oncall");
  await page.getByLabel("Latitude (°, north +)").fill("95");
  await page.getByRole("button", { name: "Save location" }).click();
  await expect(page.getByText("Latitude runs from −90 to 90")).toBeVisible();
  await page.getByLabel("Latitude (°, north +)").fill("52.61");
  await page.getByLabel("Longitude (°, east +)").fill("0.41");
  await page.getByRole("button", { name: "Save location" }).click();
  await expect(page.getByText("Saved. The next forecast is fetched for this place (within the hour).")).toBeVisible();
  await page.reload();
  await expect(page.getByLabel("Latitude (°, north +)")).toHaveValue("52.61");
});
