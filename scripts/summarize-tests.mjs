// Adds up the Vitest and Playwright JSON reports of one run, and the lint and layer checks
// (check-*.json, one test each), into the line CI reads: "N passed, N failed".
import fs from "node:fs";
import path from "node:path";

const dir = process.argv[2];
let passed = 0;
let failed = 0;
for (const f of fs.existsSync(dir) ? fs.readdirSync(dir) : []) {
  const file = path.join(dir, f);
  if (f.startsWith("vitest-") && f.endsWith(".json")) {
    const r = JSON.parse(fs.readFileSync(file, "utf8"));
    passed += r.numPassedTests ?? 0;
    failed += (r.numFailedTests ?? 0) + (r.numFailedTestSuites && !r.numFailedTests ? r.numFailedTestSuites : 0);
  } else if (f === "playwright.json") {
    const r = JSON.parse(fs.readFileSync(file, "utf8"));
    passed += (r.stats?.expected ?? 0) + (r.stats?.flaky ?? 0);
    failed += (r.stats?.unexpected ?? 0) + (r.errors?.length ? 1 : 0);
  } else if (f.startsWith("check-") && f.endsWith(".json")) {
    const r = JSON.parse(fs.readFileSync(file, "utf8"));
    if (r.ok === true) passed += 1;
    else failed += 1;
  }
}
console.log(`${passed} passed, ${failed} failed`);
