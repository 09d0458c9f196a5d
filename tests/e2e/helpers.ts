// Shared browser-test helpers: sign in through the real sign-in page as a demo person.
import { expect, type APIRequestContext, type Page, request as pwRequest } from "@playwright/test";
import { DEMO_PEOPLE } from "../../lib/demo-plant";

export type DemoRole = "viewer" | "shift_lead" | "engineer" | "admin";

export function demoPerson(role: DemoRole) {
  return DEMO_PEOPLE.find((p) => p.role === role)!;
}

export async function signIn(page: Page, role: DemoRole) {
  const p = demoPerson(role);
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(p.email);
  await page.getByLabel("Password").fill(p.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL("**/floor");
  await expect(page.getByTestId("signed-in-as")).toContainText(p.name);
}

/** An API client carrying a real session cookie of the given demo person. */
export async function apiAs(baseURL: string, role: DemoRole): Promise<APIRequestContext> {
  const p = demoPerson(role);
  const ctx = await pwRequest.newContext({ baseURL });
  const csrf = await (await ctx.get("/api/auth/csrf")).json();
  const res = await ctx.post("/api/auth/callback/credentials", {
    form: { csrfToken: csrf.csrfToken, email: p.email, password: p.password, json: "true" },
  });
  expect(res.status(), `sign-in of ${role}`).toBeLessThan(400);
  const me = await ctx.get("/api/me");
  expect(me.status(), `session of ${role}`).toBe(200);
  return ctx;
}

/** Saves a screenshot into the test output folder (never committed). */
export async function snap(page: Page, name: string) {
  const dir = process.env.PW_OUTPUT_DIR ?? ".data/test-output/e2e";
  await page.screenshot({ path: `${dir}/screens/${name}.png`, fullPage: false });
}
