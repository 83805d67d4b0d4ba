import { defineConfig, devices } from "@playwright/test";

const port = Number(process.env.SLAB_TEST_PORT ?? 3100);
// Browse on localhost, not 127.0.0.1: Next rewrites the host and Auth.js cookies follow it.
const baseURL = `http://localhost:${port}`;

export default defineConfig({
  testDir: "tests/e2e",
  timeout: 30_000,
  // Sign-in waits on bcrypt (≈0.2 s a check); on a busy two-core machine a page can take seconds.
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: process.env.PLAYWRIGHT_JSON_OUTPUT_NAME ? [["list"], ["json"]] : [["list"]],
  outputDir: ".data/test-results/playwright",
  use: {
    baseURL,
    trace: "retain-on-failure",
    screenshot: "only-on-failure",
    launchOptions: {
      executablePath: process.env.SLAB_CHROMIUM ?? "/usr/bin/chromium",
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
    },
  },
  projects: [
    { name: "desktop", use: { ...devices["Desktop Chrome"], channel: undefined }, grepInvert: /@phone/ },
    { name: "phone", use: { ...devices["Pixel 7"], channel: undefined }, grep: /@phone/ },
  ],
  // npm test starts the app itself (shared with the HTTP integration tests); run alone, Playwright does.
  webServer:
    process.env.SLAB_TEST_SERVER === "1"
      ? undefined
      : {
          command: `node scripts/serve.mjs -H 127.0.0.1 -p ${port}`,
          url: `${baseURL}/api/health`,
          reuseExistingServer: false,
          timeout: 120_000,
          stdout: "ignore",
          stderr: "pipe",
        },
});
