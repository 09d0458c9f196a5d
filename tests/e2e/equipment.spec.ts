// Equipment and devices in the browser and through the API: an admin creates a device and sees
// its secret exactly once; every write refuses viewers and shift leads (403); downloads respect
// the upload's role and carry safe headers.
import sharp from "sharp";
import { apiAs, signIn, snap, type DemoRole, expect, test } from "./helpers";

test.describe("devices", () => {
  test("an admin creates a device and sees its secret exactly once", async ({ page, baseURL }) => {
    await signIn(page, "admin");
    await page.goto("/devices");
    await expect(page.getByRole("heading", { name: "Devices", exact: true })).toBeVisible();
    await expect(page.getByTestId("device-row").first()).toBeVisible();
    await snap(page, "devices");

    await page.getByLabel("Device id (code)").fill("fm-e2e-unwind");
    await page.getByLabel("Name").fill("Spare meter at the gravure unwind");
    await page.getByLabel("Point (field meter)").selectOption({ label: "Gravure Press 1 — 1. Unwind" });
    await page.getByLabel("Calibrated for, mm").fill("25");
    await page.getByLabel("Mounted at, mm").fill("50");
    // the form warns as soon as the distances differ
    await expect(page.getByTestId("equipment-warnings")).toContainText("Calibrated for 25 mm but mounted at 50 mm");
    await page.getByRole("button", { name: "Add device and issue its secret" }).click();

    const panel = page.getByTestId("device-secret-panel");
    await expect(panel).toContainText("shown only now");
    const secret = (await page.getByTestId("device-secret").textContent())?.trim() ?? "";
    expect(secret).toMatch(/^[A-Za-z0-9_-]{32}$/);
    await snap(page, "devices-secret-once");
    await expect(page.locator('[data-testid="device-row"][data-code="fm-e2e-unwind"]')).toBeVisible();

    // gone after a reload, from the page and from every API answer
    await page.reload();
    await expect(page.getByTestId("device-secret-panel")).toHaveCount(0);
    expect(await page.content()).not.toContain(secret);
    const api = await apiAs(baseURL!, "admin");
    const list = await api.get("/api/devices");
    expect(list.status()).toBe(200);
    const text = await list.text();
    expect(text).not.toContain(secret);
    expect(text).not.toMatch(/secret_?hash|sha256:/i);
    const device = (await list.json()).devices.find((d: { code: string }) => d.code === "fm-e2e-unwind");
    expect(device).toMatchObject({ kind: "field_meter", calibratedDistanceMm: 25, mountingDistanceMm: 50 });

    // the device page: history says the secret was issued; a new one is shown once as well
    await page.locator('[data-testid="device-row"][data-code="fm-e2e-unwind"]').getByRole("link").click();
    await expect(page.getByTestId("history")).toContainText("issued its secret");
    await page.getByText("Issue a new secret…").click();
    await page.getByRole("button", { name: "Issue a new secret" }).click();
    const second = (await page.getByTestId("device-secret").textContent())?.trim() ?? "";
    expect(second).toMatch(/^[A-Za-z0-9_-]{32}$/);
    expect(second).not.toBe(secret);
    await snap(page, "device-page");
    await page.reload();
    expect(await page.content()).not.toContain(second);
    await api.dispose();
  });

  test("engineers edit devices but cannot create them or issue secrets", async ({ page, baseURL }) => {
    await signIn(page, "engineer");
    await page.goto("/devices");
    await expect(page.getByRole("button", { name: "Add device and issue its secret" })).toHaveCount(0);
    const api = await apiAs(baseURL!, "engineer");
    const list = (await (await api.get("/api/devices")).json()).devices as { id: number; code: string; label: string; pointId: number }[];
    const d = list.find((x) => x.code === "fm-gravure-1-rewind")!;
    expect((await api.post("/api/devices", { data: { code: "x-eng", kind: "field_meter", label: "x" } })).status()).toBe(403);
    expect((await api.post(`/api/devices/${d.id}/secret`)).status()).toBe(403);
    expect((await api.post(`/api/devices/${d.id}/enabled`, { data: { enabled: false } })).status()).toBe(403);
    const edit = await api.patch(`/api/devices/${d.id}`, { data: { label: d.label, pointId: d.pointId, calibratedDistanceMm: 25, mountingDistanceMm: 25, calibrationDue: "2027-06-30" } });
    expect(edit.status()).toBe(200);
    expect((await edit.json()).changed).toEqual(["calibrationDue"]);
    const after = await (await api.get(`/api/devices/${d.id}`)).json();
    expect(after.device.calibrationDue).toBe("2027-06-30");
    expect(after.events[0]).toMatchObject({ kind: "edited", text: "Changed calibration due date." });
    await api.dispose();
  });
});

test.describe("equipment pages", () => {
  test("Equipment lists every neutralizer by hall; a neutralizer page shows effect, decay trend, history and the caution", async ({ page }) => {
    await signIn(page, "engineer");
    await page.goto("/equipment");
    await expect(page.getByRole("heading", { name: "Equipment", exact: true })).toBeVisible();
    await expect(page.getByTestId("neutralizer-row")).toHaveCount(17);
    await snap(page, "equipment");
    await page.locator('[data-testid="neutralizer-row"][data-tag="N-GRAVURE-1-INFEED"]').getByRole("link", { name: "N-GRAVURE-1-INFEED" }).click();
    await expect(page.getByRole("heading", { name: "N-GRAVURE-1-INFEED" })).toBeVisible();
    await expect(page.getByTestId("hv-caution")).toContainText("several kilovolts");
    await expect(page.getByTestId("effect-figures")).toContainText("Last 24 h");
    await expect(page.getByTestId("decay-projection")).toBeVisible();

    // an AC bar: the too-far warning uses its 10–50 mm range as the engineer types (common practice)
    await page.getByLabel("Distance to the web, mm").fill("80");
    await expect(page.getByTestId("equipment-warnings").last()).toContainText("usually mounted 10–50 mm from the web");
    await snap(page, "neutralizer-edit-warning");
    // a pulsed-DC bar at 300 mm is normal (100–600 mm): no warning
    await page.getByLabel("Kind").selectOption("pulsed_dc_bar");
    await page.getByLabel("Distance to the web, mm").fill("300");
    await expect(page.getByTestId("equipment-warnings")).toHaveCount(0);

    // the laminator's rewind bar has slowed since cleaning: ×2.8 its own baseline (demo checks)
    await page.goto("/equipment");
    await page.locator('[data-testid="neutralizer-row"][data-tag="N-LAMINATOR-1-REWIND"]').getByRole("link", { name: "N-LAMINATOR-1-REWIND" }).click();
    await expect(page.getByTestId("decay-slowdown")).toContainText("Slower than its own baseline by ×2.8");
    await expect(page.getByTestId("kind-spec")).toContainText("Pulsed-DC bar: usually 100–600 mm");
    await expect(page.getByTestId("check-table")).toContainText("20 pF, 150 × 150 mm");
  });
});

test.describe("roles through the API", () => {
  const writes = (id: number, deviceId: number) => [
    ["POST", "/api/equipment", { tag: "N-X", kind: "ac_bar", cleaningIntervalDays: 14, checkIntervalDays: 90, state: "in_service" }],
    ["PATCH", `/api/equipment/${id}`, { tag: "N-X", kind: "ac_bar", cleaningIntervalDays: 14, checkIntervalDays: 90, state: "removed" }],
    ["POST", `/api/equipment/${id}/cleaned`, {}],
    ["POST", `/api/equipment/${id}/notes`, { text: "x" }],
    ["POST", "/api/checks", { neutralizerId: id, checkedAt: "2026-01-01T10:00", decayPosS: 1, decayNegS: 1, offsetV: 0 }],
    ["PUT", "/api/checks/limits", {}],
    ["POST", "/api/checks/due/send", {}],
    ["POST", "/api/devices", { code: "x", kind: "field_meter", label: "x" }],
    ["PATCH", `/api/devices/${deviceId}`, { label: "x" }],
    ["POST", `/api/devices/${deviceId}/secret`, {}],
    ["POST", `/api/devices/${deviceId}/enabled`, { enabled: false }],
  ] as const;

  for (const role of ["viewer", "shift_lead"] as DemoRole[]) {
    test(`${role}: reads work, every write answers 403`, async ({ baseURL }) => {
      const api = await apiAs(baseURL!, role);
      const eq = await api.get("/api/equipment");
      expect(eq.status()).toBe(200);
      const id = (await eq.json()).neutralizers[0].id as number;
      const deviceId = (await (await api.get("/api/devices")).json()).devices[0].id as number;
      for (const path of [`/api/equipment/${id}`, "/api/checks", "/api/checks/due", "/api/checks/limits", `/api/devices/${deviceId}`]) {
        expect((await api.get(path)).status(), path).toBe(200);
      }
      for (const [method, path, data] of writes(id, deviceId)) {
        const res = await api.fetch(path, { method, data });
        expect(res.status(), `${method} ${path}`).toBe(403);
        expect((await res.json()).code).toBe("forbidden");
      }
      const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: "#777" } }).png().toBuffer();
      for (const path of ["/api/uploads", "/api/imports/preview", "/api/imports"]) {
        const res = await api.post(path, { multipart: { file: { name: "a.png", mimeType: "image/png", buffer: png }, subjectType: "neutralizer", subjectId: String(id), kind: "check_log" } });
        expect(res.status(), path).toBe(403);
      }
      await api.dispose();
    });
  }

  test("uploads: a viewer cannot open an engineer-only file; headers are safe; executables and oversized files are refused", async ({ baseURL }) => {
    const eng = await apiAs(baseURL!, "engineer");
    const viewer = await apiAs(baseURL!, "viewer");
    const id = (await (await eng.get("/api/equipment")).json()).neutralizers[0].id as number;
    const pdf = Buffer.from("%PDF-1.4\n1 0 obj\n<< /Type /Catalog >>\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n");
    const up = await eng.post("/api/uploads", {
      multipart: { file: { name: "Prüfprotokoll; decay, 03 (copy).pdf", mimeType: "application/pdf", buffer: pdf }, subjectType: "neutralizer", subjectId: String(id), minRole: "engineer" },
    });
    expect(up.status()).toBe(201);
    const uploadId = (await up.json()).id as number;

    const denied = await viewer.get(`/api/uploads/${uploadId}`);
    expect(denied.status()).toBe(403);
    expect(await denied.text()).not.toContain("%PDF");

    const ok = await eng.get(`/api/uploads/${uploadId}`);
    expect(ok.status()).toBe(200);
    expect(ok.headers()["content-type"]).toBe("application/pdf");
    expect(ok.headers()["x-content-type-options"]).toBe("nosniff");
    // RFC 6266 / RFC 5987: attachment for PDFs, an ASCII fallback and the exact UTF-8 name
    expect(ok.headers()["content-disposition"]).toBe(`attachment; filename="Pr_fprotokoll_ decay_ 03 (copy).pdf"; filename*=UTF-8''Pr%C3%BCfprotokoll%3B%20decay%2C%2003%20%28copy%29.pdf`);
    expect((await ok.body()).equals(pdf)).toBe(true);

    const jpeg = await sharp({ create: { width: 300, height: 200, channels: 3, background: "#556" } }).jpeg().toBuffer();
    const img = await eng.post("/api/uploads", { multipart: { file: { name: "bar.jpg", mimeType: "image/jpeg", buffer: jpeg }, subjectType: "neutralizer", subjectId: String(id) } });
    expect(img.status()).toBe(201);
    const imgId = (await img.json()).id as number;
    const asViewer = await viewer.get(`/api/uploads/${imgId}`);
    expect(asViewer.status()).toBe(200);
    expect(asViewer.headers()["content-disposition"]).toMatch(/^inline; /);
    const thumb = await viewer.get(`/api/uploads/${imgId}?variant=thumb`);
    expect(thumb.headers()["content-type"]).toBe("image/webp");

    const elf = Buffer.alloc(5000);
    elf.set([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01]);
    const exe = await eng.post("/api/uploads", { multipart: { file: { name: "photo.png", mimeType: "image/png", buffer: elf }, subjectType: "neutralizer", subjectId: String(id) } });
    expect(exe.status()).toBe(422);
    const big = Buffer.alloc(20 * 1024 * 1024 + 10);
    big.set([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const tooBig = await eng.post("/api/uploads", { multipart: { file: { name: "big.png", mimeType: "image/png", buffer: big }, subjectType: "neutralizer", subjectId: String(id) } });
    expect(tooBig.status()).toBe(413);
    expect((await viewer.get("/api/uploads/999999")).status()).toBe(404);
    await eng.dispose();
    await viewer.dispose();
  });
});
