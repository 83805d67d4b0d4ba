// Set-up steps shared by `npm start` and `npm test`. Plain Node with no dependencies: this file runs
// before node_modules exists.
import { spawn, spawnSync } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { databaseName, databaseUrl, pgPort } from "./db-url.mjs";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
export const DATA = path.join(ROOT, ".data");

export function log(msg) {
  process.stdout.write(`» ${msg}\n`);
}

export function fail(msg) {
  process.stderr.write(`✕ ${msg}\n`);
  process.exit(1);
}

/** Run a command to completion with inherited output; exit on failure unless allowFail. */
export function run(cmd, args, { env = {}, allowFail = false, quiet = false } = {}) {
  const res = spawnSync(cmd, args, {
    cwd: ROOT,
    stdio: quiet ? ["ignore", "pipe", "pipe"] : "inherit",
    env: { ...process.env, ...env },
  });
  if (res.status !== 0 && !allowFail) {
    if (quiet) process.stderr.write(String(res.stderr ?? ""));
    fail(`${cmd} ${args.join(" ")} failed (exit ${res.status ?? res.signal})`);
  }
  return res;
}

export function bin(name) {
  return path.join(ROOT, "node_modules", ".bin", name);
}

function sha256File(file) {
  return createHash("sha256").update(fs.readFileSync(file)).digest("hex");
}

/** `npm ci` when node_modules is missing or was installed from another package-lock.json. */
export function ensureDependencies() {
  const stamp = path.join(ROOT, "node_modules", ".slabwright-lock");
  const want = sha256File(path.join(ROOT, "package-lock.json"));
  const have = fs.existsSync(stamp) ? fs.readFileSync(stamp, "utf8").trim() : "";
  if (have === want && fs.existsSync(bin("next"))) return;
  log(fs.existsSync(path.join(ROOT, "node_modules")) ? "dependencies changed: npm ci" : "installing dependencies: npm ci");
  run("npm", ["ci", "--no-audit", "--no-fund"]);
  fs.writeFileSync(stamp, `${want}\n`);
}

/**
 * Debian packages the tests use: chromium for the browser tests (never a browser download of the
 * test tool's own), admesh, an independent STL checker, and poppler-utils (pdftoppm renders the
 * plate map PDF to a picture whose QR code a test decodes). Installed in one apt-get run when missing.
 */
const TEST_PACKAGES = [
  { pkg: "chromium", file: "/usr/bin/chromium" },
  { pkg: "admesh", file: "/usr/bin/admesh" },
  { pkg: "poppler-utils", file: "/usr/bin/pdftoppm" },
];

export function ensureTestPackages() {
  const missing = TEST_PACKAGES.filter((p) => !fs.existsSync(p.file));
  if (missing.length > 0) {
    const names = missing.map((p) => p.pkg);
    log(`installing Debian's ${names.join(", ")} for the tests`);
    if (process.getuid?.() !== 0) fail(`missing ${names.join(", ")}: run 'apt-get install ${names.join(" ")}' as root`);
    run("apt-get", ["update", "-qq"], { env: { DEBIAN_FRONTEND: "noninteractive" } });
    run("apt-get", ["install", "-y", "-qq", ...names], { env: { DEBIAN_FRONTEND: "noninteractive" } });
    for (const p of missing) if (!fs.existsSync(p.file)) fail(`${p.pkg} did not install`);
  }
  return { chromium: "/usr/bin/chromium" };
}

export function pgRunning() {
  return run("bash", ["scripts/pg.sh", "status"], { allowFail: true, quiet: true }).status === 0;
}

/** Start our PostgreSQL when it is not running. Returns true when this call started it. */
export function startPostgres({ fast = false } = {}) {
  if (process.env.DATABASE_URL) return false; // someone else's server
  const wasRunning = pgRunning();
  run("bash", ["scripts/pg.sh", "start"], { env: fast ? { SLAB_PG_FAST: "1" } : {} });
  return !wasRunning;
}

export function stopPostgres() {
  run("bash", ["scripts/pg.sh", "stop"], { allowFail: true });
}

export function ensureDatabase(name) {
  if (process.env.DATABASE_URL) return;
  run("bash", ["scripts/pg.sh", "ensure-db", name]);
}

export function migrateAndSeed(env) {
  run(bin("tsx"), ["scripts/migrate.ts"], { env });
  run(bin("tsx"), ["db/seed.ts"], { env });
}

/**
 * A random secret made once per installation and kept in .data/ (mode 0600, never in the source or
 * the repository). The environment wins: a deployment sets its own.
 */
export function localSecret(envName, file, make) {
  const fromEnv = envName ? process.env[envName] : undefined;
  if (fromEnv) return fromEnv;
  const full = path.join(DATA, file);
  fs.mkdirSync(DATA, { recursive: true });
  try {
    fs.writeFileSync(full, make(), { mode: 0o600, flag: "wx" }); // "wx": never overwrite a kept one
  } catch (err) {
    if (err?.code !== "EEXIST") throw err;
  }
  fs.chmodSync(full, 0o600);
  const value = fs.readFileSync(full, "utf8").trim();
  if (!value) fail(`${full} is empty: delete it to make a new secret`);
  return value;
}

/** Signs session tokens (Auth.js). */
export const authSecret = () => localSecret("AUTH_SECRET", "auth-secret", () => randomBytes(32).toString("base64url"));

/**
 * The local fake payment provider's two secrets, shared by the app and scripts/fake-payments.ts: the
 * API key the SDK authenticates with and the key webhook events are signed with.
 */
export const fakePaymentsSecrets = () => ({
  STRIPE_SECRET_KEY: localSecret(null, "payments-api-key", () => `sk_test_${randomBytes(24).toString("base64url")}`),
  STRIPE_WEBHOOK_SECRET: localSecret(
    "STRIPE_WEBHOOK_SECRET",
    "payments-webhook-secret",
    () => `whsec_${randomBytes(32).toString("base64url")}`,
  ),
});

const BUILD_INPUTS = [
  "app",
  "lib",
  "proxy.ts",
  "instrumentation.ts",
  "db/schema",
  "db/queries",
  "db/index.ts",
  "fonts",
  "public",
  "types",
  "next.config.mjs",
  "tailwind.config.ts",
  "postcss.config.mjs",
  "tsconfig.json",
  "package-lock.json",
];

function sourceHash() {
  const h = createHash("sha256");
  const walk = (p) => {
    const full = path.join(ROOT, p);
    if (!fs.existsSync(full)) return;
    const st = fs.statSync(full);
    if (st.isDirectory()) {
      for (const name of fs.readdirSync(full).sort()) walk(path.join(p, name));
    } else if (!/\.test\.tsx?$/.test(p)) {
      h.update(p).update("\0").update(fs.readFileSync(full));
    }
  };
  for (const p of BUILD_INPUTS) walk(p);
  return h.digest("hex");
}

/** `next build` unless .next already holds a build of exactly these sources. */
export function ensureBuild() {
  const stamp = path.join(ROOT, ".next", ".slabwright-sources");
  const want = sourceHash();
  if (fs.existsSync(path.join(ROOT, ".next", "BUILD_ID")) && fs.existsSync(stamp) && fs.readFileSync(stamp, "utf8").trim() === want) {
    return;
  }
  log("building the app (next build)");
  run(bin("next"), ["build"], { env: { NEXT_TELEMETRY_DISABLED: "1" } });
  fs.writeFileSync(stamp, `${want}\n`);
}

export function appEnv({ port, dbName, smtpPort = 2525, paymentsPort = 12111 }) {
  // Payments go to our local fake unless real keys are configured.
  const fakePayments = !process.env.STRIPE_SECRET_KEY;
  return {
    ...(fakePayments
      ? {
          STRIPE_API_BASE: `http://127.0.0.1:${paymentsPort}`,
          SLAB_PAYMENTS_PORT: String(paymentsPort),
          SLAB_FAKE_PAYMENTS: "1",
          SLAB_BILLING_WEBHOOK_URL: `http://localhost:${port}/api/billing/webhook`,
          ...fakePaymentsSecrets(),
        }
      : {}),
    SMTP_URL: process.env.SMTP_URL ?? `smtp://127.0.0.1:${smtpPort}`,
    SLAB_SMTP_PORT: String(smtpPort),
    // The fake SMTP server catches mail unless a real relay is configured.
    SLAB_FAKE_SMTP: process.env.SMTP_URL ? "0" : "1",
    SLAB_DB_NAME: dbName,
    DATABASE_URL: process.env.DATABASE_URL ?? databaseUrl().replace(/\/[^/]+$/, `/${dbName}`),
    AUTH_SECRET: authSecret(),
    AUTH_URL: `http://localhost:${port}`,
    AUTH_TRUST_HOST: "true",
    NEXT_TELEMETRY_DISABLED: "1",
    SLAB_PG_PORT: String(pgPort()),
  };
}

/** A pid file that says an instance is running; stale files (dead pid) are taken over. */
export function takeLock(name) {
  fs.mkdirSync(DATA, { recursive: true });
  const file = path.join(DATA, `${name}.pid`);
  if (fs.existsSync(file)) {
    const pid = Number(fs.readFileSync(file, "utf8").trim());
    if (pid && pid !== process.pid && alive(pid)) return { ok: false, pid };
  }
  fs.writeFileSync(file, `${process.pid}\n`);
  return { ok: true, release: () => fs.rmSync(file, { force: true }) };
}

/** A live process that is one of ours (a killed one may linger as a zombie where nothing reaps it). */
/** Whether another live process holds the named lock. */
export function lockHeld(name) {
  const file = path.join(DATA, `${name}.pid`);
  if (!fs.existsSync(file)) return false;
  const pid = Number(fs.readFileSync(file, "utf8").trim());
  return Boolean(pid) && pid !== process.pid && alive(pid);
}

function alive(pid) {
  try {
    process.kill(pid, 0);
  } catch {
    return false;
  }
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    const state = stat.slice(stat.lastIndexOf(")") + 2, stat.lastIndexOf(")") + 3);
    if (state === "Z" || state === "X") return false;
    return fs.readFileSync(`/proc/${pid}/cmdline`, "utf8").includes("scripts/");
  } catch {
    return true; // no /proc: trust the signal check
  }
}

export async function waitForHttp(url, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      const res = await fetch(url);
      if (res.status < 500) return true;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  return false;
}

/** Our fake SMTP server (development and tests), unless SMTP_URL names a real relay. */
export function startFakeSmtp(env) {
  if (process.env.SMTP_URL) return null;
  // Node itself with tsx's loader (not the tsx wrapper), so stopping the child stops the server.
  return spawn(process.execPath, ["--import", "tsx", "scripts/fake-smtp.ts"], {
    cwd: ROOT,
    stdio: ["ignore", "inherit", "inherit"],
    env: { ...process.env, ...env },
  });
}

/** Our fake payment provider on loopback (development and tests), unless real keys are configured. */
export function startFakePayments(env) {
  if (env.SLAB_FAKE_PAYMENTS !== "1") return null;
  return spawn(process.execPath, ["--import", "tsx", "scripts/fake-payments.ts"], {
    cwd: ROOT,
    stdio: ["ignore", "inherit", "inherit"],
    env: { ...process.env, ...env },
  });
}

/** The build worker (queue consumer with its thread pool): `npm start` and `npm test` run one. */
export function startWorker(env) {
  return spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], {
    cwd: ROOT,
    stdio: ["ignore", "inherit", "inherit"],
    env: { ...process.env, ...env },
  });
}

export function spawnChild(cmd, args, env) {
  return spawn(cmd, args, { cwd: ROOT, stdio: "inherit", env: { ...process.env, ...env } });
}

export { databaseName, pgPort };
