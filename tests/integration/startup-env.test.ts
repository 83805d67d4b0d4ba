import { spawn } from "node:child_process";
import path from "node:path";
import { describe, expect, it } from "vitest";

// `next start` of the built app in production without its secrets. ASVS 4.0 V2.10.4 / V6.4.1 (no
// secret in the source to fall back to) and V14.1.x (a deployment that is not configured does not run).
const port = Number(process.env.SLAB_TEST_PORT ?? 3100) + 7;

function startWithout(names: string[]): Promise<{ code: number | null; output: string; killed: boolean }> {
  const env: NodeJS.ProcessEnv = { ...process.env, NODE_ENV: "production" };
  for (const n of names) delete env[n];
  const child = spawn(path.resolve("node_modules/.bin/next"), ["start", "-H", "127.0.0.1", "-p", String(port)], {
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  let output = "";
  child.stdout.on("data", (c) => (output += String(c)));
  child.stderr.on("data", (c) => (output += String(c)));
  return new Promise((resolve) => {
    const timer = setTimeout(() => {
      child.kill("SIGKILL");
      resolve({ code: null, output, killed: true });
    }, 20_000);
    child.on("exit", (code) => {
      clearTimeout(timer);
      resolve({ code, output, killed: false });
    });
  });
}

describe("production start-up without its secrets", () => {
  it("refuses to start without STRIPE_WEBHOOK_SECRET and AUTH_SECRET, and says which are missing", async () => {
    const r = await startWithout(["STRIPE_WEBHOOK_SECRET", "AUTH_SECRET"]);
    expect(r.killed, r.output).toBe(false);
    expect(r.code).not.toBe(0);
    expect(r.output).toContain("AUTH_SECRET");
    expect(r.output).toContain("STRIPE_WEBHOOK_SECRET");
  }, 30_000);
});
