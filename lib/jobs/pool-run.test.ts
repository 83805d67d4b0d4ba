import type { Piscina } from "piscina";
import { describe, expect, it } from "vitest";
import { runOnPool } from "./pool-run";

// The rejection piscina gives a task whose thread exits (node_modules/piscina/dist/index.js: "worker
// exited with code: ${code}"): code 0 is a build thread retiring on purpose, anything else a crash.
const pool = (failures: Error[]) => {
  let calls = 0;
  return {
    calls: () => calls,
    pool: { run: async (task: unknown) => (calls++ < failures.length ? Promise.reject(failures[calls - 1]) : task) } as unknown as Piscina,
  };
};

describe("runOnPool", () => {
  it("gives a task again when its thread was retiring", async () => {
    const p = pool([new Error("worker exited with code: 0")]);
    await expect(runOnPool(p.pool, { plate: 1 })).resolves.toEqual({ plate: 1 });
    expect(p.calls()).toBe(2);
  });

  it("lets a crash through, and stops after three retirements in a row", async () => {
    await expect(runOnPool(pool([new Error("worker exited with code: 1")]).pool, {})).rejects.toThrow("code: 1");
    const p = pool([0, 0, 0, 0].map(() => new Error("worker exited with code: 0")));
    await expect(runOnPool(p.pool, {})).rejects.toThrow("code: 0");
    expect(p.calls()).toBe(3);
  });
});
