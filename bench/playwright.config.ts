import { defineConfig } from "@playwright/test";

/** Benchmarks in a browser, against an app you started (`npm start`): `npx playwright test -c bench`. */
export default defineConfig({
  testDir: ".",
  testMatch: /.*\.spec\.ts/,
  timeout: 120_000,
  workers: 1,
  reporter: [["list"]],
  outputDir: "../.data/bench-results",
  use: {
    baseURL: process.env.SLAB_BENCH_URL ?? "http://localhost:3000",
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
      ],
    },
  },
});
