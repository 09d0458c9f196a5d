import { apiAs, signIn, snap, type DemoRole, expect, test } from "./helpers";

const roles: DemoRole[] = ["viewer", "shift_lead", "engineer", "admin"];

test.describe("sign-in", () => {
  for (const role of roles) {
    test(`${role} signs in and lands on the Floor`, async ({ page }) => {
      await signIn(page, role);
      await expect(page.getByRole("heading", { name: "Floor" })).toBeVisible();
      await expect(page.getByTestId("floor-line").first()).toBeVisible();
      const people = page.getByRole("link", { name: "People" });
      if (role === "admin") await expect(people).toBeVisible();
      else await expect(people).toHaveCount(0);
    });
  }

  test("a wrong password is refused with a clear message", async ({ page }) => {
    await page.goto("/sign-in");
    await page.getByLabel("E-mail").fill("viewer@harrowfen.example");
    await page.getByLabel("Password").fill("definitely-wrong");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.getByRole("alert").filter({ hasText: "Wrong" })).toContainText("Wrong e-mail or password");
    await expect(page).toHaveURL(/sign-in/);
    await snap(page, "sign-in-error");
  });

  test("signed-out visitors are sent to sign-in; API answers 401", async ({ page, request }) => {
    await page.goto("/floor");
    await expect(page).toHaveURL(/sign-in/);
    expect((await request.get("/api/plant")).status()).toBe(401);
  });

  test("unknown pages and API paths give 404", async ({ page, request }) => {
    await signIn(page, "viewer");
    const res = await page.goto("/no-such-page");
    expect(res?.status()).toBe(404);
    await expect(page.getByText("Page not found")).toBeVisible();
    expect((await request.get("/api/no-such-thing")).status()).toBe(404);
  });
});

test.describe("roles through the API", () => {
  test("only admins may list people; no response carries a password hash", async ({ baseURL }) => {
    for (const role of roles) {
      const api = await apiAs(baseURL!, role);
      const res = await api.get("/api/people");
      expect(res.status(), role).toBe(role === "admin" ? 200 : 403);
      const body = await res.text();
      expect(body).not.toMatch(/\$2[aby]\$|password_?hash/i);
      const me = await (await api.get("/api/me")).json();
      expect(me.person.role).toBe(role);
      expect(JSON.stringify(me)).not.toMatch(/\$2[aby]\$/);
      await api.dispose();
    }
  });

  test("a viewer opening People sees a 403 message, not the page", async ({ page }) => {
    await signIn(page, "viewer");
    await page.goto("/people");
    await expect(page.getByText("Not allowed (403)")).toBeVisible();
    await expect(page.getByTestId("person-row")).toHaveCount(0);
  });

  test("an admin adds a person who can then sign in", async ({ page, browser }) => {
    await signIn(page, "admin");
    await page.getByRole("link", { name: "People" }).click();
    await expect(page.getByRole("heading", { name: "People", exact: true })).toBeVisible();
    await snap(page, "people");
    const email = `new.${Date.now()}@harrowfen.example`;
    const form = page.locator("form", { has: page.getByRole("button", { name: "Add person" }) });
    await form.getByLabel("Name").fill("Alex Newcombe");
    await form.getByLabel("E-mail").fill(email);
    await form.getByLabel("Role").selectOption("shift_lead");
    await form.getByLabel("First password").fill("first-pass-2026");
    await form.getByRole("button", { name: "Add person" }).click();
    await expect(page.locator(`[data-email="${email}"]`)).toBeVisible();

    const other = await browser.newPage();
    await other.goto("/sign-in");
    await other.getByLabel("E-mail").fill(email);
    await other.getByLabel("Password").fill("first-pass-2026");
    await other.getByRole("button", { name: "Sign in" }).click();
    await other.waitForURL("**/floor");
    await expect(other.getByTestId("signed-in-as")).toContainText("Shift lead");
    await other.close();
  });
});
