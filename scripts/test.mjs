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
  spawnChild,
  startFakePayments,
  startFakeSmtp,
  startWorker,
  waitForHttp,
  startPostgres,
  stopPostgres,
  takeLock,
} from "./setup.mjs";

const started = Date.now();
// `npm test -- unit` runs one stage (static, unit, integration, e2e);
// a path narrows it (`npm test -- integration tests/integration/attacks`).
const args = process.argv.slice(2);
const filters = args.filter((a) => a.includes("/") || a.endsWith(".ts"));
const only = args.filter((a) => !filters.includes(a));
// Paths alone narrow the run to the stages they name: browser specs (a path with "e2e") to the e2e
// stage, any other path to unit and integration; the static checks always run.
const pathStage = (stage) =>
  filters.length === 0 ||
  stage === "static" ||
  (stage === "e2e" ? filters.some((f) => f.includes("e2e")) : filters.some((f) => !f.includes("e2e")));
const want = (stage) => (only.length ? only.includes(stage) : pathStage(stage));

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
  ...appEnv({
    port,
    dbName,
    smtpPort: Number(process.env.SLAB_TEST_SMTP_PORT ?? 2526),
    paymentsPort: Number(process.env.SLAB_TEST_PAYMENTS_PORT ?? 12112),
  }),
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
let payments = null;
let worker = null;
let stopApp = () => {};
let cleaned = false;
// Also on an early exit (a set-up step failing calls process.exit): leave no server running.
function cleanUp() {
  if (cleaned) return;
  cleaned = true;
  stopApp();
  smtp?.kill("SIGTERM");
  payments?.kill("SIGTERM");
  worker?.kill("SIGTERM");
  // Workers a test started in place of one it killed.
  try {
    for (const pid of fs.readFileSync(path.join(resultsDir, "extra-pids"), "utf8").split("\n").filter(Boolean)) {
      try {
        process.kill(Number(pid), "SIGTERM");
      } catch {
        // already gone
      }
    }
  } catch {
    // none
  }
  if (startedPg) stopPostgres();
  lock.release();
}
process.on("exit", cleanUp);
try {
  // Types, lint and format first: a change that breaks them fails even when only tests changed.
  if (want("static")) {
    for (const [name, cmd, args] of [
      ["typecheck", bin("tsc"), ["--noEmit"]],
      ["lint", bin("eslint"), [".", "--max-warnings=0"]],
      ["format", bin("prettier"), ["--check", ".", "--log-level=warn"]],
    ]) {
      const started = Date.now();
      const res = run(cmd, args, { allowFail: true });
      log(`${name}: ${res.status === 0 ? "clean" : "FAILED"} (${((Date.now() - started) / 1000).toFixed(0)} s)`);
      if (res.status === 0) totals.passed += 1;
      else {
        totals.failed += 1;
        exitCode = 1;
      }
    }
  }
  ensureDatabase(dbName);
  migrateAndSeed(env);
  run(bin("tsx"), ["scripts/reset-test-state.ts"], { env });
  smtp = startFakeSmtp(env);
  payments = startFakePayments(env);
  // The build worker for the plate API tests; webhooks may call the tests' receiver on loopback.
  Object.assign(env, {
    SLAB_WEBHOOK_ALLOW_HOSTS: "127.0.0.1,localhost",
    SLAB_JOB_EXPIRY_S: "6",
    SLAB_QUEUE_MAINTENANCE_S: "1",
    SLAB_THREAD_MAX_BUILDS: "5",
  });
  // Webhook deliveries on a short schedule, so the tests see a retry within seconds (defaults: 10 s, 5 s).
  Object.assign(env, { SLAB_CALLBACK_TIMEOUT_MS: "2000", SLAB_CALLBACK_RETRY_DELAY_S: "1" });
  worker = startWorker(env);
  env.SLAB_TEST_WORKER_PID = String(worker.pid);

  // One built app on the test port serves the HTTP integration tests and the browser tests.
  let app = null;
  if (want("integration") || want("e2e")) {
    ensureBuild();
    app = spawnChild(process.execPath, ["scripts/serve.mjs", "-H", "127.0.0.1", "-p", String(port)], {
      ...env,
      SLAB_MAX_UPLOAD_BYTES: String(20 * 1024 * 1024),
    });
    if (!(await waitForHttp(`http://localhost:${port}/api/health`, 120_000))) throw new Error("the test app did not start");
    env.SLAB_TEST_BASE_URL = `http://localhost:${port}`;
    env.SLAB_TEST_APP_PID = String(app.pid); // the upload tests read the app's memory from /proc
    env.SLAB_TEST_SERVER = "1";
    stopApp = () => app?.kill("SIGTERM");
  }

  if (want("unit") || want("integration")) {
    const projects = ["unit", "integration"].filter(want).flatMap((p) => ["--project", p]);
    const out = path.join(resultsDir, "vitest.json");
    const res = run(
      bin("vitest"),
      ["run", ...projects, ...filters.filter((f) => !f.includes("e2e")), "--reporter=default", "--reporter=json", `--outputFile=${out}`],
      {
        env,
        allowFail: true,
      },
    );
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
    const out = path.join(resultsDir, "playwright.json");
    const specs = filters.filter((f) => f.includes("e2e"));
    const res = run(bin("playwright"), ["test", ...specs], { env: { ...env, PLAYWRIGHT_JSON_OUTPUT_NAME: out }, allowFail: true });
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
} catch (err) {
  console.error(err);
  exitCode = 1;
  totals.failed += 1;
} finally {
  cleanUp();
}

log(`npm test took ${((Date.now() - started) / 1000).toFixed(0)} s`);
process.stdout.write(`tests: ${totals.passed} passed, ${totals.failed} failed, ${totals.skipped} skipped\n`);
if (totals.passed === 0) exitCode = 1; // a run that executed nothing is not a pass
process.exit(exitCode);
