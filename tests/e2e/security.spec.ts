// Hardening seen from outside: headers on pages, API answers and files; the after-sign-in
// destination; refusal of foreign origins; sessions ended by a password reset; body limits that
// bite while the body streams in; the live stream cap; the sign-in throttle behind a forged
// X-Forwarded-For; what viewers are told about restricted files and the on-call roster.
import http from "node:http";
import sharp from "sharp";
import type { APIRequestContext } from "@playwright/test";
import { DEMO_PEOPLE } from "../../lib/demo-plant";
import { apiAs, expect, signIn, test } from "./helpers";

const MB = 1024 * 1024;

async function cookieHeader(api: APIRequestContext): Promise<string> {
  const state = await api.storageState();
  return state.cookies.map((c) => `${c.name}=${c.value}`).join("; ");
}

async function apiWith(baseURL: string, email: string, password: string): Promise<APIRequestContext> {
  const { request } = await import("@playwright/test");
  const ctx = await request.newContext({ baseURL });
  const csrf = await (await ctx.get("/api/auth/csrf")).json();
  const res = await ctx.post("/api/auth/callback/credentials", { form: { csrfToken: csrf.csrfToken, email, password, json: "true" } });
  expect(res.status()).toBeLessThan(400);
  return ctx;
}

test.describe("security headers", () => {
  test("pages, API answers, files and static assets carry them", async ({ page, baseURL, request }) => {
    const pageRes = await request.get("/sign-in");
    const csp = pageRes.headers()["content-security-policy"];
    expect(csp).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
    expect(csp).toContain("frame-ancestors 'none'");
    // the nonce is fresh per request and is the one on Next's inline scripts
    const nonce = /'nonce-([^']+)'/.exec(csp)![1];
    const html = await pageRes.text();
    expect(html).toContain(`nonce="${nonce}"`);
    expect(/'nonce-([^']+)'/.exec((await request.get("/sign-in")).headers()["content-security-policy"])![1]).not.toBe(nonce);

    const api = await request.get("/api/plant");
    expect(api.status()).toBe(401);
    const eng = await apiAs(baseURL!, "engineer");
    const asset = /src="(\/_next\/static\/[^"]+\.js)"/.exec(html)![1];
    for (const res of [pageRes, api, await eng.get("/api/plant"), await request.get(asset)]) {
      const h = res.headers();
      expect(h["x-content-type-options"], res.url()).toBe("nosniff");
      expect(h["referrer-policy"], res.url()).toBe("same-origin");
      expect(h["x-frame-options"], res.url()).toBe("DENY");
      expect(h["permissions-policy"], res.url()).toContain("camera=()");
      expect(h["content-security-policy"], res.url()).toContain("frame-ancestors 'none'");
    }

    // a restricted file: its own sandboxing CSP, and never kept in a shared PC's cache
    const { neutralizers } = await (await eng.get("/api/equipment")).json();
    const id = neutralizers[0].id as number;
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: "#345" } }).png().toBuffer();
    const up = await eng.post("/api/uploads", { multipart: { file: { name: "restricted.png", mimeType: "image/png", buffer: png }, subjectType: "neutralizer", subjectId: String(id), minRole: "engineer" } });
    expect(up.status()).toBe(201);
    const uploadId = (await up.json()).id as number;
    const file = await eng.get(`/api/uploads/${uploadId}`);
    expect(file.status()).toBe(200);
    expect(file.headers()["cache-control"]).toBe("no-store");
    expect(file.headers()["content-security-policy"]).toContain("sandbox");
    expect(file.headers()["x-frame-options"]).toBe("DENY");

    // viewers see that it exists, but neither who uploaded it nor where it is stored
    const viewer = await apiAs(baseURL!, "viewer");
    const detail = await (await viewer.get(`/api/equipment/${id}`)).json();
    const listed = detail.uploads.find((u: { id: number }) => u.id === uploadId);
    expect(listed).toMatchObject({ restricted: true, personName: null });
    expect(JSON.stringify(detail.uploads)).not.toMatch(/storageKey|thumbnailKey|\d{4}\/\d{2}\/[0-9a-f-]{36}/);
    expect((await viewer.get(`/api/uploads/${uploadId}`)).status()).toBe(403);
    const engDetail = await (await eng.get(`/api/equipment/${id}`)).json();
    expect(engDetail.uploads.find((u: { id: number }) => u.id === uploadId).personName).toBeTruthy();

    // and the on-call roster shows them names, not e-mail addresses
    const roster = await (await viewer.get("/api/oncall")).json();
    expect(JSON.stringify(roster)).not.toMatch(/@/);
    await Promise.all([eng.dispose(), viewer.dispose()]);
    void page;
  });
});

test.describe("sign-in", () => {
  test("a /\\evil.example callback lands on the Floor", async ({ page }) => {
    const lead = DEMO_PEOPLE.find((p) => p.role === "shift_lead")!;
    await page.goto(`/sign-in?callbackUrl=${encodeURIComponent("/\\evil.example")}`);
    await page.getByLabel("E-mail").fill(lead.email);
    await page.getByLabel("Password").fill(lead.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL("**/floor");
    expect(new URL(page.url()).host).toBe(new URL(test.info().project.use.baseURL ?? "http://127.0.0.1:3100").host);
  });

  test("a forged X-Forwarded-For does not get past the limit", async ({ baseURL }) => {
    const { request } = await import("@playwright/test");
    const ctx = await request.newContext({ baseURL });
    const email = `xff-probe-${Date.now()}@harrowfen.example`;
    const urls: string[] = [];
    for (let i = 0; i < 6; i++) {
      const csrf = await (await ctx.get("/api/auth/csrf")).json();
      const res = await ctx.post("/api/auth/callback/credentials", {
        form: { csrfToken: csrf.csrfToken, email, password: `guess-${i}`, json: "true" },
        headers: { "X-Forwarded-For": `10.77.${i}.1`, "X-Real-IP": `10.78.${i}.1` },
      });
      urls.push(decodeURIComponent((await res.json()).url));
    }
    expect(urls.slice(0, 5).every((u) => u.includes("error=wrong"))).toBe(true);
    expect(urls[5]).toMatch(/error=wait:\d+/);
    await ctx.dispose();
  });

  test("a password reset ends the other session", async ({ page, browser }) => {
    await signIn(page, "admin");
    await page.goto("/people");
    const email = `reset.${Date.now()}@harrowfen.example`;
    const form = page.locator("form", { has: page.getByRole("button", { name: "Add person" }) });
    await form.getByLabel("Name").fill("Robin Resetter");
    await form.getByLabel("E-mail").fill(email);
    await form.getByLabel("Role").selectOption("viewer");
    await form.getByLabel("First password").fill("first-pass-2026");
    await form.getByRole("button", { name: "Add person" }).click();
    await expect(page.locator(`[data-email="${email}"]`)).toBeVisible();

    const ctx = await browser.newContext();
    const other = await ctx.newPage();
    await other.goto("/sign-in");
    await other.getByLabel("E-mail").fill(email);
    await other.getByLabel("Password").fill("first-pass-2026");
    await other.getByRole("button", { name: "Sign in" }).click();
    await other.waitForURL("**/floor");
    expect((await other.request.get("/api/me")).status()).toBe(200);

    const resetForm = page.locator("form", { has: page.getByLabel("New password for Robin Resetter") });
    await resetForm.getByLabel("New password for Robin Resetter").fill("second-pass-2026");
    await resetForm.getByRole("button", { name: "Reset" }).click();
    await expect.poll(async () => (await other.request.get("/api/me")).status()).toBe(401);
    await other.goto("/floor");
    await expect(other).toHaveURL(/sign-in/);
    await ctx.close();
  });
});

test.describe("requests", () => {
  test("a POST from a foreign Origin is refused, to a route handler and to a server action", async ({ baseURL }) => {
    const lead = await apiAs(baseURL!, "shift_lead");
    const foreign = await lead.post("/api/notes", { headers: { Origin: "http://evil.example", "Sec-Fetch-Site": "cross-site" }, data: { lineId: 1, text: "x" } });
    expect(foreign.status()).toBe(403);
    const otherPort = await lead.post("/api/notes", { headers: { Origin: "http://127.0.0.1:9" }, data: { lineId: 1, text: "x" } });
    expect(otherPort.status()).toBe(403);
    const action = await lead.post("/people", { headers: { Origin: "http://evil.example", "Next-Action": "0".repeat(40) }, data: "[]" });
    expect(action.status()).toBe(403);
    // the same request from our own origin gets past the check (and on to validation)
    const own = await lead.post("/api/notes", { headers: { Origin: new URL(baseURL!).origin }, data: {} });
    expect(own.status()).toBe(400);
    await lead.dispose();
  });

  test("a 30 MB chunked upload is cut off at 20 MB without being buffered", async ({ baseURL }) => {
    test.setTimeout(120_000);
    const eng = await apiAs(baseURL!, "engineer");
    const cookie = await cookieHeader(eng);
    const url = new URL("/api/uploads", baseURL);
    const boundary = "----stillfield-limit-test";
    const result = await new Promise<{ status: number; sentAtResponse: number; body: string }>((resolve, reject) => {
      let sent = 0;
      let responded = false;
      const req = http.request({ host: url.hostname, port: url.port, path: url.pathname, method: "POST", headers: { cookie, origin: url.origin, "content-type": `multipart/form-data; boundary=${boundary}`, "transfer-encoding": "chunked" } });
      req.on("response", (res) => {
        responded = true;
        const sentAtResponse = sent;
        let body = "";
        res.setEncoding("utf8");
        res.on("data", (c) => (body += c));
        res.on("end", () => {
          resolve({ status: res.statusCode ?? 0, sentAtResponse, body });
          req.destroy();
        });
      });
      req.on("error", (err) => (responded ? undefined : reject(err)));
      const chunk = Buffer.alloc(256 * 1024, 0x41);
      const write = () => {
        if (sent === 0) req.write(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.png"\r\nContent-Type: image/png\r\n\r\n`);
        while (!responded && sent < 30 * MB) {
          sent += chunk.length;
          if (!req.write(chunk)) return void req.once("drain", write);
        }
        if (!responded) req.end(`\r\n--${boundary}--\r\n`);
      };
      write();
    });
    expect(result.status).toBe(413);
    expect(JSON.parse(result.body).code).toBe("too_large");
    // the answer came while the body was still streaming: past 20 MB, well before 30 MB
    expect(result.sentAtResponse).toBeGreaterThan(20 * MB);
    expect(result.sentAtResponse).toBeLessThan(28 * MB);
    await eng.dispose();
  });

  test("a person's 21st live stream is refused", async ({ baseURL }) => {
    const oncall = DEMO_PEOPLE.find((p) => p.email.startsWith("oncall@"))!;
    const api = await apiWith(baseURL!, oncall.email, oncall.password);
    const cookie = await cookieHeader(api);
    const url = new URL("/api/live?scope=plant", baseURL);
    const open: http.ClientRequest[] = [];
    const openStream = () =>
      new Promise<number>((resolve, reject) => {
        const req = http.get({ host: url.hostname, port: url.port, path: `${url.pathname}${url.search}`, headers: { cookie, accept: "text/event-stream" } }, (res) => {
          resolve(res.statusCode ?? 0);
          if (res.statusCode !== 200) res.resume();
        });
        req.on("error", reject);
        open.push(req);
      });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 20; i++) statuses.push(await openStream());
      expect(statuses.every((s) => s === 200)).toBe(true);
      expect(await openStream()).toBe(429);
      // closing one frees a place
      open[0].destroy();
      await expect.poll(openStream, { timeout: 10_000 }).toBe(200);
    } finally {
      for (const r of open) r.destroy();
      await api.dispose();
    }
  });
});
