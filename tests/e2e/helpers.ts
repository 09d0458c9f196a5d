// Shared browser-test helpers: sign in through the real sign-in page as a demo person, and the
// `test` every spec uses: it records Content Security Policy violations in every page of the
// test (the browser's report and its console message) and fails the test on any.
import { test as base, expect, type APIRequestContext, type Page, request as pwRequest } from "@playwright/test";

export { expect };

export const test = base.extend<{ cspViolations: string[] }>({
  cspViolations: [
    async ({ context }, use, testInfo) => {
      const violations: string[] = [];
      await context.exposeBinding("__stillfieldCspViolation", (_source, text: string) => void violations.push(text));
      await context.addInitScript(() => {
        document.addEventListener("securitypolicyviolation", (e) => {
          const w = window as unknown as { __stillfieldCspViolation?: (t: string) => void };
          w.__stillfieldCspViolation?.(`${e.violatedDirective} blocked ${e.blockedURI || "inline"} at ${e.sourceFile || location.pathname}:${e.lineNumber}`);
        });
      });
      context.on("console", (msg) => {
        if (msg.type() === "error" && /Content Security Policy/i.test(msg.text())) violations.push(msg.text().slice(0, 300));
      });
      await use(violations);
      if (violations.length) await testInfo.attach("csp-violations", { body: violations.join("\n"), contentType: "text/plain" });
      expect(violations, "Content Security Policy violations").toEqual([]);
    },
    { auto: true },
  ],
});
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
