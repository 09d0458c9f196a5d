// Browser tests drive Debian's Chromium (/usr/bin/chromium); Playwright's own browser download
// is never used. The stack (app, broker, worker, mail sink) is started by scripts/test.sh.
import { defineConfig } from "@playwright/test";

const baseURL = process.env.APP_URL ?? "http://127.0.0.1:3100";

export default defineConfig({
  testDir: "tests/e2e",
  outputDir: process.env.PW_OUTPUT_DIR ?? ".data/test-output/e2e",
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  use: {
    baseURL,
    viewport: { width: 1366, height: 768 },
    trace: "off",
    screenshot: "only-on-failure",
    launchOptions: {
      executablePath: "/usr/bin/chromium",
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1",
      ],
    },
  },
});
