// `npm test`: the same set-up as `npm start` against a separate test database, then unit and
// integration tests (vitest, real PostgreSQL) and browser tests (Playwright driving Debian's chromium).
// Ends with one plain line "tests: N passed, N failed, N skipped" summing every runner.
import fs from "node:fs";
import path from "node:path";
import {
  DATA,
  appEnv,
  bin,
  ensureBuild,
  ensureDatabase,
  ensureDependencies,
  ensureTestPackages,
  log,
  migrateAndSeed,
  run,
  startFakeSmtp,
  startPostgres,
  stopPostgres,
  takeLock,
} from "./setup.mjs";

const started = Date.now();
const only = process.argv.slice(2); // e.g. `npm test -- unit` runs one stage
const want = (stage) => only.length === 0 || only.includes(stage);

const lock = takeLock("test");
if (!lock.ok) {
  process.stderr.write(`✕ another npm test is running (pid ${lock.pid})\n`);
  process.exit(1);
}
ensureDependencies();
const { chromium } = ensureTestPackages();
const startedPg = startPostgres({ fast: true });
const resultsDir = path.join(DATA, "test-results");
fs.rmSync(resultsDir, { recursive: true, force: true });
fs.mkdirSync(resultsDir, { recursive: true });

const port = Number(process.env.SLAB_TEST_PORT ?? 3100);
const dbName = "slabwright_test";
const env = {
  ...appEnv({ port, dbName, smtpPort: Number(process.env.SLAB_TEST_SMTP_PORT ?? 2526) }),
  NODE_ENV: "test",
  SLAB_CREDENTIALS_FILE: path.join(DATA, "demo-credentials.test.json"),
  SLAB_TEST_PORT: String(port),
  SLAB_CHROMIUM: chromium,
};

const totals = { passed: 0, failed: 0, skipped: 0 };
let exitCode = 0;

function readJson(file) {
  try {
    return JSON.parse(fs.readFileSync(file, "utf8"));
  } catch {
    return null;
  }
}

let smtp = null;
try {
  ensureDatabase(dbName);
  migrateAndSeed(env);
  run(bin("tsx"), ["scripts/reset-test-state.ts"], { env });
  smtp = startFakeSmtp(env);

  if (want("unit") || want("integration")) {
    const projects = ["unit", "integration"].filter(want).flatMap((p) => ["--project", p]);
    const out = path.join(resultsDir, "vitest.json");
    const res = run(bin("vitest"), ["run", ...projects, "--reporter=default", "--reporter=json", `--outputFile=${out}`], { env, allowFail: true });
    const json = readJson(out);
    if (json) {
      totals.passed += json.numPassedTests ?? 0;
      totals.failed += json.numFailedTests ?? 0;
      totals.skipped += (json.numPendingTests ?? 0) + (json.numTodoTests ?? 0);
    }
    if (res.status !== 0) {
      exitCode = 1;
      if (!json || (json.numFailedTests ?? 0) === 0) totals.failed += 1; // a suite that crashed counts as a failure
    }
  }

  if (want("e2e")) {
    ensureBuild();
    const out = path.join(resultsDir, "playwright.json");
    const res = run(bin("playwright"), ["test"], { env: { ...env, PLAYWRIGHT_JSON_OUTPUT_NAME: out }, allowFail: true });
    const json = readJson(out);
    if (json?.stats) {
      totals.passed += json.stats.expected ?? 0;
      totals.failed += (json.stats.unexpected ?? 0) + (json.stats.flaky ?? 0);
      totals.skipped += json.stats.skipped ?? 0;
    }
    if (res.status !== 0) {
      exitCode = 1;
      if (!json?.stats || (json.stats.unexpected ?? 0) === 0) totals.failed += 1;
    }
  }
} finally {
  smtp?.kill("SIGTERM");
  if (startedPg) stopPostgres();
  lock.release();
}

log(`npm test took ${((Date.now() - started) / 1000).toFixed(0)} s`);
process.stdout.write(`tests: ${totals.passed} passed, ${totals.failed} failed, ${totals.skipped} skipped\n`);
if (totals.passed === 0) exitCode = 1; // a run that executed nothing is not a pass
process.exit(exitCode);
