import path from "node:path";
import { defineConfig } from "vitest/config";

const alias = { "@": path.resolve(import.meta.dirname) };
// `server-only` throws outside a React server bundle; tests import server modules directly.
const serverOnly = { "server-only": path.resolve(import.meta.dirname, "tests/support/server-only.ts") };

export default defineConfig({
  resolve: { alias: { ...alias, ...serverOnly } },
  test: {
    projects: [
      {
        extends: true,
        // Kernel tests take seconds on a busy two-core machine; the default 5 s is too tight there.
        test: {
          name: "unit",
          include: ["lib/**/*.test.ts", "scripts/**/*.test.ts", "app/**/*.test.ts"],
          environment: "node",
          testTimeout: 30_000,
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          // Files share one test database; run them one after another.
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
    ],
  },
});
