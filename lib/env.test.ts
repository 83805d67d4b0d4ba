import { describe, expect, it } from "vitest";
import { parseEnv, requireStartupSecrets } from "./env";

// The environment rules for secrets. ASVS 4.0 V2.10.4 and V6.4.1: no secret has a value in the source
// code; each comes from the environment (generated per installation by npm start / npm test).
const strong = (n: number) => "x".repeat(n);

describe("lib/env secrets", () => {
  it("has no default for any secret", () => {
    const e = parseEnv({ NODE_ENV: "development" });
    expect(e.AUTH_SECRET).toBeUndefined();
    expect(e.STRIPE_WEBHOOK_SECRET).toBeUndefined();
    expect(e.STRIPE_SECRET_KEY).toBeUndefined();
  });

  // ASVS 4.0 V14.1.x / V2.10.4: production refuses to start without its secrets, with a clear message.
  it("refuses production without STRIPE_WEBHOOK_SECRET and AUTH_SECRET, naming both", () => {
    expect(() => requireStartupSecrets(parseEnv({ NODE_ENV: "production" }))).toThrow(/AUTH_SECRET[\s\S]*STRIPE_WEBHOOK_SECRET/);
    expect(() => requireStartupSecrets(parseEnv({ NODE_ENV: "production", AUTH_SECRET: strong(40) }))).toThrow(/STRIPE_WEBHOOK_SECRET/);
    expect(() => requireStartupSecrets(parseEnv({ NODE_ENV: "production", STRIPE_WEBHOOK_SECRET: `whsec_${strong(32)}` }))).toThrow(
      /AUTH_SECRET/,
    );
    expect(() =>
      requireStartupSecrets(parseEnv({ NODE_ENV: "production", AUTH_SECRET: strong(40), STRIPE_WEBHOOK_SECRET: `whsec_${strong(32)}` })),
    ).not.toThrow();
  });

  it("refuses the values that used to be written in the source", () => {
    expect(() => parseEnv({ NODE_ENV: "production", AUTH_SECRET: strong(40), STRIPE_WEBHOOK_SECRET: "whsec_local_fake_secret" })).toThrow(
      /STRIPE_WEBHOOK_SECRET/,
    );
    expect(() => parseEnv({ NODE_ENV: "production", STRIPE_SECRET_KEY: "sk_test_local_fake" })).toThrow(/STRIPE_SECRET_KEY/);
  });

  it("refuses a short AUTH_SECRET (at least 32 characters)", () => {
    expect(() => parseEnv({ NODE_ENV: "production", AUTH_SECRET: "short" })).toThrow(/AUTH_SECRET/);
  });

  it("lets development and tests run without them (the set-up supplies them)", () => {
    expect(() => requireStartupSecrets(parseEnv({ NODE_ENV: "development" }))).not.toThrow();
    expect(() => requireStartupSecrets(parseEnv({ NODE_ENV: "test" }))).not.toThrow();
  });

  it("checks the tuning variables' ranges and gives their defaults", () => {
    const e = parseEnv({});
    expect([e.SLAB_SYNC_WAIT_MS, e.SLAB_JOB_EXPIRY_S, e.SLAB_CALLBACK_TIMEOUT_MS, e.SLAB_THREAD_NICE, e.SLAB_MAX_UPLOAD_BYTES]).toEqual([
      20_000,
      60,
      10_000,
      19,
      200 * 1024 * 1024,
    ]);
    expect(parseEnv({ SLAB_THREAD_NICE: "5", SLAB_CALLBACK_RETRY_LIMIT: "0" })).toMatchObject({
      SLAB_THREAD_NICE: 5,
      SLAB_CALLBACK_RETRY_LIMIT: 0,
    });
    // Unix nice values run 0..19 for an unprivileged process (POSIX nice(3), setpriority(2)).
    expect(() => parseEnv({ SLAB_THREAD_NICE: "25" })).toThrow(/SLAB_THREAD_NICE/);
    expect(() => parseEnv({ SLAB_SYNC_WAIT_MS: "soon" })).toThrow(/SLAB_SYNC_WAIT_MS/);
    expect(() => parseEnv({ SLAB_MAX_UPLOAD_BYTES: "-1" })).toThrow(/SLAB_MAX_UPLOAD_BYTES/);
  });
});
